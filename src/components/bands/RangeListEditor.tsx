import NumberField from '../explorer/NumberField';

interface Props<T extends { name: string }> {
  /** The card's legend, e.g. "Bands (Hz)". */
  legend: string;
  /** What one item is called, lower case: "band" or "window". */
  word: string;
  items: T[];
  /** The two numeric ends of an item, with their labels. */
  ends: [{ key: keyof T; label: string }, { key: keyof T; label: string }];
  step: number;
  onItems: (items: T[]) => void;
  /** A new item, given how many there are. */
  fresh: (count: number) => T;
  defaults: T[];
  defaultsLabel: string;
}

/** A named list of numeric ranges (the Bands screen's bands or time windows): edit, remove, add, or start from the defaults. */
export default function RangeListEditor<T extends { name: string }>({ legend, word, items, ends, step, onItems, fresh, defaults, defaultsLabel }: Props<T>) {
  const set = (i: number, patch: Partial<T>) => onItems(items.map((x, j) => (j === i ? { ...x, ...patch } : x)));
  const Word = word.charAt(0).toUpperCase() + word.slice(1);
  return (
    <fieldset className="card p-3">
      <legend className="px-1 text-sm font-semibold">{legend}</legend>
      {items.map((item, i) => (
        <fieldset key={i} className="flex flex-wrap items-end gap-2">
          <legend className="sr-only">
            {Word} {i + 1}
          </legend>
          <label className="flex flex-col text-xs text-ink-soft">
            name
            <input className="w-24 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={item.name} onChange={(e) => set(i, { name: e.target.value } as Partial<T>)} />
          </label>
          {ends.map((end) => (
            <NumberField key={end.label} label={end.label} value={item[end.key] as number} step={step} width="w-20" onValue={(v) => set(i, { [end.key]: v } as Partial<T>)} />
          ))}
          <button type="button" className="mb-1 text-sm text-coral-deep underline" onClick={() => onItems(items.filter((_, j) => j !== i))} aria-label={`Remove ${word} ${item.name}`}>
            remove
          </button>
        </fieldset>
      ))}
      <div className="mt-2 flex gap-3 text-sm">
        <button type="button" className="text-kelp-deep underline" onClick={() => onItems([...items, fresh(items.length)])}>
          add a {word}
        </button>
        <button type="button" className="text-kelp-deep underline" onClick={() => onItems(defaults)}>
          {defaultsLabel}
        </button>
      </div>
    </fieldset>
  );
}
