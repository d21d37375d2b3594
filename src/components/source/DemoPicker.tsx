import { useEffect, useId, useState } from 'react';
import { errorMessageOf, send } from '../../lib/client/outbound';
import { formatBytes } from './format';

export interface DemoSubject {
  code: string;
  fileName: string;
  bytes: number;
  seconds: number;
  channels: string[];
}

interface Props {
  busy: boolean;
  onPick: (subject: DemoSubject) => void;
  /** Called once the list is known, so the screen can tell demo file names from a person's own. */
}

/** The generated demo cohort (invented data served by the app), to try Tidemark without a recording of one's own. */
export default function DemoPicker({ busy, onPick }: Props) {
  const [subjects, setSubjects] = useState<DemoSubject[] | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [chosen, setChosen] = useState('');
  const id = useId();

  useEffect(() => {
    let live = true;
    send('/demo/cohort.json')
      .then(async (response) => {
        if (!response.ok) throw new Error(response.status === 404 ? 'The demo cohort has not been generated here (npm run demo:data).' : await errorMessageOf(response));
        const cohort = (await response.json()) as { subjects: DemoSubject[] };
        if (!live) return;
        setSubjects(cohort.subjects);
        setChosen(cohort.subjects[0]?.fileName ?? '');
      })
      .catch((error: unknown) => live && setProblem(error instanceof Error ? error.message : String(error)));
    return () => {
      live = false;
    };
  }, []);

  if (problem) return <p className="text-sm text-ink-soft">{problem}</p>;
  if (!subjects) return <p className="text-sm text-ink-soft">Looking for the demo cohort…</p>;
  if (subjects.length === 0) return <p className="text-sm text-ink-soft">The demo cohort is empty.</p>;
  const subject = subjects.find((s) => s.fileName === chosen);
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (subject) onPick(subject);
      }}
    >
      <div className="field min-w-0 flex-1">
        <label htmlFor={`${id}-demo`}>Demo cohort (invented “Harbour Lights” task)</label>
        <select id={`${id}-demo`} value={chosen} onChange={(e) => setChosen(e.target.value)}>
          {subjects.map((s) => (
            <option key={s.fileName} value={s.fileName}>
              {s.code} · {s.channels.length} channels · {Math.round(s.seconds / 60)} min · {formatBytes(s.bytes)}
            </option>
          ))}
        </select>
      </div>
      <button type="submit" className="btn btn-quiet" disabled={busy || !subject}>
        Open demo recording
      </button>
    </form>
  );
}
