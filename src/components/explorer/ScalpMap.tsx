import { useId, useLayoutEffect, useMemo, useRef } from 'react';
import { divergingColormap, sequentialColormap, type Colormap } from '../../lib/plot/colormap';
import { HEAD_RADIUS, LABEL_FONT_SIZE, SCALP_DOT_RADIUS, scalpGeometry } from '../../lib/plot/scalp-map';
import { formatTick } from '../../lib/plot/axes';
import { downloadScalpSvg } from './scalp-export';

export interface ScalpMapProps {
  title: string;
  unit: string;
  values: { channel: string; value: number | null }[];
  /** `sequential`: cividis between the smallest and largest value; `diverging`: PuOr symmetric about `neutral`. */
  scale?: { kind: 'sequential' } | { kind: 'diverging'; neutral: number };
  testId?: string;
}

const INK = '#10283a';
const NO_VALUE = '#e9e0cf';
// The SVG's own coordinates: the head disc (radius 100) centred on 0, labels and ears around it, the colour bar below.
const VIEW = { x: -150, y: -125, width: 300, height: 290 };
const BAR = { x: -80, y: 126, width: 160, height: 7 };

const colourOf = (map: Colormap, t: number) => {
  const k = 4 * Math.round(Math.min(1, Math.max(0, t)) * (map.size - 1));
  return `rgb(${map.bytes[k]}, ${map.bytes[k + 1]}, ${map.bytes[k + 2]})`;
};

/**
 * A scalp topography (top view, nose up): the electrodes' values interpolated over the head disc by spherical splines
 * (Perrin et al., 1989; `scalpGeometry` in src/lib/plot/scalp-map.ts), electrodes as dots with names that never
 * overlap, a colour bar with the unit, and the values as a table for screen readers and anyone who wants numbers.
 */
export default function ScalpMap({ title, unit, values, scale = { kind: 'sequential' }, testId }: ScalpMapProps) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const figure = useRef<HTMLElement>(null);
  const tableId = useId();
  const key = JSON.stringify(values);
  // eslint-disable-next-line react-hooks/exhaustive-deps
  const geometry = useMemo(() => scalpGeometry(values), [key]);
  const colormap = scale.kind === 'diverging' ? divergingColormap() : sequentialColormap();
  const [lo, hi] = useMemo((): [number, number] => {
    const e = geometry.extent;
    if (scale.kind === 'diverging') {
      const m = e === null ? 1 : Math.max(Math.abs(e[0] - scale.neutral), Math.abs(e[1] - scale.neutral)) || 1;
      return [scale.neutral - m, scale.neutral + m];
    }
    if (e === null) return [0, 1];
    return e[1] > e[0] ? e : [e[0] - 1, e[1] + 1];
  }, [geometry, scale.kind, scale.kind === 'diverging' ? scale.neutral : 0]);
  const t = (v: number) => (v - lo) / (hi - lo);

  useLayoutEffect(() => {
    const c = canvas.current;
    const grid = geometry.grid;
    if (c === null) return;
    const ctx = c.getContext('2d');
    if (ctx === null) return;
    ctx.clearRect(0, 0, c.width, c.height);
    if (grid === null) return;
    const image = ctx.createImageData(grid.cells, grid.cells);
    const words = new Uint32Array(image.data.buffer);
    for (let i = 0; i < grid.values.length; i++) {
      const v = grid.values[i];
      if (!Number.isFinite(v)) continue;
      words[i] = colormap.words[Math.round(Math.min(1, Math.max(0, t(v))) * (colormap.size - 1))];
    }
    const small = document.createElement('canvas');
    small.width = grid.cells;
    small.height = grid.cells;
    small.getContext('2d')!.putImageData(image, 0, 0);
    ctx.save();
    ctx.beginPath();
    ctx.arc(c.width / 2, c.height / 2, c.width / 2, 0, 2 * Math.PI);
    ctx.clip();
    ctx.imageSmoothingEnabled = true;
    ctx.drawImage(small, 0, 0, c.width, c.height);
    ctx.restore();
  });

  const placed = geometry.electrodes;
  const pct = (v: number, of: number) => `${(v / of) * 100}%`;
  const finite = placed.filter((p) => p.value !== null && Number.isFinite(p.value));
  const describe = geometry.extent === null ? 'no values' : `${formatTick(geometry.extent[0])} to ${formatTick(geometry.extent[1])} ${unit} over ${finite.length} electrodes`;
  const ticks = [lo, (lo + hi) / 2, hi];
  if (placed.length === 0) {
    return (
      <figure className="p-2 text-sm text-ink-soft" data-testid={testId}>
        <figcaption>
          {title}: no scalp map, as no channel has a 10-20 / 10-10 name ({geometry.unplaced.slice(0, 8).join(', ')}
          {geometry.unplaced.length > 8 ? ', …' : ''}).
        </figcaption>
      </figure>
    );
  }
  return (
    <figure ref={figure} className="flex flex-col items-center gap-1" data-testid={testId} data-low={lo} data-high={hi}>
      <div className="relative w-full max-w-md" style={{ aspectRatio: `${VIEW.width} / ${VIEW.height}` }}>
        <canvas
          ref={canvas}
          width={256}
          height={256}
          aria-hidden="true"
          className="absolute"
          style={{ left: pct(-HEAD_RADIUS - VIEW.x, VIEW.width), top: pct(-HEAD_RADIUS - VIEW.y, VIEW.height), width: pct(2 * HEAD_RADIUS, VIEW.width), height: pct(2 * HEAD_RADIUS, VIEW.height) }}
        />
        <svg viewBox={`${VIEW.x} ${VIEW.y} ${VIEW.width} ${VIEW.height}`} className="absolute inset-0 h-full w-full" role="img" aria-label={`${title} on the scalp: ${describe}. The values are listed in the table below.`} aria-describedby={tableId}>
          {/* Head outline, nose and ears: plain ink strokes over the interpolated disc. */}
          <circle cx={0} cy={0} r={geometry.outline.head.r} fill="none" stroke={INK} strokeWidth={1.5} />
          <path d={geometry.outline.nose} fill="none" stroke={INK} strokeWidth={1.5} />
          <path d={geometry.outline.leftEar} fill="none" stroke={INK} strokeWidth={1.5} />
          <path d={geometry.outline.rightEar} fill="none" stroke={INK} strokeWidth={1.5} />
          {geometry.labels.map((l) => {
            const far = Math.hypot(l.x - l.anchorX, l.y - l.anchorY) > l.height + SCALP_DOT_RADIUS + 2;
            return far ? <line key={`lead-${l.channel}`} x1={l.anchorX} y1={l.anchorY} x2={l.x} y2={l.y} stroke={INK} strokeWidth={0.4} opacity={0.6} /> : null;
          })}
          {placed.map((p) => (
            <circle key={p.channel} cx={p.x} cy={p.y} r={SCALP_DOT_RADIUS} fill={p.value === null || !Number.isFinite(p.value) ? NO_VALUE : colourOf(colormap, t(p.value))} stroke={INK} strokeWidth={0.75} data-testid="scalp-electrode" data-channel={p.channel}>
              <title>
                {p.channel}: {p.value === null || !Number.isFinite(p.value) ? 'no value' : `${p.value.toFixed(3)} ${unit}`}
              </title>
            </circle>
          ))}
          {geometry.labels.map((l) => (
            <g key={`label-${l.channel}`}>
              <rect x={l.x - l.width / 2} y={l.y - l.height / 2} width={l.width} height={l.height} rx={1.5} fill="#fffdf8" opacity={0.8} />
              <text x={l.x} y={l.y} dy="0.35em" textAnchor="middle" fontSize={LABEL_FONT_SIZE} fontFamily="JetBrains Mono Variable, monospace" fill={INK} data-testid="scalp-label">
                {l.channel}
              </text>
            </g>
          ))}
          <defs>
            <linearGradient id={`${tableId}-bar`} x1="0" x2="1" y1="0" y2="0">
              {[0, 0.125, 0.25, 0.375, 0.5, 0.625, 0.75, 0.875, 1].map((s) => (
                <stop key={s} offset={s} stopColor={colourOf(colormap, s)} />
              ))}
            </linearGradient>
          </defs>
          <rect x={BAR.x} y={BAR.y} width={BAR.width} height={BAR.height} fill={`url(#${tableId}-bar)`} stroke={INK} strokeWidth={0.5} data-testid="scalp-colour-bar" />
          {ticks.map((v, i) => (
            <g key={i}>
              <line x1={BAR.x + (i * BAR.width) / 2} x2={BAR.x + (i * BAR.width) / 2} y1={BAR.y + BAR.height} y2={BAR.y + BAR.height + 3} stroke={INK} strokeWidth={0.5} />
              <text x={BAR.x + (i * BAR.width) / 2} y={BAR.y + BAR.height + 12} textAnchor="middle" fontSize={8} fontFamily="JetBrains Mono Variable, monospace" fill={INK}>
                {formatTick(v)}
              </text>
            </g>
          ))}
          <text x={BAR.x + BAR.width + 8} y={BAR.y + BAR.height} fontSize={9} fontFamily="JetBrains Mono Variable, monospace" fill={INK} data-testid="scalp-unit">
            {unit}
          </text>
        </svg>
      </div>
      <figcaption className="text-center text-xs text-ink-soft">
        {title} ({unit}); between electrodes interpolated by spherical splines (Perrin et al., 1989){geometry.unplaced.length > 0 ? ` · not a 10-20 name, not drawn: ${geometry.unplaced.join(', ')}` : ''}
      </figcaption>
      <button type="button" className="rounded-sm border border-kelp px-2 py-0 text-xs leading-4 text-kelp-deep hover:bg-kelp-pale" onClick={() => void downloadScalpSvg(figure.current, [`${title} (${unit})`, 'Between electrodes interpolated by spherical splines (Perrin et al., 1989).'], `scalp-${title}`)} data-testid={testId === undefined ? undefined : `${testId}-svg`}>
        Export SVG
      </button>
      <details className="w-full max-w-md text-xs">
        <summary className="cursor-pointer text-kelp-deep">Values at the electrodes</summary>
        <div className="max-h-48 overflow-auto" tabIndex={0} role="region" aria-label={`${title}: values at the electrodes`}>
          <table id={tableId} className="w-full font-mono">
            <thead>
              <tr>
                <th scope="col" className="text-left">channel</th>
                <th scope="col" className="text-right">value ({unit})</th>
              </tr>
            </thead>
            <tbody>
              {values.map((v) => (
                <tr key={v.channel}>
                  <td>{v.channel}</td>
                  <td className="text-right">{v.value === null || !Number.isFinite(v.value) ? '—' : v.value.toFixed(3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </details>
    </figure>
  );
}
