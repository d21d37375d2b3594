import type { SummaryView } from '../../lib/client/review/api';
import { summaryOverview, unitWordOf } from '../../lib/client/review/session-view';

const fmt = (x: number | null) => (x === null ? '—' : x.toFixed(2));

/** The current version's summary in short: what it holds, and each band × window mean over channels per condition. */
export default function SummaryOverview({ view }: { view: SummaryView }) {
  const s = view.summary;
  const unit = unitWordOf(s.normalizedUnit);
  const { rows, exponents } = summaryOverview(view);
  return (
    <div data-testid="summary-overview">
      <p className="text-sm">
        {s.channels.length} channels · conditions {s.conditions.join(', ')} · normalized as {s.normalizedUnit} · {s.trialValues.length} rows of per-trial values · maps over “{s.maps[0]?.channelGroup ?? '—'}” · SHA-256{' '}
        <span className="font-mono text-2xs">{view.summaryHash.slice(0, 16)}…</span>
      </p>
      <table className="data-table mt-2">
        <caption className="text-left text-xs text-ink-soft">Mean over channels of each band × window value ({unit})</caption>
        <thead>
          <tr>
            <th scope="col">Band</th>
            <th scope="col">Window</th>
            {s.conditions.map((c) => (
              <th scope="col" key={c}>
                {c}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map(({ band: b, window: w, means }) => (
            <tr key={`${b.label}/${w.label}`}>
              <td>
                {b.label} <span className="text-2xs text-ink-soft">{b.lowHz}–{b.highHz} Hz</span>
              </td>
              <td>
                {w.label} <span className="text-2xs text-ink-soft">{w.startS}–{w.endS} s</span>
              </td>
              {means.map((m, i) => (
                <td className="font-mono" key={s.conditions[i]}>
                  {fmt(m)}
                </td>
              ))}
            </tr>
          ))}
          <tr>
            <td colSpan={2}>aperiodic exponent (mean)</td>
            {exponents.map((m, i) => (
              <td className="font-mono" key={s.conditions[i]}>
                {fmt(m)}
              </td>
            ))}
          </tr>
        </tbody>
      </table>
    </div>
  );
}
