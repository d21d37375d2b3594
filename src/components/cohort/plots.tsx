// SVG plots of the Cohort screen and its printable report: the same components render in the island and on the
// server, so the printed report has vector plots. Colours follow the explorer: normalized values on the diverging
// PuOr map, symmetric around the method's neutral value.
import type { ReactNode } from 'react';
import { divergingColormap } from '../../lib/plot/colormap';
import { colourPosition, symmetricLimits } from '../../lib/plot/colour-scale';
import type { HistogramBin, QqPoint } from '../../lib/cohort/distribution';

const INK = '#10283a';
const SOFT = '#8a9aa6';
const KELP = '#2f6f5e';
const CORAL = '#cf5f45';

export const fmt = (x: number | null | undefined, digits = 2) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits));

function ticks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const step0 = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(step0));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= step0) ?? step0;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

function Frame({ width, height, title, children, label }: { width: number; height: number; title: string; children: ReactNode; label: string }) {
  return (
    <svg viewBox={`0 0 ${width} ${height}`} width={width} height={height} role="img" aria-label={label} className="cohort-plot" style={{ maxWidth: '100%', height: 'auto', fontFamily: 'JetBrains Mono Variable, monospace' }}>
      <text x={8} y={14} fontSize={11} fill={INK} fontFamily="Inter Variable, sans-serif" fontWeight={600}>{title}</text>
      {children}
    </svg>
  );
}

function YAxis({ x, y0, y1, lo, hi, scale, unit }: { x: number; y0: number; y1: number; lo: number; hi: number; scale: (v: number) => number; unit: string }) {
  return (
    <g>
      <line x1={x} x2={x} y1={y0} y2={y1} stroke={SOFT} />
      {ticks(lo, hi).map((t) => (
        <g key={t}>
          <line x1={x - 3} x2={x} y1={scale(t)} y2={scale(t)} stroke={SOFT} />
          <text x={x - 5} y={scale(t) + 3} fontSize={9} textAnchor="end" fill={INK}>{Number(t.toPrecision(3))}</text>
        </g>
      ))}
      <text x={10} y={(y0 + y1) / 2} fontSize={9} fill={INK} transform={`rotate(-90 10 ${(y0 + y1) / 2})`} textAnchor="middle">{unit}</text>
    </g>
  );
}

export interface WindowPoint {
  window: string;
  mean: number;
  ci95: [number, number] | null;
  n: number;
  dots: { subject: string; value: number }[];
}

/** Mean ± 95 % CI of one band over the windows, every subject a dot beside it; a dashed line at the neutral value. */
export function BandOverWindowsPlot({ band, points, neutral, unit, width = 300, height = 220 }: { band: string; points: WindowPoint[]; neutral: number; unit: string; width?: number; height?: number }) {
  const left = 44;
  const right = width - 10;
  const top = 24;
  const bottom = height - 28;
  const all = points.flatMap((p) => [...p.dots.map((d) => d.value), ...(p.ci95 ?? [p.mean])]).concat([neutral]).filter(Number.isFinite);
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  const pad = (hi - lo) * 0.08 || 1;
  lo -= pad;
  hi += pad;
  const y = (v: number) => bottom - ((v - lo) / (hi - lo)) * (bottom - top);
  const slot = (right - left) / Math.max(1, points.length);
  return (
    <Frame width={width} height={height} title={band} label={`${band}: group mean and 95 % confidence interval per window, one dot per subject`}>
      <YAxis x={left} y0={top} y1={bottom} lo={lo} hi={hi} scale={y} unit={unit} />
      <line x1={left} x2={right} y1={y(neutral)} y2={y(neutral)} stroke={SOFT} strokeDasharray="4 3" />
      {points.map((p, i) => {
        const cx = left + slot * (i + 0.5);
        return (
          <g key={p.window} data-window={p.window}>
            {p.dots.map((d, j) => (
              <circle key={d.subject} cx={cx - slot * 0.18 + ((j * 7) % 11) * (slot * 0.012)} cy={y(d.value)} r={2.4} fill={KELP} fillOpacity={0.45}>
                <title>{`${d.subject}: ${fmt(d.value)} ${unit}`}</title>
              </circle>
            ))}
            {p.ci95 && <line x1={cx + slot * 0.15} x2={cx + slot * 0.15} y1={y(p.ci95[0])} y2={y(p.ci95[1])} stroke={INK} strokeWidth={1.5} />}
            {p.ci95 && [0, 1].map((k) => <line key={k} x1={cx + slot * 0.15 - 4} x2={cx + slot * 0.15 + 4} y1={y(p.ci95![k])} y2={y(p.ci95![k])} stroke={INK} strokeWidth={1.5} />)}
            <rect x={cx + slot * 0.15 - 3.5} y={y(p.mean) - 3.5} width={7} height={7} fill={INK} />
            <text x={cx} y={bottom + 14} fontSize={9} textAnchor="middle" fill={INK}>{p.window}</text>
            <text x={cx} y={bottom + 24} fontSize={8} textAnchor="middle" fill={SOFT}>n={p.n}</text>
          </g>
        );
      })}
    </Frame>
  );
}

/** Bars of a histogram with the value axis below. */
export function HistogramPlot({ title, bins, unit, width = 260, height = 170, colour = KELP }: { title: string; bins: HistogramBin[]; unit: string; width?: number; height?: number; colour?: string }) {
  const left = 30;
  const right = width - 10;
  const top = 24;
  const bottom = height - 26;
  if (bins.length === 0) return <Frame width={width} height={height} title={title} label={`${title}: no values`}><text x={left} y={top + 20} fontSize={10}>no values</text></Frame>;
  const lo = bins[0].from;
  const hi = bins.at(-1)!.to;
  const maxCount = Math.max(...bins.map((b) => b.count));
  const x = (v: number) => (hi > lo ? left + ((v - lo) / (hi - lo)) * (right - left) : (left + right) / 2);
  const y = (c: number) => bottom - (c / maxCount) * (bottom - top);
  return (
    <Frame width={width} height={height} title={title} label={`${title}: histogram of ${bins.reduce((a, b) => a + b.count, 0)} values`}>
      <YAxis x={left} y0={top} y1={bottom} lo={0} hi={maxCount} scale={y} unit="" />
      {bins.map((b, i) => {
        const x0 = hi > lo ? x(b.from) : left;
        const x1 = hi > lo ? x(b.to) : right;
        return <rect key={i} x={x0 + 0.5} y={y(b.count)} width={Math.max(1, x1 - x0 - 1)} height={bottom - y(b.count)} fill={colour} fillOpacity={0.7}><title>{`${fmt(b.from)} … ${fmt(b.to)}: ${b.count}`}</title></rect>;
      })}
      <line x1={left} x2={right} y1={bottom} y2={bottom} stroke={SOFT} />
      {ticks(lo, hi, 4).map((t) => <text key={t} x={x(t)} y={bottom + 12} fontSize={9} textAnchor="middle" fill={INK}>{Number(t.toPrecision(3))}</text>)}
      <text x={(left + right) / 2} y={height - 3} fontSize={9} textAnchor="middle" fill={INK}>{unit}</text>
    </Frame>
  );
}

/** Normal Q–Q plot: sorted values against normal quantiles, with the line mean + SD·z a normal sample would follow. */
export function QqPlot({ title, points, mean, sd, unit, width = 260, height = 170, colour = KELP }: { title: string; points: QqPoint[]; mean: number; sd: number; unit: string; width?: number; height?: number; colour?: string }) {
  const left = 44;
  const right = width - 10;
  const top = 24;
  const bottom = height - 26;
  if (points.length < 2) return <Frame width={width} height={height} title={title} label={`${title}: too few values`}><text x={left} y={top + 20} fontSize={10}>too few values</text></Frame>;
  const zs = points.map((p) => p.theoretical);
  const vs = points.map((p) => p.sample);
  const zlo = Math.min(...zs) - 0.2;
  const zhi = Math.max(...zs) + 0.2;
  const vlo0 = Math.min(...vs, mean + sd * zlo);
  const vhi0 = Math.max(...vs, mean + sd * zhi);
  const pad = (vhi0 - vlo0) * 0.05 || 1;
  const vlo = vlo0 - pad;
  const vhi = vhi0 + pad;
  const x = (z: number) => left + ((z - zlo) / (zhi - zlo)) * (right - left);
  const y = (v: number) => bottom - ((v - vlo) / (vhi - vlo)) * (bottom - top);
  return (
    <Frame width={width} height={height} title={title} label={`${title}: normal Q–Q plot of ${points.length} values`}>
      <YAxis x={left} y0={top} y1={bottom} lo={vlo} hi={vhi} scale={y} unit={unit} />
      <line x1={left} x2={right} y1={bottom} y2={bottom} stroke={SOFT} />
      {ticks(zlo, zhi, 4).map((t) => <text key={t} x={x(t)} y={bottom + 12} fontSize={9} textAnchor="middle" fill={INK}>{Number(t.toPrecision(2))}</text>)}
      <text x={(left + right) / 2} y={height - 3} fontSize={9} textAnchor="middle" fill={INK}>normal quantile</text>
      {Number.isFinite(sd) && <line x1={x(zlo)} x2={x(zhi)} y1={y(mean + sd * zlo)} y2={y(mean + sd * zhi)} stroke={CORAL} strokeDasharray="5 3" />}
      {points.map((p) => <circle key={p.subject} cx={x(p.theoretical)} cy={y(p.sample)} r={2.6} fill={colour}><title>{`${p.subject}: ${fmt(p.sample)}`}</title></circle>)}
    </Frame>
  );
}

export interface MapCluster {
  label: number;
  p: number;
  sign: 1 | -1;
  frequencyRange: [number, number];
  timeRange: [number, number];
}

const rgbOf = (() => {
  let cache: string[] | null = null;
  return (t: number) => {
    if (!Number.isFinite(t)) return '#d9d4ca';
    cache ??= (() => {
      const cm = divergingColormap();
      return Array.from({ length: 256 }, (_, i) => {
        const k = Math.round((i / 255) * (cm.size - 1)) * 4;
        return `rgb(${cm.bytes[k]},${cm.bytes[k + 1]},${cm.bytes[k + 2]})`;
      });
    })();
    return cache[Math.round(t * 255)];
  };
})();

/**
 * The group map: one rect per frequency × time cell on the diverging PuOr map, symmetric around the neutral value,
 * frequency upwards; clusters of the map test with p < 0.05 outlined in ink, each with its sign and p value. `labels[f·T + t]` is the cluster of each cell (0: none).
 */
export function GroupMapPlot({ title, frequenciesHz, timesS, values, neutral, unit, labels, clusters, width = 560, height = 300 }: {
  title: string; frequenciesHz: number[]; timesS: number[]; values: ArrayLike<number>; neutral: number; unit: string; labels?: ArrayLike<number> | null; clusters?: MapCluster[]; width?: number; height?: number;
}) {
  const left = 48;
  const right = width - 70;
  const top = 22;
  const bottom = height - 30;
  const nF = frequenciesHz.length;
  const nT = timesS.length;
  const cw = (right - left) / nT;
  const ch = (bottom - top) / nF;
  const [lo, hi] = symmetricLimits(values, neutral);
  const scale = { domain: [lo, hi] as [number, number], kind: 'linear' as const };
  const cx = (t: number) => left + t * cw;
  const cy = (f: number) => bottom - (f + 1) * ch;
  const cells: ReactNode[] = [];
  for (let f = 0; f < nF; f++) for (let t = 0; t < nT; t++) {
    cells.push(<rect key={`${f}:${t}`} x={cx(t)} y={cy(f)} width={cw + 0.3} height={ch + 0.3} fill={rgbOf(colourPosition(scale, values[f * nT + t]))} />);
  }
  const outlines: ReactNode[] = [];
  // Only clusters under p 0.05 are drawn: the many one-cell clusters of noise would hide the map (the table lists all).
  for (const c of (clusters ?? []).filter((k) => k.p < 0.05)) {
    let d = '';
    const at = (f: number, t: number) => (f >= 0 && f < nF && t >= 0 && t < nT ? labels![f * nT + t] : 0);
    for (let f = 0; f < nF; f++) for (let t = 0; t < nT; t++) {
      if (at(f, t) !== c.label) continue;
      const x0 = cx(t), x1 = cx(t + 1), y0 = cy(f), y1 = cy(f) + ch;
      if (at(f + 1, t) !== c.label) d += `M${x0} ${y0}H${x1}`;
      if (at(f - 1, t) !== c.label) d += `M${x0} ${y1}H${x1}`;
      if (at(f, t - 1) !== c.label) d += `M${x0} ${y0}V${y1}`;
      if (at(f, t + 1) !== c.label) d += `M${x1} ${y0}V${y1}`;
    }
    const lx = cx(c.timeRange[0]) + 2;
    const ly = cy(c.frequencyRange[1]) - 2;
    outlines.push(
      <g key={c.label} data-cluster={c.label} data-p={c.p}>
        <path d={d} stroke={INK} strokeWidth={2} fill="none" />
        <text x={lx} y={Math.max(top + 9, ly)} fontSize={10} fill={INK} stroke="#fffdf8" strokeWidth={2.5} paintOrder="stroke">{`${c.sign > 0 ? '+' : '−'} p=${c.p < 0.001 ? c.p.toExponential(1) : c.p.toFixed(3)}`}</text>
      </g>,
    );
  }
  const fTicks = [0, Math.floor(nF / 4), Math.floor(nF / 2), Math.floor((3 * nF) / 4), nF - 1].filter((v, i, a) => a.indexOf(v) === i);
  const tTicks = ticks(timesS[0], timesS[nT - 1], 6);
  const tx = (s: number) => left + ((s - timesS[0]) / (timesS[nT - 1] - timesS[0] || 1)) * (right - left - cw) + cw / 2;
  const bar = Array.from({ length: 40 }, (_, i) => i);
  return (
    <Frame width={width} height={height} title={title} label={`${title}: group map, ${nF} frequencies × ${nT} times`}>
      <g shapeRendering="crispEdges">{cells}</g>
      {outlines}
      <line x1={left} x2={right} y1={bottom} y2={bottom} stroke={SOFT} />
      {tTicks.map((t) => <text key={t} x={tx(t)} y={bottom + 12} fontSize={9} textAnchor="middle" fill={INK}>{Number(t.toPrecision(3))}</text>)}
      <text x={(left + right) / 2} y={height - 4} fontSize={9} textAnchor="middle" fill={INK}>time (s)</text>
      {fTicks.map((f) => <text key={f} x={left - 4} y={cy(f) + ch / 2 + 3} fontSize={9} textAnchor="end" fill={INK}>{Number(frequenciesHz[f].toPrecision(3))}</text>)}
      <text x={10} y={(top + bottom) / 2} fontSize={9} fill={INK} transform={`rotate(-90 10 ${(top + bottom) / 2})`} textAnchor="middle">frequency (Hz)</text>
      {bar.map((i) => <rect key={i} x={right + 14} y={bottom - ((i + 1) / bar.length) * (bottom - top)} width={12} height={(bottom - top) / bar.length + 0.5} fill={rgbOf(i / (bar.length - 1))} />)}
      <text x={right + 30} y={top + 8} fontSize={9} fill={INK}>{fmt(hi)}</text>
      <text x={right + 30} y={(top + bottom) / 2 + 3} fontSize={9} fill={INK}>{fmt(neutral)}</text>
      <text x={right + 30} y={bottom} fontSize={9} fill={INK}>{fmt(lo)}</text>
      <text x={right + 14} y={bottom + 12} fontSize={9} fill={INK}>{unit}</text>
    </Frame>
  );
}
