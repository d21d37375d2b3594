import { useEffect, useId, useState } from 'react';

export interface NumberFieldProps {
  label: string;
  value: number;
  onValue: (value: number) => void;
  step?: number;
  min?: number;
  max?: number;
  unit?: string;
  error?: string | null;
  testId?: string;
  width?: string;
}

/** A labelled number input that keeps what is typed until it parses, and mirrors outside changes otherwise. */
export default function NumberField({ label, value, onValue, step, min, max, unit, error = null, testId, width = 'w-24' }: NumberFieldProps) {
  const id = useId();
  const [text, setText] = useState(String(value));
  const [focused, setFocused] = useState(false);
  useEffect(() => {
    if (!focused || Number(text) !== value) setText(String(Number(value.toFixed(6))));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [value]);
  return (
    <label htmlFor={id} className="flex flex-col gap-0.5 text-xs text-ink-soft">
      <span>
        {label}
        {unit ? ` (${unit})` : ''}
      </span>
      <input
        id={id}
        type="number"
        inputMode="decimal"
        className={`${width} rounded-sm border bg-foam px-2 py-1 font-mono text-sm text-ink ${error ? 'border-coral' : 'border-shell'}`}
        value={text}
        step={step}
        min={min}
        max={max}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        data-testid={testId}
        onFocus={() => setFocused(true)}
        onBlur={() => {
          setFocused(false);
          setText(String(Number(value.toFixed(6))));
        }}
        onChange={(e) => {
          setText(e.target.value);
          const v = Number(e.target.value);
          if (e.target.value.trim() !== '' && Number.isFinite(v)) onValue(v);
        }}
      />
      {error && (
        <span id={`${id}-error`} className="text-coral-deep" role="alert">
          {error}
        </span>
      )}
    </label>
  );
}
