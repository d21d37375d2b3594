import { useEffect, useId, useState } from 'react';
import type { FiltersSpec } from '../../lib/analysis/condition-recording';

interface Props {
  sampleRateHz: number;
  filters: FiltersSpec | null;
  onChange: (filters: FiltersSpec | null) => void;
}

/** A number typed as text, committed on Enter or leaving the field; a bad entry is named and not committed. */
function NumberText(props: { label: string; value: number; onCommit: (v: number) => void; problem: (v: number) => string | null; testId: string }) {
  const id = useId();
  const [text, setText] = useState(String(props.value));
  const [error, setError] = useState<string | null>(null);
  useEffect(() => setText(String(props.value)), [props.value]);
  const commit = () => {
    const v = Number(text);
    const problem = text.trim() === '' || !Number.isFinite(v) ? `${props.label}: enter a number.` : props.problem(v);
    setError(problem);
    if (problem === null) props.onCommit(v);
  };
  return (
    <div className="field">
      <label htmlFor={id}>{props.label}</label>
      <input id={id} inputMode="decimal" className="w-24" value={text} data-testid={props.testId} aria-invalid={error !== null} onChange={(e) => setText(e.target.value)} onBlur={commit} onKeyDown={(e) => e.key === 'Enter' && commit()} />
      {error && <p className="field-error">{error}</p>}
    </div>
  );
}

/**
 * Zero-phase high-pass and line-noise notch for the whole recording before epochs are cut (recipe `filters`): a
 * Butterworth high-pass and notches at the line frequency and its harmonics, each run forwards and backwards.
 */
export default function FiltersPanel({ sampleRateHz, filters, onChange }: Props) {
  const id = useId();
  const nyquist = sampleRateHz / 2;
  const hp = filters?.highPass;
  const nt = filters?.notch;
  const set = (next: FiltersSpec) => onChange(next.highPass === undefined && next.notch === undefined ? null : next);
  const rest = (key: 'highPass' | 'notch'): FiltersSpec => {
    const copy: FiltersSpec = { ...(filters ?? {}) };
    delete copy[key];
    return copy;
  };
  return (
    <fieldset className="grid gap-2 text-sm" data-testid="filters-panel">
      <legend className="font-semibold">Filters (zero phase, applied to each continuous stretch before epochs are cut)</legend>
      <label className="flex items-center gap-2">
        <input type="checkbox" checked={hp !== undefined} onChange={(e) => set(e.target.checked ? { ...(filters ?? {}), highPass: { cutoffHz: 0.5, order: 4 } } : rest('highPass'))} />
        High-pass (Butterworth) against slow drift
      </label>
      {hp !== undefined && (
        <div className="flex flex-wrap items-end gap-3 pl-6">
          <NumberText
            label="Cutoff (Hz)"
            value={hp.cutoffHz}
            testId="highpass-cutoff"
            problem={(v) => (v > 0 && v < nyquist ? null : `filters.highPass.cutoffHz must be above 0 and below ${nyquist} Hz (half the ${sampleRateHz} Hz sampling rate).`)}
            onCommit={(v) => set({ ...(filters ?? {}), highPass: { ...hp, cutoffHz: v } })}
          />
          <div className="field">
            <label htmlFor={`${id}-order`}>Order of one pass</label>
            <select id={`${id}-order`} value={hp.order ?? 4} onChange={(e) => set({ ...(filters ?? {}), highPass: { ...hp, order: Number(e.target.value) } })}>
              {[2, 4, 6, 8].map((o) => (
                <option key={o}>{o}</option>
              ))}
            </select>
          </div>
        </div>
      )}
      <label className="flex items-center gap-2">
        <input type="checkbox" checked={nt !== undefined} onChange={(e) => set(e.target.checked ? { ...(filters ?? {}), notch: { lineHz: 50, harmonics: 1, q: 30 } } : rest('notch'))} />
        Line-noise notch
      </label>
      {nt !== undefined && (
        <div className="flex flex-wrap items-end gap-3 pl-6">
          <div className="field">
            <span>Line frequency</span>
            <div className="flex gap-3">
              {[50, 60].map((f) => (
                <label key={f} className="flex items-center gap-1">
                  <input type="radio" name={`${id}-line`} checked={nt.lineHz === f} onChange={() => set({ ...(filters ?? {}), notch: { ...nt, lineHz: f } })} />
                  {f} Hz
                </label>
              ))}
            </div>
          </div>
          <NumberText
            label="Harmonics (1 = the line frequency only)"
            value={nt.harmonics ?? 1}
            testId="notch-harmonics"
            problem={(v) => (Number.isInteger(v) && v >= 1 && v * (nt.lineHz ?? 50) < nyquist ? null : `filters.notch.harmonics must be a whole number from 1 while ${v} × ${nt.lineHz ?? 50} Hz stays below ${nyquist} Hz (half the sampling rate).`)}
            onCommit={(v) => set({ ...(filters ?? {}), notch: { ...nt, harmonics: v } })}
          />
          <NumberText
            label="Q (width = line frequency / Q)"
            value={nt.q ?? 30}
            testId="notch-q"
            problem={(v) => (v >= 1 && v <= 200 ? null : 'filters.notch.q must be between 1 and 200.')}
            onCommit={(v) => set({ ...(filters ?? {}), notch: { ...nt, q: v } })}
          />
        </div>
      )}
    </fieldset>
  );
}
