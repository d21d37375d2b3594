import { useState } from 'react';
import type { SlopeReportInputT } from '../../lib/schemas/slope-reports';
import { saveSlopeReport } from '../../lib/client/slope-report';

export interface SaveReportProps {
  /** The report as shown (its title is replaced by the one typed here); null before the bench has run. */
  report: SlopeReportInputT | null;
  maySave: boolean;
  studyId: string;
  studyHref: string;
}

/** Saves the bench's settings and figures (and the sensitivity results, when run) with the study, for the team. */
export default function SaveReport({ report, maySave, studyId, studyHref }: SaveReportProps) {
  const [title, setTitle] = useState(() => `Slope bench ${new Date().toISOString().slice(0, 10)}`);
  const [state, setState] = useState<{ kind: 'idle' } | { kind: 'saving' } | { kind: 'saved'; title: string } | { kind: 'failed'; message: string }>({ kind: 'idle' });
  if (!maySave) return <p className="text-sm text-ink-soft">Reviewers read the saved reports on the study page; analysts and leads save them.</p>;
  const save = async () => {
    if (report === null) return;
    setState({ kind: 'saving' });
    try {
      const saved = await saveSlopeReport(studyId, { ...report, title: title.trim() });
      setState({ kind: 'saved', title: saved.title });
    } catch (e) {
      setState({ kind: 'failed', message: e instanceof Error ? e.message : String(e) });
    }
  };
  return (
    <div className="flex flex-wrap items-end gap-3" data-testid="slope-save">
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        <span>Report title</span>
        <input className="w-72 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={title} maxLength={80} onChange={(e) => setTitle(e.target.value)} data-testid="slope-report-title" />
      </label>
      <button type="button" className="btn btn-primary" disabled={report === null || state.kind === 'saving'} onClick={() => void save()} data-testid="slope-report-save">
        Save the report to the study
      </button>
      {report === null && <span className="text-sm text-ink-soft">Run the bench first.</span>}
      {state.kind === 'saved' && (
        <p className="text-sm" role="status" data-testid="slope-report-saved">
          Saved “{state.title}”. The team finds it on <a href={`${studyHref}#slope-reports`}>the study page</a>. Only settings and figures were sent: no samples.
        </p>
      )}
      {state.kind === 'failed' && (
        <p className="notice notice-warn text-sm" role="alert" data-testid="slope-report-failed">
          Not saved: {state.message} Your results stay on this screen.
        </p>
      )}
    </div>
  );
}
