import { useEffect, useRef, useState } from 'react';
import { useResultsStore, selectActive } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';
import { checkBroadbandShiftInWorker, type ShiftResult } from '../../lib/client/slope-check';
import { useCheckRun } from '../../lib/client/use-check-run';
import RunControl from './RunControl';
import { divergingColormap } from '../../lib/plot/colormap';
import { colourPosition, methodUnit, symmetricLimits, type ColourScale } from '../../lib/plot/colour-scale';
import NumberField from '../explorer/NumberField';
import { usePanelVisible } from '../explorer/usePanelVisible';

const fmt = (v: number | null, d = 2) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(d));

/**
 * One F × T map painted cell by cell (low frequencies at the bottom), with the diverging colormap the Maps screen
 * uses; NaN cells in sand. `values` null in a cell means "not part of this map" (drawn as sand too).
 */
function ShiftMap({ values, nF, nT, scale, label, testId }: { values: Float64Array; nF: number; nT: number; scale: ColourScale; label: string; testId: string }) {
  const canvas = useRef<HTMLCanvasElement>(null);
  useEffect(() => {
    const el = canvas.current;
    const ctx = el?.getContext('2d');
    if (!el || !ctx) return;
    const image = ctx.createImageData(nT, nF);
    const px = new Uint32Array(image.data.buffer);
    const map = divergingColormap();
    const none = new Uint32Array(new Uint8ClampedArray([233, 224, 207, 255]).buffer)[0];
    for (let f = 0; f < nF; f++) {
      for (let t = 0; t < nT; t++) {
        const pos = colourPosition(scale, values[f * nT + t]);
        px[(nF - 1 - f) * nT + t] = Number.isNaN(pos) ? none : map.words[Math.round(pos * (map.size - 1))];
      }
    }
    ctx.putImageData(image, 0, 0);
  }, [values, nF, nT, scale]);
  return (
    <figure className="flex flex-col gap-1">
      <figcaption className="text-sm font-semibold">{label}</figcaption>
      <canvas ref={canvas} width={nT} height={nF} className="h-56 w-full rounded-sm border border-sand-deep [image-rendering:pixelated]" data-testid={testId} />
    </figure>
  );
}

/** Baseline against post-event aperiodic fits, the map a pure aperiodic change would give, and the share per band. */
export default function ShiftPanel() {
  const d = useResultsStore(selectActive);
  const recording = useWorkspace((s) => s.recording);
  const viewChannel = useWorkspace((s) => s.channel);
  const viewCondition = useWorkspace((s) => s.condition);
  // Hidden, the panel does not follow a baseline drag on the Maps screen (no render per move).
  const visible = usePanelVisible('Slope-check');
  const baseline = useWorkspace((s) => (visible ? s.baseline : null)) ?? useWorkspace.getState().baseline;
  const method = useWorkspace((s) => s.method);
  const bands = useWorkspace((s) => s.bands);
  const fitRange = useWorkspace((s) => s.fitRange);
  // As long as the baseline by default: windows of one length give spectra of one resolution.
  const [post, setPost] = useState(() => ({ start: 0.2, end: Number((0.2 + baseline.end - baseline.start).toFixed(3)) }));
  const fingerprint = useWorkspace((s) => s.fingerprint);
  // A result belongs to one decomposition: another recording or run clears it.
  const { running, result, problem, refuse, start, cancel } = useCheckRun<ShiftResult>([d?.key ?? null, fingerprint]);

  if (d === null || recording === null) {
    return (
      <section className="card p-4" aria-labelledby="shift-h" data-testid="slope-shift">
        <h3 id="shift-h" className="text-lg font-semibold">Broadband-shift check</h3>
        <p className="mt-1 text-sm text-ink-soft">Open a recording and run a recipe: this check compares its baseline and a post-event window of one channel and condition.</p>
      </section>
    );
  }
  const channel = viewChannel !== null && d.channels.includes(viewChannel) ? viewChannel : d.channels[0];
  const condition = viewCondition !== null && d.labels.includes(viewCondition) ? viewCondition : d.labels[0];
  const model = d.recipe.aperiodic.model ?? 'power-law';
  const epochEnd = d.epochStart + (d.times.length - 1) / d.sampleRateHz;

  const run = async () => {
    if (!(post.end > post.start) || post.start < d.epochStart || post.end > epochEnd) {
      refuse(`Post-event window: ${post.start}–${post.end} s must run forwards inside the epoch (${d.epochStart}–${Number(epochEnd.toFixed(3))} s); nothing was run.`);
      return;
    }
    await start((signal) => checkBroadbandShiftInWorker(d, recording, { channel, condition, baseline, post, method, rangeHz: [fitRange[0], fitRange[1]], model, bands }, { signal }));
  };

  const nF = d.frequencies.length;
  const nT = d.times.length;
  let predictedMap: Float64Array | null = null;
  let scale: ColourScale | null = null;
  if (result !== null) {
    // The predicted change is one value per frequency; it is drawn over the post window's times only.
    predictedMap = new Float64Array(nF * nT).fill(NaN);
    for (let f = 0; f < nF; f++) for (let t = result.postPoints.first; t <= result.postPoints.last; t++) predictedMap[f * nT + t] = result.predicted[f];
    const neutral = result.request.method === 'power-ratio' ? 1 : 0;
    const both = new Float64Array(2 * nF * nT);
    both.set(result.measured);
    both.set(predictedMap, nF * nT);
    const mask = new Uint8Array(2 * nF * nT);
    mask.set(d.mask);
    scale = { domain: symmetricLimits(both, neutral, mask), kind: 'linear' };
  }
  const unit = methodUnit(result?.request.method ?? method);
  return (
    <section className="card p-4" aria-labelledby="shift-h" data-testid="slope-shift">
      <h3 id="shift-h" className="text-lg font-semibold">Broadband-shift check</h3>
      <p className="mt-1 max-w-3xl text-sm text-ink-soft">
        Normalizing to a baseline assumes oscillations and the aperiodic (1/f) part scale together; when the aperiodic part itself tilts or shifts after the event,
        a normalized map shows band "changes" that are a broadband shift (Gyurkovics et al., 2021, NeuroImage 237:118192; Donoghue et al., 2020, Nat Neurosci 23:1655).
        Here the aperiodic part is fitted in the baseline ({baseline.start} to {baseline.end} s) and in a post-event window of every epoch, and the change of the fitted
        line alone is put through the same normalization ({method}).
      </p>
      {Math.abs(post.end - post.start - (baseline.end - baseline.start)) > 0.1 * (baseline.end - baseline.start) && (
        <p className="notice notice-warn mt-2 text-sm" data-testid="shift-length-warning">
          The windows differ in length ({Number((baseline.end - baseline.start).toFixed(3))} s baseline, {Number((post.end - post.start).toFixed(3))} s after the event): their
          spectra resolve {Number((1 / (baseline.end - baseline.start)).toFixed(2))} and {Number((1 / (post.end - post.start)).toFixed(2))} Hz, and that difference alone
          can move a fit. Windows of one length compare best.
        </p>
      )}
      <fieldset className="mt-3 flex flex-wrap items-end gap-3" disabled={running}>
        <p className="text-sm">
          Channel <span className="font-mono">{channel}</span>, condition <span className="font-mono">{condition}</span> (chosen on the Maps screen), fit range {fitRange[0]}–{fitRange[1]} Hz.
        </p>
        <NumberField label="Post window from" unit="s" value={post.start} step={0.05} onValue={(v) => setPost({ ...post, start: v })} testId="shift-post-start" />
        <NumberField label="to" unit="s" value={post.end} step={0.05} onValue={(v) => setPost({ ...post, end: v })} testId="shift-post-end" />
        <RunControl running={running} busyWords="Fitting both windows in a worker…" label="Check the shift" onRun={() => void run()} onCancel={cancel} testId="shift-run" />
      </fieldset>
      {problem !== null && (
        <p className="notice notice-warn mt-3" role="alert" data-testid="shift-problem">
          {problem}
        </p>
      )}
      {result !== null && predictedMap !== null && scale !== null && (
        <div className="mt-4 grid gap-3" data-testid="shift-result">
          <p className="text-sm" data-testid="shift-fits">
            Baseline fit: exponent <span className="font-mono">{fmt(result.baselineFit.exponent, 3)}</span>, offset <span className="font-mono">{fmt(result.baselineFit.offset, 3)}</span>.
            Post-event fit ({result.request.post.start}–{result.request.post.end} s): exponent <span className="font-mono">{fmt(result.postFit.exponent, 3)}</span>, offset{' '}
            <span className="font-mono">{fmt(result.postFit.offset, 3)}</span>.
          </p>
          <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
            <ShiftMap values={result.measured} nF={nF} nT={nT} scale={scale} label={`Measured normalized map (${unit})`} testId="shift-measured" />
            <ShiftMap values={predictedMap} nF={nF} nT={nT} scale={scale} label={`A pure aperiodic change alone (${unit}, post window)`} testId="shift-predicted" />
          </div>
          <p className="text-xs text-ink-soft">
            Both maps share one colour scale, symmetric around no change ({fmt(scale.domain[0])} … {fmt(scale.domain[1])} {unit}; purple below, orange above), frequencies{' '}
            {fmt(d.frequencies[0], 1)}–{fmt(d.frequencies[nF - 1], 1)} Hz from bottom to top, epoch time {d.epochStart} to {Number(epochEnd.toFixed(3))} s left to right (edge zones
            not hatched here; the Maps screen shows them). Sand: outside the post window.
          </p>
          <table className="data-table" data-testid="shift-bands">
            <thead>
              <tr>
                <th scope="col">Band</th>
                <th scope="col">Measured ({unit})</th>
                <th scope="col">From the aperiodic change ({unit})</th>
                <th scope="col">Share explained</th>
              </tr>
            </thead>
            <tbody>
              {result.shares.map((s) => (
                <tr key={s.band} data-testid="shift-band">
                  <td>{s.band}</td>
                  <td className="font-mono">{fmt(s.measured)}</td>
                  <td className="font-mono">{fmt(s.predicted)}</td>
                  <td className="font-mono">{s.share === null ? '—' : `${Math.round(s.share * 100)} %`}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="text-xs text-ink-soft">
            Share: the aperiodic change's mean over the band divided by the measured mean over the band and the post window, when both point the same way (capped at
            100 %); "—" when the measured change is about zero or the two point in opposite directions. A high share means the band's change may be a broadband
            shift rather than an oscillation. Over short windows a strong oscillation inside the post window can itself lift or tilt the fitted line (its peak
            spans few bins), so compare with the peaks the Spectrum screen lists before concluding either way.
          </p>
        </div>
      )}
    </section>
  );
}
