import { forwardRef } from 'react';
import { scaleLinear } from 'd3-scale';
import type { SlopeReportInputT } from '../../lib/schemas/slope-reports';

type Row = SlopeReportInputT['results'][number];

// Our own palette from the theme (kelp, coral, a deep sea blue, ochre, heather, ink), each with its own dash and
// marker so the curves stay apart without colour.
export const SETTING_STYLES = [
  { colour: '#2f6f5e', dash: '', marker: 'circle' },
  { colour: '#cf5f45', dash: '6 3', marker: 'square' },
  { colour: '#3d6fa3', dash: '2 3', marker: 'diamond' },
  { colour: '#a07a1f', dash: '8 3 2 3', marker: 'triangle' },
  { colour: '#7a4f8a', dash: '4 4', marker: 'circle' },
  { colour: '#10283a', dash: '1 2', marker: 'square' },
] as const;

const W = 460;
const H = 300;
const M = { top: 28, right: 16, bottom: 44, left: 56 };
const MONO = 'JetBrains Mono Variable, ui-monospace, monospace';

function Marker({ x, y, kind, colour }: { x: number; y: number; kind: string; colour: string }) {
  if (kind === 'square') return <rect x={x - 3.5} y={y - 3.5} width={7} height={7} fill={colour} />;
  if (kind === 'diamond') return <path d={`M${x} ${y - 5}L${x + 5} ${y}L${x} ${y + 5}L${x - 5} ${y}Z`} fill={colour} />;
  if (kind === 'triangle') return <path d={`M${x} ${y - 5}L${x + 5} ${y + 4}L${x - 5} ${y + 4}Z`} fill={colour} />;
  return <circle cx={x} cy={y} r={4} fill={colour} />;
}

interface PanelProps {
  x0: number;
  title: string;
  yLabel: string;
  settings: string[];
  rows: Row[];
  /** The value drawn and its ± whisker. */
  y: (r: Row) => number | null;
  reference: (t: number) => number;
  domainX: [number, number];
}

function Panel({ x0, title, yLabel, settings, rows, y, reference, domainX }: PanelProps) {
  const values: number[] = [];
  for (const r of rows) {
    const v = y(r);
    if (v !== null) values.push(v - (r.spread ?? 0), v + (r.spread ?? 0));
  }
  values.push(reference(domainX[0]), reference(domainX[1]));
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const pad = (hi - lo) * 0.08 || 0.1;
  // Padded so the markers at the first and last exponent sit clear of the axes.
  const span = domainX[1] - domainX[0];
  const xs = scaleLinear().domain(span === 0 ? [domainX[0] - 0.5, domainX[1] + 0.5] : [domainX[0] - 0.08 * span, domainX[1] + 0.08 * span]).range([x0 + M.left, x0 + W - M.right]);
  const ys = scaleLinear().domain([lo - pad, hi + pad]).nice().range([H - M.bottom, M.top]);
  const [dx0, dx1] = xs.domain();
  return (
    <g>
      <text x={x0 + M.left} y={16} fontSize={13} fontWeight={600} fill="#10283a">{title}</text>
      <line x1={x0 + M.left} x2={x0 + W - M.right} y1={H - M.bottom} y2={H - M.bottom} stroke="#8a9aa6" />
      <line x1={x0 + M.left} x2={x0 + M.left} y1={M.top} y2={H - M.bottom} stroke="#8a9aa6" />
      {xs.ticks(5).map((t) => (
        <g key={`x${t}`}>
          <line x1={xs(t)} x2={xs(t)} y1={H - M.bottom} y2={H - M.bottom + 4} stroke="#8a9aa6" />
          <text x={xs(t)} y={H - M.bottom + 16} fontSize={10} textAnchor="middle" fontFamily={MONO} fill="#3b5366">{t}</text>
        </g>
      ))}
      {ys.ticks(5).map((t) => (
        <g key={`y${t}`}>
          <line x1={x0 + M.left - 4} x2={x0 + W - M.right} y1={ys(t)} y2={ys(t)} stroke="#e9e0cf" />
          <text x={x0 + M.left - 7} y={ys(t) + 3} fontSize={10} textAnchor="end" fontFamily={MONO} fill="#3b5366">{t}</text>
        </g>
      ))}
      <text x={x0 + M.left + (W - M.left - M.right) / 2} y={H - 8} fontSize={11} textAnchor="middle" fill="#3b5366">true exponent χ</text>
      <text transform={`translate(${x0 + 14} ${M.top + (H - M.top - M.bottom) / 2}) rotate(-90)`} fontSize={11} textAnchor="middle" fill="#3b5366">{yLabel}</text>
      <line x1={xs(dx0)} x2={xs(dx1)} y1={ys(reference(dx0))} y2={ys(reference(dx1))} stroke="#10283a" strokeOpacity={0.45} strokeDasharray="3 3" />
      {settings.map((name, i) => {
        const style = SETTING_STYLES[i % SETTING_STYLES.length];
        const pts = rows.filter((r) => r.setting === name && y(r) !== null).sort((a, b) => a.trueExponent - b.trueExponent);
        const offset = (i - (settings.length - 1) / 2) * 4; // side by side, so whiskers at one exponent do not hide each other
        return (
          <g key={name} data-testid="bench-curve" data-setting={name}>
            <polyline points={pts.map((r) => `${xs(r.trueExponent) + offset},${ys(y(r)!)}`).join(' ')} fill="none" stroke={style.colour} strokeWidth={2} strokeDasharray={style.dash} />
            {pts.map((r) => (
              <g key={r.trueExponent}>
                {r.spread !== null && <line x1={xs(r.trueExponent) + offset} x2={xs(r.trueExponent) + offset} y1={ys(y(r)! - r.spread)} y2={ys(y(r)! + r.spread)} stroke={style.colour} strokeWidth={1.5} />}
                <Marker x={xs(r.trueExponent) + offset} y={ys(y(r)!)} kind={style.marker} colour={style.colour} />
              </g>
            ))}
          </g>
        );
      })}
    </g>
  );
}

export interface BenchChartProps {
  report: Pick<SlopeReportInputT, 'title' | 'settings' | 'results'>;
}

/**
 * The bench's two panels as one self-contained SVG (so "Export SVG" serialises exactly what is shown): mean estimate
 * against the true exponent with ± one SD across repetitions beside the identity line, and the bias with the same
 * whiskers beside zero.
 */
const BenchChart = forwardRef<SVGSVGElement, BenchChartProps>(function BenchChart({ report }, ref) {
  const settings = report.settings.map((s) => s.name);
  const exps = report.results.map((r) => r.trueExponent);
  const domainX: [number, number] = exps.length === 0 ? [0, 3] : [Math.min(...exps), Math.max(...exps)];
  const legendY = H + 8;
  return (
    <svg ref={ref} xmlns="http://www.w3.org/2000/svg" viewBox={`0 0 ${2 * W} ${H + 24 + 18 * Math.ceil(settings.length / 3)}`} width="100%" role="img" aria-label={`Slope bench: ${report.title}`} fontFamily="Inter Variable, system-ui, sans-serif" data-testid="bench-chart">
      <rect width="100%" height="100%" fill="#fffdf8" />
      <Panel x0={0} title="Estimated against true exponent" yLabel="mean estimate ± SD" settings={settings} rows={report.results} y={(r) => r.meanEstimate} reference={(t) => t} domainX={domainX} />
      <Panel x0={W} title="Bias across repetitions" yLabel="bias (estimate − true) ± SD" settings={settings} rows={report.results} y={(r) => r.bias} reference={() => 0} domainX={domainX} />
      {settings.map((name, i) => {
        const style = SETTING_STYLES[i % SETTING_STYLES.length];
        const x = M.left + (i % 3) * 300;
        const y = legendY + 18 * Math.floor(i / 3);
        return (
          <g key={name}>
            <line x1={x} x2={x + 28} y1={y} y2={y} stroke={style.colour} strokeWidth={2} strokeDasharray={style.dash} />
            <Marker x={x + 14} y={y} kind={style.marker} colour={style.colour} />
            <text x={x + 36} y={y + 4} fontSize={11} fill="#10283a">{name}</text>
          </g>
        );
      })}
    </svg>
  );
});

export default BenchChart;

/** The chart as a standalone SVG file's text. */
export function svgFileOf(svg: SVGSVGElement): string {
  return `<?xml version="1.0" encoding="UTF-8"?>\n${new XMLSerializer().serializeToString(svg)}\n`;
}
