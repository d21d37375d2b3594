import { useState } from 'react';
import type { BandTableRow } from '../../lib/client/workspace/band-summary';
import type { Band, TimeWindow } from '../../lib/client/workspace/view';
import ScalpMap from '../explorer/ScalpMap';

/** The scalp map of one band × window × condition: normalized power, or phase consistency when the run has it. */
export default function BandScalp({ rows, bands, windows, labels, channels, unit, neutral, hasItpc }: { rows: BandTableRow[]; bands: Band[]; windows: TimeWindow[]; labels: string[]; channels: string[]; unit: string; neutral: number; hasItpc: boolean }) {
  const [bandIndex, setBandIndex] = useState(0);
  const [windowIndex, setWindowIndex] = useState(0);
  const [condition, setCondition] = useState(labels[0]);
  const [measure, setMeasure] = useState<'power' | 'itpc'>('power');
  const band = bands[Math.min(bandIndex, bands.length - 1)];
  const window = windows[Math.min(windowIndex, windows.length - 1)];
  const label = labels.includes(condition) ? condition : labels[0];
  const shown = measure === 'itpc' && hasItpc ? 'itpc' : 'power';
  if (band === undefined || window === undefined) return null;
  const values = channels.map((c) => {
    const r = rows.find((x) => x.kind === 'channel' && x.site === c && x.band === band && x.window === window && x.condition === label);
    return { channel: c, value: r === undefined ? null : shown === 'itpc' ? r.itpc : r.value };
  });
  const select = 'rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink';
  return (
    <div className="card flex flex-col gap-2 p-3 lg:flex-row" data-testid="band-scalp-card">
      <div className="flex flex-col gap-2 lg:w-64">
        <h3 className="text-sm font-semibold">Scalp map of a band and window</h3>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Band
          <select className={select} value={bands.indexOf(band)} onChange={(e) => setBandIndex(Number(e.target.value))} data-testid="scalp-band">
            {bands.map((b, i) => (
              <option key={b.name + i} value={i}>
                {b.name} {b.lowHz}–{b.highHz} Hz
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Window
          <select className={select} value={windows.indexOf(window)} onChange={(e) => setWindowIndex(Number(e.target.value))} data-testid="scalp-window">
            {windows.map((w, i) => (
              <option key={w.name + i} value={i}>
                {w.name} {w.startSeconds}–{w.endSeconds} s
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Condition
          <select className={select} value={label} onChange={(e) => setCondition(e.target.value)} data-testid="scalp-condition">
            {labels.map((l) => (
              <option key={l}>{l}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Value
          <select className={select} value={shown} onChange={(e) => setMeasure(e.target.value as 'power' | 'itpc')} data-testid="scalp-measure">
            <option value="power">power, normalized ({unit})</option>
            <option value="itpc" disabled={!hasItpc}>
              phase consistency (ITPC){hasItpc ? '' : ': run a recipe with ITPC'}
            </option>
          </select>
        </label>
      </div>
      <div className="flex-1">
        <ScalpMap
          title={`${shown === 'itpc' ? 'ITPC' : 'Normalized power'}, ${band.name} ${band.lowHz}–${band.highHz} Hz, ${window.name} ${window.startSeconds}–${window.endSeconds} s, ${label}`}
          unit={shown === 'itpc' ? 'ITPC, 0–1' : unit}
          values={values}
          scale={shown === 'itpc' ? { kind: 'sequential' } : { kind: 'diverging', neutral }}
          testId="band-scalp"
        />
      </div>
    </div>
  );
}
