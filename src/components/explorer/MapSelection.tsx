import type { Decomposition } from '../../lib/client/workspace/results';
import { useMapCursor, useMapView } from '../../lib/client/workspace/map-view';
import type { ViewSettings } from '../../lib/client/workspace/view';

interface SelectionProps {
  d: Decomposition;
  channel: string;
  /** Index of condition A, and of B for the difference A − B (−1: none). */
  a: number;
  b: number;
  /** The decomposition's channel group names, and the one shown (null: the channel). */
  groups: string[];
  group: string | null;
  onView: (patch: Partial<ViewSettings>) => void;
}

const GROUP = 'group:';

/** The Maps screen's channel, condition (A) and difference (A − B) choices. */
export default function MapSelection({ d, channel, a, b, groups, group, onView: setView }: SelectionProps) {
  return (
    <>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        Channel or group
        <select
          className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink"
          value={group !== null ? GROUP + group : channel}
          onChange={(e) => setView(e.target.value.startsWith(GROUP) ? { channelGroup: e.target.value.slice(GROUP.length) } : { channel: e.target.value, channelGroup: null })}
          data-testid="maps-channel"
        >
          <optgroup label="Channels">
            {d.channels.map((c) => (
              <option key={c} value={c}>
                {c}
              </option>
            ))}
          </optgroup>
          {groups.length > 0 && (
            <optgroup label="Channel groups (mean of the channels' maps)">
              {groups.map((g) => (
                <option key={g} value={GROUP + g}>
                  {g}
                </option>
              ))}
            </optgroup>
          )}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        Condition (A)
        <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={d.labels[a]} onChange={(e) => setView({ condition: e.target.value })} data-testid="maps-condition">
          {d.labels.map((l, i) => (
            <option key={l} value={l}>
              {l} ({d.trials[i]} trials)
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        Difference (A − B)
        <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={b >= 0 ? d.labels[b] : ''} onChange={(e) => setView({ compareTo: e.target.value === '' ? null : e.target.value })} data-testid="maps-compare">
          <option value="">none: A alone</option>
          {d.labels.map((l, i) =>
            i === a ? null : (
              <option key={l} value={l}>
                minus {l}
              </option>
            ),
          )}
        </select>
      </label>
    </>
  );
}

function fmtValue(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  return a !== 0 && (a >= 1e5 || a < 1e-3) ? v.toExponential(3) : Number(v.toPrecision(4)).toString();
}

export interface Readout {
  t: number;
  f: number;
  raw: number;
  norm: number;
  /** Phase consistency at the cell, when the decomposition has it. */
  itpc?: number;
}

/** Time, frequency and both values under the cursor; `fresh` is no while single-trial maps are being remade. */
export function MapReadout({ readout, fresh, unit }: { readout: Readout | null; fresh: boolean; unit: string }) {
  return (
    <output
      className="card block p-2 font-mono text-sm"
      data-testid="map-readout"
      data-time={readout?.t}
      data-frequency={readout?.f}
      data-raw={readout?.raw}
      data-normalized={readout?.norm}
      data-itpc={readout?.itpc}
      data-fresh={fresh ? 'yes' : 'no'}
    >
      {readout === null
        ? 'Point at a map (or focus it and use the arrow keys) to read time, frequency and value.'
        : `t ${Number(readout.t.toFixed(4))} s · f ${Number(readout.f.toPrecision(4))} Hz · raw ${fmtValue(readout.raw)} µV² · normalized ${fmtValue(readout.norm)} ${unit}${readout.itpc !== undefined ? ` · ITPC ${fmtValue(readout.itpc)}` : ''}`}
    </output>
  );
}

/** The readout of the cell under the cursor, from the shown maps (it reads the cursor and the normalized map itself). */
export function LiveReadout({ times, frequencies, raw, itpc, unit }: { times: ArrayLike<number>; frequencies: ArrayLike<number>; raw: ArrayLike<number>; itpc: ArrayLike<number> | null; unit: string }) {
  const cell = useMapCursor((s) => s.cell);
  const normalized = useMapView((s) => s.normalized);
  const fresh = useMapView((s) => s.fresh);
  const i = cell === null ? -1 : cell.f * times.length + cell.t;
  const readout =
    cell === null
      ? null
      : { t: times[cell.t], f: frequencies[cell.f], raw: raw[i], norm: normalized === null ? NaN : normalized.values[i], ...(itpc !== null ? { itpc: itpc[i] } : {}) };
  return <MapReadout readout={readout} fresh={fresh} unit={unit} />;
}
