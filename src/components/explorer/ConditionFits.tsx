import type { AperiodicFit } from '../../lib/analysis/aperiodic';
import { describePeaks } from './FitTable';

interface Props {
  /** label → one fit per channel, from the run (null when the recipe spectrum is not from the kept epochs). */
  byCondition: Record<string, (AperiodicFit & { channel: string })[]> | null;
  labels: string[];
  selected: string;
  onSelect: (channel: string) => void;
}

const fmt = (v: number | null | undefined, digits: number) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(digits));

/**
 * The run's aperiodic fit of each channel on each condition's kept epochs alone (the recipe's fit range and model),
 * side by side, so a condition whose slope or peaks differ stands out. Computed in the workers and the CLI alike
 * (`aperiodicByCondition` of the Result); this table only shows it.
 */
export default function ConditionFits({ byCondition, labels, selected, onSelect }: Props) {
  if (byCondition === null) {
    return (
      <p className="px-2 py-1 text-xs text-ink-soft" data-testid="condition-fits-none">
        Fits per condition come with a recipe whose spectrum is taken from the kept epochs (Recipe → spectrum source).
      </p>
    );
  }
  const channels = byCondition[labels[0]]?.map((f) => f.channel) ?? [];
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Aperiodic fit per condition">
      <table className="data-table text-sm" data-testid="condition-fits">
        <caption className="px-2 pb-1 text-left text-sm font-semibold">Aperiodic fit per condition (the run's fit range, kept epochs of each condition)</caption>
        <thead>
          <tr>
            <th scope="col">channel</th>
            {labels.map((l) => (
              <th key={l} scope="col" colSpan={3}>
                {l}
              </th>
            ))}
          </tr>
          <tr>
            <th scope="col" />
            {labels.flatMap((l) => [
              <th key={`${l}-x`} scope="col">exponent</th>,
              <th key={`${l}-r`} scope="col">r²</th>,
              <th key={`${l}-p`} scope="col">peaks above the line</th>,
            ])}
          </tr>
        </thead>
        <tbody>
          {channels.map((ch, i) => (
            <tr key={ch} aria-selected={ch === selected} className={ch === selected ? 'bg-kelp-pale' : undefined}>
              <th scope="row">
                <button type="button" className="underline-offset-2 hover:underline" onClick={() => onSelect(ch)}>
                  {ch}
                </button>
              </th>
              {labels.flatMap((l) => {
                const f = byCondition[l]?.[i];
                return [
                  <td key={`${l}-x`} className="font-mono" data-testid={`condition-fit-${ch}-${l}`} data-exponent={f?.exponent}>
                    {fmt(f?.exponent, 3)}
                  </td>,
                  <td key={`${l}-r`} className="font-mono">{fmt(f?.r2, 3)}</td>,
                  <td key={`${l}-p`} className="text-xs">{describePeaks(f?.peaks) || '—'}</td>,
                ];
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
