import { useRef } from 'react';
import { bandChartLayout } from '../../lib/plot/band-chart';
import { formatTick } from '../../lib/plot/axes';
import type { BandTableRow } from '../../lib/client/workspace/band-summary';
import type { Band, TimeWindow } from '../../lib/client/workspace/view';
import { useElementWidth } from '../explorer/useElementWidth';
import { BAR_COLOURS, formatValue } from './look';

/**
 * Grouped bars for one channel or group: one group per window × condition, one bar per band, drawn from the method's
 * neutral value; as wide as its card (`bandChartLayout`), the unit on its own axis title, never against a number.
 */
export default function BandBars({ site, rows, bands, windows, labels, unit, neutral }: { site: string; rows: BandTableRow[]; bands: Band[]; windows: TimeWindow[]; labels: string[]; unit: string; neutral: number }) {
  const wrap = useRef<HTMLDivElement>(null);
  const width = useElementWidth(wrap);
  const groups = windows.flatMap((w) => labels.map((l) => ({ w, l })));
  const layout = bandChartLayout({ width: Math.max(240, width), height: 240, groups: groups.length, bars: bands.length, values: rows.map((r) => r.value), neutral });
  const find = (b: Band, w: TimeWindow, l: string) => rows.find((x) => x.band === b && x.window === w && x.condition === l);
  const summary = groups.map((g) => `${g.w.name} ${g.l}: ${bands.map((b) => `${b.name} ${formatValue(find(b, g.w, g.l)?.value)}`).join(', ')}`).join('; ');
  return (
    <div ref={wrap} className="w-full" data-testid="band-chart" data-site={site}>
      {width > 0 && (
        <svg width={layout.width} height={layout.height} role="img" aria-label={`Band means of ${site} in ${unit}. ${summary}`} data-testid="band-plot" className="block font-mono">
          <text x={layout.left} y={12} fontSize={12} fontWeight={600} fill="#10283a" fontFamily="Inter Variable, sans-serif">
            {site}
          </text>
          {layout.ticks.map((v) => (
            <g key={v}>
              <line x1={layout.left - 4} x2={layout.left} y1={layout.y(v)} y2={layout.y(v)} stroke="#10283a" />
              <text x={layout.left - 6} y={layout.y(v) + 3} textAnchor="end" fontSize={10} fill="#10283a" data-testid="band-tick">
                {formatTick(v)}
              </text>
            </g>
          ))}
          <line x1={layout.left} x2={layout.left} y1={layout.top} y2={layout.height - layout.bottom} stroke="#10283a" />
          <line x1={layout.left} x2={layout.width - layout.right} y1={layout.y(neutral)} y2={layout.y(neutral)} stroke="#10283a" />
          <text transform={`translate(14 ${(layout.top + layout.height - layout.bottom) / 2}) rotate(-90)`} textAnchor="middle" fontSize={10} fill="#10283a" data-testid="band-axis-title">
            mean ({unit})
          </text>
          {groups.map((g, gi) => (
            <g key={`${g.w.name}-${g.l}`} transform={`translate(${layout.groupX(gi)} 0)`}>
              {bands.map((b, bi) => {
                const r = find(b, g.w, g.l);
                const v = r === undefined || !Number.isFinite(r.value) ? neutral : r.value;
                const y0 = layout.y(Math.max(v, neutral));
                const h = Math.abs(layout.y(v) - layout.y(neutral));
                return (
                  <rect key={b.name + bi} x={layout.barX(bi)} y={y0} width={layout.barWidth} height={Math.max(1, h)} fill={BAR_COLOURS[bi % BAR_COLOURS.length]}>
                    <title>
                      {site} · {b.name} · {g.w.name} · {g.l}: {formatValue(r?.value)} {unit}
                    </title>
                  </rect>
                );
              })}
              <text x={layout.groupWidth / 2} y={layout.height - layout.bottom + 16} textAnchor="middle" fontSize={10} fill="#10283a">
                {g.w.name}
              </text>
              <text x={layout.groupWidth / 2} y={layout.height - layout.bottom + 30} textAnchor="middle" fontSize={10} fill="#3b5366">
                {g.l}
              </text>
            </g>
          ))}
        </svg>
      )}
    </div>
  );
}
