import { useEffect, useId, useMemo, useState } from 'react';
import type { Recording } from '../../lib/analysis/recording';
import type { Condition } from '../../lib/client/workspace/source-rules';
import { labelCounts } from '../../lib/client/workspace/source-panels';

interface Props {
  recording: Recording;
  conditions: Condition[];
  epochWindow: { start: number; end: number };
  settingsError: string | null;
  onConditions: (conditions: Condition[]) => void;
  onWindow: (w: { start: number; end: number }) => void;
}

/** Event labels with counts; tick one or several and name them as a condition. Then the epoch window. */
export default function ConditionsPanel({ recording, conditions, epochWindow, settingsError, onConditions, onWindow }: Props) {
  const labels = useMemo(() => labelCounts(recording), [recording]);
  const [ticked, setTicked] = useState<Set<string>>(new Set());
  const [name, setName] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [startText, setStartText] = useState(String(epochWindow.start));
  const [endText, setEndText] = useState(String(epochWindow.end));
  const [windowProblem, setWindowProblem] = useState<string | null>(null);
  // The window may change from outside (the Recipe screen, a loaded recipe): show it.
  useEffect(() => {
    setStartText(String(epochWindow.start));
    setEndText(String(epochWindow.end));
  }, [epochWindow.start, epochWindow.end]);
  const id = useId();
  const owner = new Map<string, string>();
  for (const c of conditions) for (const l of c.labels) owner.set(l, c.name);

  const add = () => {
    const chosen = labels.map((l) => l.label).filter((l) => ticked.has(l));
    const trimmed = name.trim();
    if (chosen.length === 0) return setProblem('Tick at least one event label first.');
    if (trimmed === '') return setProblem('Give the condition a name.');
    if (!/^[\p{L}\p{N}][\p{L}\p{N} ._/:-]{0,39}$/u.test(trimmed)) return setProblem('A condition name is up to 40 letters, digits, spaces, dots, dashes, underscores, slashes or colons.');
    if (conditions.some((c) => c.name.toLowerCase() === trimmed.toLowerCase())) return setProblem(`There is already a condition called "${trimmed}".`);
    const taken = chosen.filter((l) => owner.has(l));
    if (taken.length > 0) return setProblem(`"${taken[0]}" already belongs to "${owner.get(taken[0])}"; remove it there first.`);
    setProblem(null);
    onConditions([...conditions, { name: trimmed, labels: chosen }]);
    setTicked(new Set());
    setName('');
  };

  const applyWindow = () => {
    const a = Number(startText);
    const b = Number(endText);
    if (startText.trim() === '' || endText.trim() === '' || !Number.isFinite(a) || !Number.isFinite(b)) return setWindowProblem('Both ends of the window are numbers of seconds.');
    if (!(b > a)) return setWindowProblem(`The window must end after it starts (${a} s to ${b} s).`);
    if (b - a > 60) return setWindowProblem('Keep the window under 60 s.');
    setWindowProblem(null);
    onWindow({ start: a, end: b });
  };

  if (labels.length === 0) {
    return <p className="notice notice-warn text-sm">This recording has no events, so there is nothing to epoch. For a sample matrix, add a BIDS events file.</p>;
  }

  return (
    <div className="grid gap-4">
      <fieldset className="grid gap-2">
        <legend className="mb-1 text-sm font-semibold">Event labels</legend>
        <div className="overflow-x-auto">
          <table className="data-table" aria-label="Event labels">
            <thead>
              <tr>
                <th scope="col">Pick</th>
                <th scope="col">Label</th>
                <th scope="col">Count</th>
                <th scope="col">Condition</th>
              </tr>
            </thead>
            <tbody>
              {labels.map((l) => (
                <tr key={l.label}>
                  <td>
                    <input
                      type="checkbox"
                      id={`${id}-${l.label}`}
                      aria-label={`Pick label ${l.label}`}
                      checked={ticked.has(l.label)}
                      disabled={owner.has(l.label)}
                      onChange={(e) => {
                        const next = new Set(ticked);
                        if (e.target.checked) next.add(l.label);
                        else next.delete(l.label);
                        setTicked(next);
                      }}
                    />
                  </td>
                  <td className="font-mono">
                    <label htmlFor={`${id}-${l.label}`}>{l.label}</label>
                  </td>
                  <td className="font-mono">{l.count}</td>
                  <td>{owner.get(l.label) ?? <span className="text-ink-soft">—</span>}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <div className="flex flex-wrap items-end gap-2">
          <div className="field">
            <label htmlFor={`${id}-name`}>Condition name</label>
            <input id={`${id}-name`} value={name} onChange={(e) => setName(e.target.value)} onKeyDown={(e) => e.key === 'Enter' && (e.preventDefault(), add())} />
          </div>
          <button type="button" className="btn btn-primary" onClick={add}>
            Make condition from picked labels
          </button>
          <button
            type="button"
            className="btn btn-quiet"
            onClick={() => onConditions([...conditions, ...labels.filter((l) => !owner.has(l.label) && !conditions.some((c) => c.name === l.label)).map((l) => ({ name: l.label, labels: [l.label] }))])}
          >
            One condition per remaining label
          </button>
        </div>
        {problem && (
          <p className="field-error" role="alert">
            {problem}
          </p>
        )}
      </fieldset>

      {conditions.length > 0 && (
        <ul className="grid gap-1 text-sm" aria-label="Conditions">
          {conditions.map((c) => (
            <li key={c.name} className="flex flex-wrap items-center gap-2" data-testid="condition">
              <span className="font-semibold">{c.name}</span>
              <span className="text-ink-soft">←</span>
              <span className="font-mono">{c.labels.join(', ')}</span>
              <button type="button" className="btn btn-quiet px-2 py-0.5 text-xs" aria-label={`Remove condition ${c.name}`} onClick={() => onConditions(conditions.filter((x) => x !== c))}>
                Remove
              </button>
            </li>
          ))}
        </ul>
      )}

      <form
        className="flex flex-wrap items-end gap-2"
        aria-label="Epoch window"
        onSubmit={(e) => {
          e.preventDefault();
          applyWindow();
        }}
      >
        <div className="field w-28">
          <label htmlFor={`${id}-epoch-start`}>Epoch start (s)</label>
          <input className="w-full min-w-0" id={`${id}-epoch-start`} inputMode="decimal" value={startText} onChange={(e) => setStartText(e.target.value)} />
        </div>
        <div className="field w-28">
          <label htmlFor={`${id}-epoch-end`}>Epoch end (s)</label>
          <input className="w-full min-w-0" id={`${id}-epoch-end`} inputMode="decimal" value={endText} onChange={(e) => setEndText(e.target.value)} />
        </div>
        <button type="submit" className="btn btn-quiet">
          Apply window
        </button>
        <p className="w-full text-xs text-ink-soft">Seconds relative to each event; the epoch at onset o covers o + start … o + end.</p>
        {windowProblem && (
          <p className="field-error w-full" role="alert">
            {windowProblem}
          </p>
        )}
      </form>
      {settingsError && <p className="notice notice-warn text-sm">These settings cannot be applied: {settingsError}</p>}
    </div>
  );
}
