import { useState } from 'react';
import { scaleSequential } from 'd3-scale';
import { interpolateCividis } from 'd3-scale-chromatic';
import { useResultsStore, selectActive } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';
import { checkSensitivityInWorker, type SensitivityResult } from '../../lib/client/slope-check';
import { useCheckRun } from '../../lib/client/use-check-run';
import RunControl from './RunControl';
import { parseColour } from '../../lib/plot/colormap';

/** "1, 2, 4" → numbers above 0, or the problem in words. */
function parseHzList(text: string, what: string): number[] | string {
  const parts = text.split(/[\s,;]+/).filter((p) => p !== '');
  if (parts.length === 0) return `${what}: list at least one frequency`;
  if (parts.length > 24) return `${what}: at most 24 values (got ${parts.length})`;
  const out = parts.map(Number);
  const bad = parts.find((p, i) => !(out[i] > 0));
  return bad !== undefined ? `${what}: "${bad}" is not a frequency above 0 Hz` : out;
}

/** Ink on light cells, foam on dark ones: WCAG 2.1 relative luminance of the cell's sRGB colour against 0.18. */
function textOn(css: string): string {
  const lin = (c: number) => (c / 255 <= 0.04045 ? c / 255 / 12.92 : ((c / 255 + 0.055) / 1.055) ** 2.4);
  const [r, g, b] = parseColour(css);
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b) > 0.18 ? '#10283a' : '#fffdf8';
}

const fmt = (v: number, d = 3) => (Number.isFinite(v) ? v.toFixed(d) : '—');

function RangeHeatMap({ result }: { result: SensitivityResult }) {
  const { startsHz, endsHz, rangeHz } = result.request;
  const finite = Array.from(result.grid).filter(Number.isFinite);
  const lo = finite.length ? Math.min(...finite) : 0;
  const hi = finite.length ? Math.max(...finite) : 1;
  const colour = scaleSequential(interpolateCividis).domain(hi > lo ? [lo, hi] : [lo - 0.5, hi + 0.5]);
  const cw = 66;
  const ch = 28;
  const left = 64;
  const top = 30;
  const w = left + cw * endsHz.length + 10;
  const h = top + ch * startsHz.length + 8;
  return (
    <svg viewBox={`0 0 ${w} ${h}`} width={Math.min(w, 900)} role="img" aria-label="Exponent over fit-range start and end" data-testid="sensitivity-map">
      <text x={left} y={14} fontSize={11} fill="#3b5366">fit range end (Hz) →</text>
      {endsHz.map((e, j) => (
        <text key={`e${j}`} x={left + cw * j + cw / 2} y={top - 4} fontSize={10} textAnchor="middle" fontFamily="JetBrains Mono Variable, monospace" fill="#3b5366">{e}</text>
      ))}
      {startsHz.map((s, i) => (
        <g key={`s${i}`}>
          <text x={left - 6} y={top + ch * i + ch / 2 + 3} fontSize={10} textAnchor="end" fontFamily="JetBrains Mono Variable, monospace" fill="#3b5366">{s}</text>
          {endsHz.map((e, j) => {
            const v = result.grid[i * endsHz.length + j];
            const chosen = s === rangeHz[0] && e === rangeHz[1];
            const fill = Number.isFinite(v) ? colour(v) : '#e9e0cf';
            return (
              <g key={`c${j}`}>
                <rect x={left + cw * j} y={top + ch * i} width={cw - 1} height={ch - 1} fill={fill} stroke={chosen ? '#cf5f45' : 'none'} strokeWidth={chosen ? 2.5 : 0}>
                  <title>{`${s}–${e} Hz: ${Number.isFinite(v) ? v.toFixed(3) : 'no fit'}`}</title>
                </rect>
                <text x={left + cw * j + cw / 2} y={top + ch * i + ch / 2 + 3} fontSize={11} textAnchor="middle" fontFamily="JetBrains Mono Variable, monospace" fill={textOn(fill)}>
                  {Number.isFinite(v) ? v.toFixed(2) : '·'}
                </text>
              </g>
            );
          })}
        </g>
      ))}
      <text transform={`translate(14 ${top + (ch * startsHz.length) / 2}) rotate(-90)`} fontSize={11} textAnchor="middle" fill="#3b5366">start (Hz)</text>
    </svg>
  );
}

/** The exponent of one channel of the open recording: over fit ranges, with a bootstrap interval, and by model. */
export default function SensitivityPanel({ onResult }: { onResult: (r: SensitivityResult | null) => void }) {
  const d = useResultsStore(selectActive);
  const recording = useWorkspace((s) => s.recording);
  const viewChannel = useWorkspace((s) => s.channel);
  const fitRange = useWorkspace((s) => s.fitRange);
  const [channel, setChannel] = useState<string | null>(null);
  const [startsText, setStartsText] = useState('1, 2, 3, 4, 6, 8');
  const [endsText, setEndsText] = useState('20, 25, 30, 35, 40, 45');
  const fingerprint = useWorkspace((s) => s.fingerprint);
  // A result belongs to one decomposition: another recording or run clears it (and takes it out of the report).
  const { running, result, problem, refuse, start, cancel } = useCheckRun<SensitivityResult>([d?.key ?? null, fingerprint], onResult);

  if (d === null || recording === null) {
    return (
      <section className="card p-4" aria-labelledby="sens-h" data-testid="slope-sensitivity">
        <h3 id="sens-h" className="text-lg font-semibold">Sensitivity on this recording</h3>
        <p className="mt-1 text-sm text-ink-soft">Open a recording and run a recipe (Source and Recipe screens): this check uses the recipe's spectrum of one channel.</p>
      </section>
    );
  }
  const ch = channel !== null && d.channels.includes(channel) ? channel : viewChannel !== null && d.channels.includes(viewChannel) ? viewChannel : d.channels[0];
  const starts = parseHzList(startsText, 'Range starts');
  const ends = parseHzList(endsText, 'Range ends');
  const model = d.recipe.aperiodic.model ?? 'power-law';

  const run = async () => {
    if (typeof starts === 'string' || typeof ends === 'string') {
      refuse(typeof starts === 'string' ? starts : (ends as string));
      return;
    }
    // The live fit range is always one cell of the grid, so the outlined cell is the interval's range.
    const s = [...new Set([...starts, fitRange[0]])].sort((a, b) => a - b);
    const e = [...new Set([...ends, fitRange[1]])].sort((a, b) => a - b);
    await start((signal) =>
      checkSensitivityInWorker(d, recording, { channel: ch, fingerprint, rangeHz: [fitRange[0], fitRange[1]], model, startsHz: s, endsHz: e, bootstrap: { repetitions: 200, level: 0.9, seed: 1 } }, { signal }),
    );
  };

  const overlapShare = result === null ? 0 : result.overlapSamples / result.segmentSamples;
  return (
    <section className="card p-4" aria-labelledby="sens-h" data-testid="slope-sensitivity">
      <h3 id="sens-h" className="text-lg font-semibold">Sensitivity on this recording</h3>
      <p className="mt-1 max-w-3xl text-sm text-ink-soft">
        The recipe's spectrum of one channel (as the Spectrum screen fits it, model {model === 'power-law' ? 'power law' : 'power law with knee'}), fitted over many ranges:
        a stable exponent changes little across the grid. The interval and the model comparison use the live fit range, {fitRange[0]}–{fitRange[1]} Hz.
      </p>
      <fieldset className="mt-3 flex flex-wrap items-end gap-3" disabled={running}>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Channel
          <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={ch} onChange={(e) => setChannel(e.target.value)} data-testid="sensitivity-channel">
            {d.channels.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Range starts (Hz)
          <input className="w-48 rounded-sm border border-shell bg-foam px-2 py-1 font-mono text-sm text-ink" value={startsText} onChange={(e) => setStartsText(e.target.value)} data-testid="sensitivity-starts" />
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Range ends (Hz)
          <input className="w-56 rounded-sm border border-shell bg-foam px-2 py-1 font-mono text-sm text-ink" value={endsText} onChange={(e) => setEndsText(e.target.value)} data-testid="sensitivity-ends" />
        </label>
        <RunControl running={running} busyWords="Fitting in a worker…" label={`Check ${ch}`} onRun={() => void run()} onCancel={cancel} testId="sensitivity-run" />
      </fieldset>
      {problem !== null && (
        <p className="notice notice-warn mt-3" role="alert">
          {problem}
        </p>
      )}
      {result !== null && (
        <div className="mt-4 grid gap-3" data-testid="sensitivity-result">
          <figure>
            <RangeHeatMap result={result} />
            <figcaption className="text-xs text-ink-soft">
              Exponent χ per fit range, from {fmt(Math.min(...Array.from(result.grid).filter(Number.isFinite)), 2)} (dark) to{' '}
              {fmt(Math.max(...Array.from(result.grid).filter(Number.isFinite)), 2)} (light) on the cividis scale; outlined: the live range, which the interval and the
              model comparison use; · no fit (too few bins).
            </figcaption>
          </figure>
          <p className="text-sm" data-testid="sensitivity-interval">
            {result.request.channel}, {result.request.rangeHz[0]}–{result.request.rangeHz[1]} Hz: exponent <span className="font-mono">{fmt(result.interval.estimate)}</span>,{' '}
            {Math.round(result.interval.level * 100)} % bootstrap interval{' '}
            <span className="font-mono">
              {fmt(result.interval.lower)} … {fmt(result.interval.upper)}
            </span>{' '}
            from 200 resamples of its {result.interval.segments} Welch segments (percentile interval; Efron &amp; Tibshirani, 1993, An Introduction to the Bootstrap, ch. 13).
            {overlapShare > 0 && ` The segments overlap by ${Math.round(overlapShare * 100)} %, so they are not independent and the interval is somewhat too narrow.`}
          </p>
          <div className="text-sm" data-testid="sensitivity-model">
            <p>
              <span className="font-semibold">Recommended model: {result.comparison.preferred === 'power-law' ? 'power law' : 'power law with a knee'}.</span> {result.comparison.reason}
            </p>
            <p className="mt-1 text-xs text-ink-soft">
              Bayesian information criterion over the range's bins, BIC = n·ln(RSS/n) + k·ln(n) (Schwarz, 1978, Ann Stat 6:461), k = 2 for the power law and 3 with a knee:
              power law <span className="font-mono">{fmt(result.comparison.bicPowerLaw, 1)}</span>, with knee{' '}
              <span className="font-mono">{result.comparison.bicKnee === null ? '—' : fmt(result.comparison.bicKnee, 1)}</span>. A drop of more than 6 counts as strong
              evidence (Kass &amp; Raftery, 1995, JASA 90:773).
            </p>
          </div>
        </div>
      )}
    </section>
  );
}
