import { useEffect, useRef, useState } from 'react';
import type { SlopeReportListItem } from '../../lib/schemas/slope-reports';
import BenchResults from './BenchResults';

const when = (iso: string) => iso.replace('T', ' ').slice(0, 16) + ' UTC';

/** The study page's list of saved Slope check reports: what was checked, by whom, the figures, CSV and SVG. */
export default function SlopeReportsSection({ reports }: { reports: SlopeReportListItem[] }) {
  // A report's chart and table are drawn when it is opened: a study may hold up to 200 of them.
  const [open, setOpen] = useState<ReadonlySet<string>>(new Set());
  const toggle = (id: string, isOpen: boolean) =>
    setOpen((o) => {
      const next = new Set(o);
      if (isOpen) next.add(id);
      else next.delete(id);
      return next;
    });
  // A report opened before this island was hydrated (a quick click on a slow page) is drawn once it is.
  const section = useRef<HTMLElement>(null);
  useEffect(() => {
    const opened = [...(section.current?.querySelectorAll<HTMLDetailsElement>('details[data-report-id]') ?? [])].filter((d) => d.open);
    if (opened.length > 0) setOpen(new Set(opened.map((d) => d.dataset.reportId!)));
  }, []);
  return (
    <section ref={section} className="mt-10 max-w-5xl" aria-labelledby="slope-reports" data-testid="slope-reports">
      <h2 id="slope-reports" className="scroll-mt-4 text-xl font-semibold">
        Slope check reports
      </h2>
      <p className="max-w-3xl text-sm text-ink-soft">
        How far the aperiodic exponent can be trusted with the team's fit settings, from the workspace's Slope check. Settings and derived figures only;
        research use, not a validated measure.
      </p>
      {reports.length === 0 ? (
        <p className="mt-3 text-ink-soft">No reports yet. An analyst or lead saves one from the workspace's Slope check screen.</p>
      ) : (
        <ul className="mt-3 grid gap-3">
          {reports.map((r) => (
            <li key={r.id} className="card p-3" data-testid="slope-report">
              <details data-report-id={r.id} onToggle={(e) => toggle(r.id, e.currentTarget.open)}>
                <summary className="cursor-pointer">
                  <span className="font-semibold" data-testid="slope-report-name">{r.title}</span>
                  <span className="text-sm text-ink-soft">
                    {' '}
                    · {r.createdByName ?? 'a former member'} · <span className="font-mono text-xs">{when(r.createdAt)}</span> · {r.report.settings.map((s) => s.name).join(' vs ')} · true χ{' '}
                    {r.report.truth.exponents.join(', ')} · {r.report.truth.repetitions} repetitions of {r.report.truth.durationSeconds} s
                    {r.report.sensitivity !== null && ` · sensitivity on ${r.report.sensitivity.channel}`}
                  </span>
                </summary>
                {open.has(r.id) && (
                  <div className="mt-3">
                    <BenchResults report={r.report} testId="slope-report-results" />
                    {r.report.sensitivity !== null && (
                      <p className="mt-3 text-sm" data-testid="slope-report-sensitivity">
                        Channel {r.report.sensitivity.channel}
                        {r.report.sensitivity.fingerprint !== null && (
                          <>
                            {' '}of recording <span className="font-mono text-xs">{r.report.sensitivity.fingerprint.slice(0, 16)}…</span>
                          </>
                        )}
                        , {r.report.sensitivity.rangeHz[0]}–{r.report.sensitivity.rangeHz[1]} Hz: exponent{' '}
                        <span className="font-mono">{r.report.sensitivity.interval.estimate.toFixed(3)}</span>, {Math.round(r.report.sensitivity.interval.level * 100)} % bootstrap
                        interval <span className="font-mono">{r.report.sensitivity.interval.lower.toFixed(3)} … {r.report.sensitivity.interval.upper.toFixed(3)}</span> over{' '}
                        {r.report.sensitivity.interval.segments} Welch segments. {r.report.sensitivity.comparison.reason}
                      </p>
                    )}
                  </div>
                )}
              </details>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
