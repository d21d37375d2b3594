import { useEffect, useId, useState } from 'react';
import type { EventTableSpec } from '../../lib/analysis/event-table';

interface Props {
  header: string[];
  selection: EventTableSpec | null;
  /** Applies a selection; returns the problem (naming the field) when it cannot be applied, and nothing changes. */
  onApply: (spec: EventTableSpec | null) => string | null;
}

const FIXED = new Set(['onset', 'duration']);

/**
 * Which rows of the paired BIDS events file are events (recipe `eventTable`): the column that labels them, conditions
 * on any column, and a column of seconds to move each onset by (epochs locked to the response).
 */
export default function EventTablePanel({ header, selection, onApply }: Props) {
  const id = useId();
  const columns = header.filter((h) => !FIXED.has(h));
  const [label, setLabel] = useState(selection?.labelColumn ?? (columns.includes('trial_type') ? 'trial_type' : (columns[0] ?? '')));
  const [where, setWhere] = useState((selection?.where ?? []).join('; '));
  const [shift, setShift] = useState(selection?.shiftBy ?? '');
  const [problem, setProblem] = useState<string | null>(null);
  useEffect(() => {
    setWhere((selection?.where ?? []).join('; '));
    setShift(selection?.shiftBy ?? '');
    if (selection?.labelColumn) setLabel(selection.labelColumn);
  }, [selection]);
  const apply = () => {
    const conditions = where.split(';').map((w) => w.trim()).filter((w) => w !== '');
    const spec: EventTableSpec = {
      ...(label !== '' && label !== 'trial_type' ? { labelColumn: label } : {}),
      ...(conditions.length > 0 ? { where: conditions } : {}),
      ...(shift !== '' ? { shiftBy: shift } : {}),
    };
    setProblem(onApply(Object.keys(spec).length > 0 ? spec : null));
  };
  return (
    <fieldset className="grid gap-2 text-sm" data-testid="event-table-panel">
      <legend className="font-semibold">Events file columns</legend>
      <div className="flex flex-wrap items-end gap-3">
        <div className="field">
          <label htmlFor={`${id}-label`}>Label events by</label>
          <select id={`${id}-label`} value={label} onChange={(e) => setLabel(e.target.value)}>
            {columns.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor={`${id}-where`}>Keep rows where (e.g. response_time &lt; 1.2; value == 3)</label>
          <input id={`${id}-where`} className="w-72" value={where} onChange={(e) => setWhere(e.target.value)} onKeyDown={(e) => e.key === 'Enter' && apply()} />
        </div>
        <div className="field">
          <label htmlFor={`${id}-shift`}>Lock epochs to (onset + this column, s)</label>
          <select id={`${id}-shift`} value={shift} onChange={(e) => setShift(e.target.value)}>
            <option value="">the event onset</option>
            {columns.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </div>
        <button type="button" className="btn btn-quiet" onClick={apply} data-testid="event-table-apply">
          Use these events
        </button>
      </div>
      {problem !== null && (
        <p className="field-error" role="alert" data-testid="event-table-problem">
          {problem}; the events are as they were.
        </p>
      )}
    </fieldset>
  );
}
