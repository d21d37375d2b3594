import { interpolateCividis } from 'd3-scale-chromatic';
import { scalpPosition } from '../../lib/plot/scalp-positions';

export interface ScalpMapProps {
  title: string;
  unit: string;
  values: { channel: string; value: number | null }[];
  testId?: string;
}

/**
 * One value per electrode on a top view of the head (nose up): electrodes as discs coloured on cividis between the
 * smallest and largest value, names beside them; channels without a 10-20 name are listed below instead.
 */
export default function ScalpMap({ title, unit, values, testId }: ScalpMapProps) {
  const placed = values.map((v) => ({ ...v, pos: scalpPosition(v.channel) }));
  const finite = placed.filter((p) => p.value !== null && Number.isFinite(p.value)).map((p) => p.value as number);
  const lo = finite.length > 0 ? Math.min(...finite) : 0;
  const hi = finite.length > 0 ? Math.max(...finite) : 1;
  const t = (v: number) => (hi > lo ? (v - lo) / (hi - lo) : 0.5);
  const R = 100;
  const unplaced = placed.filter((p) => p.pos === null);
  return (
    <figure className="flex flex-col items-center" data-testid={testId}>
      <svg viewBox="-150 -135 300 270" className="w-full max-w-sm" role="img" aria-label={`${title} on the scalp, ${lo.toFixed(2)} to ${hi.toFixed(2)} ${unit}`}>
        {/* Head outline, nose and ears: plain strokes on foam, the tide-line ink. */}
        <circle cx={0} cy={0} r={R} fill="#fffdf8" stroke="#10283a" strokeWidth={1.5} />
        <path d={`M -12 ${-R + 1} L 0 ${-R - 14} L 12 ${-R + 1}`} fill="none" stroke="#10283a" strokeWidth={1.5} />
        <path d={`M ${-R} -14 q -10 14 0 28`} fill="none" stroke="#10283a" strokeWidth={1.5} />
        <path d={`M ${R} -14 q 10 14 0 28`} fill="none" stroke="#10283a" strokeWidth={1.5} />
        <line x1={-R} x2={R} y1={0} y2={0} stroke="#c9b896" strokeWidth={0.75} strokeDasharray="2 3" />
        {placed.map((p) =>
          p.pos === null ? null : (
            <g key={p.channel} transform={`translate(${(p.pos.x * R) / 1.25} ${(-p.pos.y * R) / 1.25})`}>
              <circle r={7} fill={p.value === null || !Number.isFinite(p.value) ? '#e9e0cf' : interpolateCividis(t(p.value))} stroke="#10283a" strokeWidth={0.75}>
                <title>
                  {p.channel}: {p.value === null ? 'no fit' : `${p.value.toFixed(3)} ${unit}`}
                </title>
              </circle>
              <text y={17} textAnchor="middle" fontSize={7} fontFamily="JetBrains Mono Variable, monospace" fill="#10283a">
                {p.channel}
              </text>
            </g>
          ),
        )}
        <defs>
          <linearGradient id="scalp-bar" x1="0" x2="1" y1="0" y2="0">
            {[0, 0.25, 0.5, 0.75, 1].map((s) => (
              <stop key={s} offset={s} stopColor={interpolateCividis(s)} />
            ))}
          </linearGradient>
        </defs>
        <rect x={-60} y={118} width={120} height={6} fill="url(#scalp-bar)" stroke="#10283a" strokeWidth={0.5} />
        <text x={-64} y={124} textAnchor="end" fontSize={8} fontFamily="JetBrains Mono Variable, monospace" fill="#10283a">
          {lo.toFixed(2)}
        </text>
        <text x={64} y={124} fontSize={8} fontFamily="JetBrains Mono Variable, monospace" fill="#10283a">
          {hi.toFixed(2)}
        </text>
      </svg>
      <figcaption className="text-xs text-ink-soft">
        {title} ({unit}){unplaced.length > 0 ? ` · not a 10-20 name, not drawn: ${unplaced.map((p) => p.channel).join(', ')}` : ''}
      </figcaption>
    </figure>
  );
}
