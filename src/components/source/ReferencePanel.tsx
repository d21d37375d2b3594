import { useEffect, useId, useState } from 'react';
import type { ReferenceSpec } from '../../lib/analysis/condition-recording';

type Kind = ReferenceSpec['kind'];

const KINDS: { kind: Kind; label: string }[] = [
  { kind: 'as-recorded', label: 'As recorded' },
  { kind: 'common-average', label: 'Common average of the good EEG / intracranial channels' },
  { kind: 'mean-of-channels', label: 'Mean of chosen channels (e.g. both mastoids)' },
  { kind: 'bipolar', label: 'Bipolar: neighbours along named shafts, and pairs by hand' },
];

interface Props {
  /** Good µV channels a reference can use, in recording order. */
  electrodes: string[];
  /** Intracranial channels, from whose names shafts are suggested when bipolar is chosen. */
  intracranial: string[];
  reference: ReferenceSpec | null;
  onChange: (reference: ReferenceSpec | null) => void;
}

/**
 * How the electrode channels are re-referenced before epoching (recipe `reference`). The core checks the choice
 * against the recording; a problem shows on this screen, naming the field, and nothing else changes.
 */
export default function ReferencePanel({ electrodes, intracranial, reference, onChange }: Props) {
  const id = useId();
  const kind: Kind = reference?.kind ?? 'as-recorded';
  const chosen = reference?.kind === 'mean-of-channels' ? reference.channels : [];
  const pairs = reference?.kind === 'bipolar' ? (reference.pairs ?? []) : [];
  const shafts = reference?.kind === 'bipolar' ? (reference.shafts ?? []) : [];
  const [shaftText, setShaftText] = useState(shafts.join(', '));
  const [a, setA] = useState(electrodes[0] ?? '');
  const [b, setB] = useState(electrodes[1] ?? '');
  useEffect(() => setShaftText(shafts.join(', ')), [shafts.join(',')]);

  const setKind = (k: Kind) => {
    if (k === 'as-recorded') onChange(null);
    else if (k === 'common-average') onChange({ kind: k });
    else if (k === 'mean-of-channels') onChange({ kind: k, channels: chosen.length > 0 ? chosen : electrodes.slice(0, 1) });
    else {
      const guessed = guessShafts(intracranial);
      // Bipolar needs pairs or shafts: suggest the shafts of an intracranial recording, else a first pair by hand.
      onChange({ kind: k, ...(guessed.length > 0 ? { shafts: guessed } : { pairs: electrodes.length >= 2 ? [[electrodes[0], electrodes[1]]] : [] }) });
    }
  };
  const setBipolar = (next: { pairs?: readonly (readonly [string, string])[]; shafts?: readonly string[] }) =>
    onChange({ kind: 'bipolar', ...(next.pairs && next.pairs.length > 0 ? { pairs: next.pairs } : {}), ...(next.shafts && next.shafts.length > 0 ? { shafts: next.shafts } : {}) });

  return (
    <fieldset className="grid gap-2 text-sm" data-testid="reference-panel">
      <legend className="font-semibold">Reference (applied to the whole recording before epochs are cut)</legend>
      {KINDS.map((k) => (
        <label key={k.kind} className="flex items-center gap-2">
          <input type="radio" name={`${id}-kind`} value={k.kind} checked={kind === k.kind} onChange={() => setKind(k.kind)} />
          {k.label}
        </label>
      ))}
      {kind === 'mean-of-channels' && (
        <div className="field">
          <label htmlFor={`${id}-refs`}>Reference channels (Ctrl/⌘ or Shift to pick several)</label>
          <select
            id={`${id}-refs`}
            multiple
            size={Math.min(8, electrodes.length)}
            value={[...chosen]}
            onChange={(e) => onChange({ kind: 'mean-of-channels', channels: [...e.target.selectedOptions].map((o) => o.value) })}
          >
            {electrodes.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </div>
      )}
      {kind === 'bipolar' && (
        <div className="grid gap-2">
          <div className="field">
            <label htmlFor={`${id}-shafts`}>Shafts (names before the contact number, comma-separated: LA, RH)</label>
            <input
              id={`${id}-shafts`}
              value={shaftText}
              onChange={(e) => setShaftText(e.target.value)}
              onBlur={() => setBipolar({ pairs, shafts: splitList(shaftText) })}
              onKeyDown={(e) => e.key === 'Enter' && setBipolar({ pairs, shafts: splitList(shaftText) })}
            />
          </div>
          <div className="flex flex-wrap items-end gap-2">
            <label className="grid gap-0.5">
              From
              <select aria-label="Pair from" value={a} onChange={(e) => setA(e.target.value)}>
                {electrodes.map((n) => (
                  <option key={n}>{n}</option>
                ))}
              </select>
            </label>
            <label className="grid gap-0.5">
              minus
              <select aria-label="Pair minus" value={b} onChange={(e) => setB(e.target.value)}>
                {electrodes.map((n) => (
                  <option key={n}>{n}</option>
                ))}
              </select>
            </label>
            <button type="button" className="btn btn-quiet" disabled={a === b || a === '' || b === ''} onClick={() => setBipolar({ pairs: [...pairs, [a, b]], shafts })}>
              Add pair
            </button>
          </div>
          {pairs.length > 0 && (
            <ul className="flex flex-wrap gap-2" data-testid="reference-pairs">
              {pairs.map(([x, y], i) => (
                <li key={`${x}|${y}|${i}`} className="rounded-sm border border-shell px-2 font-mono">
                  {x}−{y}{' '}
                  <button type="button" aria-label={`Remove pair ${x} minus ${y}`} onClick={() => setBipolar({ pairs: pairs.filter((_, j) => j !== i), shafts })}>
                    ×
                  </button>
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
    </fieldset>
  );
}

function splitList(text: string): string[] {
  return [...new Set(text.split(',').map((s) => s.trim()).filter((s) => s !== ''))];
}

/** Shaft names a recording suggests: label stems followed by a number that occur at least twice (LA1, LA2 → LA). */
function guessShafts(names: readonly string[]): string[] {
  const count = new Map<string, number>();
  for (const n of names) {
    const m = /^([A-Za-z']+)\d+$/.exec(n);
    if (m) count.set(m[1], (count.get(m[1]) ?? 0) + 1);
  }
  return [...count].filter(([, k]) => k >= 2).map(([s]) => s);
}
