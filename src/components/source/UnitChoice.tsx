import type { RecordingKind } from '../../lib/client/intake';
import { useId, useState } from 'react';

export type UnitDecision = { kind: 'leave-out'; signal: string } | { kind: 'factor'; dimension: string; factor: number };

/** The attempt's reading choices plus one more decision about an unknown unit. */
export function withDecision(kind: RecordingKind & { kind: 'edf' }, decision: UnitDecision): RecordingKind {
  const exclude = kind.exclude ?? [];
  if (decision.kind === 'leave-out') return { ...kind, exclude: exclude.includes(decision.signal) ? exclude : [...exclude, decision.signal] };
  return { ...kind, unitFactors: { ...kind.unitFactors, [decision.dimension]: decision.factor } };
}


interface Props {
  signal: string;
  /** The physical dimension as written in the header (may be empty). */
  dimension: string;
  busy: boolean;
  onChoose: (decision: UnitDecision) => void;
}

/** Reads a typed factor: a finite number greater than 0, or the reason it is not one. */
export function parseFactor(text: string): { ok: true; factor: number } | { ok: false; message: string } {
  const value = Number(text.trim());
  if (text.trim() === '' || !Number.isFinite(value)) return { ok: false, message: 'Enter the factor as a number, for example 1 or 0.001.' };
  if (value <= 0) return { ok: false, message: 'The factor must be greater than 0.' };
  return { ok: true, factor: value };
}

/**
 * Offered when a signal's unit is one the reader cannot convert to µV: leave that signal out, or say what one of its
 * units is in µV. The file is then opened again with the choice; nothing is guessed.
 */
export default function UnitChoice({ signal, dimension, busy, onChoose }: Props) {
  const id = useId();
  const [choice, setChoice] = useState<'leave-out' | 'factor'>('leave-out');
  const [factorText, setFactorText] = useState('1');
  const [error, setError] = useState<string | null>(null);
  const unit = dimension === '' ? 'no unit' : `“${dimension}”`;

  const submit = () => {
    if (choice === 'leave-out') return onChoose({ kind: 'leave-out', signal });
    const parsed = parseFactor(factorText);
    if (!parsed.ok) return setError(parsed.message);
    setError(null);
    onChoose({ kind: 'factor', dimension, factor: parsed.factor });
  };

  return (
    <form
      className="grid gap-2 border-t border-sand pt-2"
      data-testid="unit-choice"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
    >
      <p className="text-sm">
        Tidemark analyses signals in µV and does not know what {unit} is for <span className="font-semibold">{signal}</span>. How should it be read?
      </p>
      <fieldset className="grid gap-1 text-sm">
        <legend className="sr-only">How to read {signal}</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name={`${id}-choice`} checked={choice === 'leave-out'} onChange={() => setChoice('leave-out')} data-testid="unit-leave-out" />
          Leave this signal out
        </label>
        <label className="flex flex-wrap items-center gap-2">
          <input type="radio" name={`${id}-choice`} checked={choice === 'factor'} onChange={() => setChoice('factor')} data-testid="unit-map" />
          Its values are in µV ×
          <input
            id={`${id}-factor`}
            aria-label={`µV per ${dimension || 'unit'} of ${signal}`}
            inputMode="decimal"
            className="w-24 rounded-sm border border-sand px-2 py-0.5 font-mono"
            value={factorText}
            onFocus={() => setChoice('factor')}
            onChange={(e) => setFactorText(e.target.value)}
            aria-invalid={error !== null}
            aria-describedby={error ? `${id}-factor-error` : undefined}
            data-testid="unit-factor"
          />
          {dimension !== '' && <span className="text-ink-soft">(every signal in {unit})</span>}
        </label>
      </fieldset>
      {error && (
        <p id={`${id}-factor-error`} className="field-error" data-testid="unit-factor-error">
          {error}
        </p>
      )}
      <button type="submit" className="btn btn-primary justify-self-start" disabled={busy} data-testid="unit-reopen">
        Open again with this choice
      </button>
    </form>
  );
}
