import { useId } from 'react';

export interface ChoiceProps<T extends string> {
  legend: string;
  value: T;
  options: { value: T; label: string }[];
  onChange: (value: T) => void;
  name?: string;
}

/** A radio group drawn as a segmented control; arrow keys move between options (native radio behaviour). */
export default function Choice<T extends string>({ legend, value, options, onChange, name }: ChoiceProps<T>) {
  const id = useId();
  return (
    <fieldset className="flex flex-col gap-0.5 text-xs text-ink-soft">
      <legend className="mb-0.5">{legend}</legend>
      <div className="flex flex-wrap rounded-sm border border-shell bg-foam">
        {options.map((o) => (
          <label key={o.value} className={`cursor-pointer px-2 py-1 text-sm has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-kelp ${o.value === value ? 'bg-kelp text-foam' : 'text-ink'}`}>
            <input type="radio" className="sr-only" name={name ?? id} value={o.value} checked={o.value === value} onChange={() => onChange(o.value)} />
            {o.label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}
