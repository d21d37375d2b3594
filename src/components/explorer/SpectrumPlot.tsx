import { useId, useMemo, useRef, type PointerEvent, type KeyboardEvent } from 'react';
import type { AperiodicOutcome } from '../../lib/analysis/aperiodic';
import type { EpochSpectra } from '../../lib/analysis/epoch-spectra';
import type { RecipeSpectrum } from '../../lib/client/workspace/spectra';
import type { SpectrumAxes } from '../../lib/client/workspace/view';
import type { LineLayout } from '../../lib/plot/line-plot';
import { drawAboveLine, drawSpectrum, spectrumPlotModel, spectrumX, SPREAD_QUANTILES, type SpectrumPlotModel } from '../../lib/plot/spectrum-plot';
import { formatTick } from '../../lib/plot/axes';
import CanvasPlot from './CanvasPlot';

type Fit = AperiodicOutcome;

export function FitReadout({ fit, model }: { fit: Fit | null; model: string }) {
  if (fit === null) return null;
  if (fit.fit === null) return <p className="p-2 text-sm text-coral-deep">{fit.error}</p>;
  const f = fit.fit;
  return (
    <dl className="flex flex-wrap gap-x-6 gap-y-1 p-2 font-mono text-sm" data-testid="fit-readout" data-exponent={f.exponent}>
      <div>
        <dt className="inline text-ink-soft">exponent </dt>
        <dd className="inline">{f.exponent.toFixed(3)}</dd>
      </div>
      <div>
        <dt className="inline text-ink-soft">offset </dt>
        <dd className="inline">{f.offset.toFixed(3)}</dd>
      </div>
      <div>
        <dt className="inline text-ink-soft">knee </dt>
        <dd className="inline">{f.knee === null ? `— (${model})` : f.knee.toFixed(2)}</dd>
      </div>
      <div>
        <dt className="inline text-ink-soft">r² </dt>
        <dd className="inline">{f.r2.toFixed(4)}</dd>
      </div>
      <div>
        <dt className="inline text-ink-soft">RMSE </dt>
        <dd className="inline">{f.rmse.toFixed(4)}</dd>
      </div>
      <div>
        <dt className="inline text-ink-soft">bins </dt>
        <dd className="inline">
          {f.points} ({f.excluded} peak bins left out)
        </dd>
      </div>
    </dl>
  );
}

interface SpectrumPlotProps {
  spectra: EpochSpectra;
  /** The spectrum the fit uses (recipe `spectrum.source`), drawn thick. */
  recipeSpectrum: RecipeSpectrum;
  source: 'recording' | 'epochs';
  fit: Fit | null;
  axes: SpectrumAxes;
  fitRange: [number, number];
  onFitRange: (r: [number, number]) => void;
  channel: string;
  /** Each epoch's spectrum as a thin line (the spread band is always drawn). */
  showEpochs: boolean;
}

/** Height of the lane above the plot where the fit-range handles sit, clear of tick labels and titles. */
const LANE = 30;

export default function SpectrumPlot({ spectra, recipeSpectrum, source, fit, axes, fitRange, onFitRange, channel, showEpochs }: SpectrumPlotProps) {
  const { frequencies, perTrial, trials } = spectra;
  const f = fit?.fit ?? null;
  const model = useMemo(
    () => spectrumPlotModel({ frequencies, perTrial, trials, recipe: recipeSpectrum, fit: f, fitRange, axes, showEpochs }),
    [frequencies, perTrial, trials, recipeSpectrum, f, fitRange, axes, showEpochs],
  );
  const bins = frequencies.length;
  const fLo = model.xDomain[0];
  const fHi = model.xDomain[1];
  const drag = useRef<{ kind: 'low' | 'high' | 'body'; x0: number; r0: [number, number]; x: ReturnType<typeof spectrumX> } | null>(null);
  const binHz = bins > 1 ? frequencies[1] - frequencies[0] : 1;
  const clampRange = (r: [number, number]): [number, number] => {
    const lo = Math.max(fLo, Math.min(r[0], r[1] - 3 * binHz));
    const hi = Math.min(fHi, Math.max(r[1], lo + 3 * binHz));
    return [Number(lo.toFixed(4)), Number(hi.toFixed(4))];
  };
  const snapHz = (v: number) => Math.round(v / binHz) * binHz;
  const what = source === 'epochs' ? 'kept epochs' : 'whole recording';
  const pct = SPREAD_QUANTILES.map((q) => `${Math.round(q * 100)}th`).join('–');
  const title = `${channel}: ${what} (ink), ${pct} percentile of ${trials} epochs (band)${showEpochs ? ', each epoch (thin)' : ''}, aperiodic fit (coral, dashed)`;

  const draw = (ctx: CanvasRenderingContext2D, layout: LineLayout) => drawSpectrum(ctx, layout, model, title);
  const drawAbove = (ctx: CanvasRenderingContext2D, layout: LineLayout) => drawAboveLine(ctx, layout, model);

  const overlay = (layout: LineLayout) => {
    const x = spectrumX(model, layout);
    const x0 = x(fitRange[0]);
    const x1 = x(fitRange[1]);
    const down = (kind: 'low' | 'high' | 'body') => (e: PointerEvent<HTMLDivElement>) => {
      e.preventDefault();
      e.stopPropagation();
      (e.currentTarget as HTMLElement).setPointerCapture(e.pointerId);
      drag.current = { kind, x0: e.clientX, r0: fitRange, x };
    };
    const move = (e: PointerEvent<HTMLDivElement>) => {
      const g = drag.current;
      if (g === null) return;
      const dx = e.clientX - g.x0;
      const at = (hz: number) => snapHz(g.x.invert(g.x(hz) + dx));
      if (g.kind === 'low') onFitRange(clampRange([at(g.r0[0]), g.r0[1]]));
      else if (g.kind === 'high') onFitRange(clampRange([g.r0[0], at(g.r0[1])]));
      else onFitRange(clampRange([at(g.r0[0]), at(g.r0[1])]));
    };
    const up = () => {
      drag.current = null;
    };
    const key = (kind: 'low' | 'high') => (e: KeyboardEvent<HTMLDivElement>) => {
      const steps: Record<string, number> = { ArrowLeft: -binHz, ArrowDown: -binHz, ArrowRight: binHz, ArrowUp: binHz, PageDown: -5, PageUp: 5 };
      let step = steps[e.key];
      if (step === undefined && e.key !== 'Home' && e.key !== 'End') return;
      e.preventDefault();
      if (e.shiftKey && step !== undefined) step = Math.sign(step) * 5;
      const current = kind === 'low' ? fitRange[0] : fitRange[1];
      const next = e.key === 'Home' ? fLo : e.key === 'End' ? fHi : current + step!;
      onFitRange(clampRange(kind === 'low' ? [next, fitRange[1]] : [fitRange[0], next]));
    };
    // The lane: from the bottom of the title to 8 px above the plot frame (the top y tick label reaches 6 px above it).
    const laneTop = layout.top - LANE;
    return (
      <div className="absolute cursor-grab" style={{ left: x0, width: Math.max(4, x1 - x0), top: laneTop, height: LANE - 8, touchAction: 'none' }} onPointerDown={down('body')} onPointerMove={move} onPointerUp={up} data-testid="fit-range">
        <div className="absolute inset-x-0 top-2 h-1 bg-kelp/60" />
        {(['low', 'high'] as const).map((kind) => {
          const value = kind === 'low' ? fitRange[0] : fitRange[1];
          return (
            <div
              key={kind}
              role="slider"
              tabIndex={0}
              aria-label={`Fit range ${kind === 'low' ? 'start' : 'end'}`}
              aria-valuemin={kind === 'low' ? fLo : fitRange[0]}
              aria-valuemax={kind === 'low' ? fitRange[1] : fHi}
              aria-valuenow={value}
              aria-valuetext={`${value} Hz`}
              aria-orientation="horizontal"
              data-testid={`fit-range-${kind}`}
              className="absolute top-0 h-5 w-3 cursor-ew-resize rounded-sm border border-kelp-deep bg-kelp focus:outline-2 focus:outline-offset-1 focus:outline-ink"
              style={kind === 'low' ? { left: -6 } : { right: -6 }}
              onPointerDown={down(kind)}
              onPointerMove={move}
              onPointerUp={up}
              onKeyDown={key(kind)}
            />
          );
        })}
      </div>
    );
  };

  return (
    <div className="flex flex-col gap-2">
      <CanvasPlot height={370} lane={LANE} label={`Spectra of ${channel}: the numbers are in the table "Numbers of this plot" below`} testId="spectrum-plot" draw={draw} overlay={overlay} exportName={`spectrum-${channel}-${axes}`} />
      <CanvasPlot height={180} label={`Power above the aperiodic line, ${channel}: the numbers are in the table below`} testId="above-line-plot" draw={drawAbove} exportName={`above-aperiodic-${channel}`} />
      <SpectrumNumbers model={model} channel={channel} />
    </div>
  );
}

const num = (v: number, digits = 4) => (Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : '—');

/** The plot's numbers per frequency bin: the text alternative of the two canvases, open to anyone. */
function SpectrumNumbers({ model, channel }: { model: SpectrumPlotModel; channel: string }) {
  const id = useId();
  const fitAt = new Map<number, number>();
  if (model.fitLine !== null) model.fitLine.xs.forEach((x, i) => fitAt.set(x, model.fitLine!.ys[i]));
  const meanAt = new Map<number, [number, number]>();
  model.mean.xs.forEach((x, i) => meanAt.set(x, [model.mean.ys[i], model.aboveLine[i]]));
  return (
    <details className="text-xs" data-testid="spectrum-numbers">
      <summary className="cursor-pointer text-kelp-deep">Numbers of this plot ({channel}, per frequency bin)</summary>
      <div className="max-h-64 overflow-auto" tabIndex={0} role="region" aria-labelledby={id}>
        <table className="w-full font-mono">
          <caption id={id} className="text-left text-ink-soft">
            Spectra of {channel} in µV²/Hz; fit range {formatTick(model.fitRange[0])}–{formatTick(model.fitRange[1])} Hz
          </caption>
          <thead>
            <tr>
              <th scope="col" className="text-right">Hz</th>
              <th scope="col" className="text-right">spectrum</th>
              <th scope="col" className="text-right">10th pct</th>
              <th scope="col" className="text-right">90th pct</th>
              <th scope="col" className="text-right">aperiodic fit</th>
              <th scope="col" className="text-right">log10 P − fit</th>
            </tr>
          </thead>
          <tbody>
            {Array.from(model.spread.xs, (x, i) => {
              const m = meanAt.get(x);
              return (
                <tr key={x} data-testid="spectrum-number-row" data-hz={x} data-low={model.spread.low[i]} data-high={model.spread.high[i]}>
                  <td className="text-right">{num(x)}</td>
                  <td className="text-right">{m === undefined ? '—' : num(m[0])}</td>
                  <td className="text-right">{num(model.spread.low[i])}</td>
                  <td className="text-right">{num(model.spread.high[i])}</td>
                  <td className="text-right">{fitAt.has(x) ? num(fitAt.get(x)!) : '—'}</td>
                  <td className="text-right">{m === undefined ? '—' : num(m[1], 3)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </details>
  );
}
