import { useMemo, useRef, type PointerEvent, type KeyboardEvent } from 'react';
import { aperiodicLine as fitLine, type AperiodicFit, type AperiodicOutcome } from '../../lib/analysis/aperiodic';
import type { EpochSpectra } from '../../lib/analysis/epoch-spectra';
import type { RecipeSpectrum } from '../../lib/client/workspace/spectra';
import type { SpectrumAxes } from '../../lib/client/workspace/view';
import { axisScale, drawLineAxes, drawSeries, type LineLayout, type Series } from '../../lib/plot/line-plot';
import { CORAL, INK } from '../../lib/plot/figure';
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
}

export default function SpectrumPlot({ spectra, recipeSpectrum, source, fit, axes, fitRange, onFitRange, channel }: SpectrumPlotProps) {
  const { frequencies, perTrial, trials } = spectra;
  // The thick line is the recipe's spectrum, kept to the per-epoch spectra's range for the drawing.
  const [mf, mean] = useMemo(() => {
    const lo = frequencies[0];
    const hi = frequencies[frequencies.length - 1];
    const idx: number[] = [];
    recipeSpectrum.frequencies.forEach((f, i) => {
      if (f >= lo - 1e-9 && f <= hi + 1e-9) idx.push(i);
    });
    return [Float64Array.from(idx, (i) => recipeSpectrum.frequencies[i]), Float64Array.from(idx, (i) => recipeSpectrum.psd[i])];
  }, [frequencies, recipeSpectrum]);
  const bins = frequencies.length;
  const xLog = axes === 'log-log';
  const yLog = axes !== 'linear';
  const fLo = xLog ? Math.max(frequencies[0], frequencies.find((f) => f > 0) ?? 1) : frequencies[0];
  const fHi = frequencies[bins - 1];
  let pMin = Infinity;
  let pMax = 0;
  for (const values of [perTrial, mean]) {
    for (let i = 0; i < values.length; i++) {
      const v = values[i];
      if (v > 0 && v < pMin) pMin = v;
      if (v > pMax) pMax = v;
    }
  }
  const f = fit?.fit ?? null;
  const fitXs = frequencies.filter((x) => x >= fitRange[0] - 1e-9 && x <= fitRange[1] + 1e-9 && x > 0);
  const flat = Float64Array.from(mf, (x, i) => (f === null || x <= 0 ? NaN : Math.log10(mean[i]) - fitLine(f, x)));
  const drag = useRef<{ kind: 'low' | 'high' | 'body'; x0: number; r0: [number, number]; x: ReturnType<typeof axisScale> } | null>(null);
  const binHz = bins > 1 ? frequencies[1] - frequencies[0] : 1;
  const clampRange = (r: [number, number]): [number, number] => {
    const lo = Math.max(fLo, Math.min(r[0], r[1] - 3 * binHz));
    const hi = Math.min(fHi, Math.max(r[1], lo + 3 * binHz));
    return [Number(lo.toFixed(4)), Number(hi.toFixed(4))];
  };
  const snapHz = (v: number) => Math.round(v / binHz) * binHz;

  const draw = (ctx: CanvasRenderingContext2D, layout: LineLayout) => {
    const x = axisScale(xLog ? 'log' : 'linear', fLo, fHi, layout.left, layout.left + layout.plotWidth);
    const y = axisScale(yLog ? 'log' : 'linear', yLog ? pMin : 0, pMax, layout.top + layout.plotHeight, layout.top);
    const series: Series[] = [];
    for (let k = 0; k < trials; k++) series.push({ xs: frequencies, ys: perTrial.subarray(k * bins, (k + 1) * bins), colour: '#3b5366', width: 0.75, alpha: 0.22 });
    series.push({ xs: mf, ys: mean, colour: INK, width: 2.5 });
    if (f !== null) series.push({ xs: fitXs, ys: fitXs.map((v) => Math.pow(10, fitLine(f, v))), colour: CORAL, width: 2, dash: [6, 3] });
    ctx.save();
    ctx.globalAlpha = 0.5;
    ctx.fillStyle = '#dcebe5';
    ctx.fillRect(x(fitRange[0]), layout.top, x(fitRange[1]) - x(fitRange[0]), layout.plotHeight);
    ctx.restore();
    drawSeries(ctx, layout, x, y, series);
    drawLineAxes(ctx, layout, x, y, { xLog, yLog, xTitle: 'frequency (Hz)', yTitle: 'power (µV²/Hz)', title: `${channel}: ${trials} epochs (thin), ${source === 'epochs' ? 'kept epochs' : 'whole recording'} (thick), aperiodic fit (dashed)` });
  };
  const drawAboveLine = (ctx: CanvasRenderingContext2D, layout: LineLayout) => {
    const x = axisScale(xLog ? 'log' : 'linear', fLo, fHi, layout.left, layout.left + layout.plotWidth);
    let lo = Infinity;
    let hi = -Infinity;
    for (const v of flat) if (Number.isFinite(v)) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
    if (!(hi > lo)) (lo = -1), (hi = 1);
    const y = axisScale('linear', Math.min(lo, -0.1), Math.max(hi, 0.1), layout.top + layout.plotHeight, layout.top);
    drawSeries(ctx, layout, x, y, [
      { xs: [fLo, fHi], ys: [0, 0], colour: '#c9b896', width: 1, dash: [3, 3] },
      { xs: mf, ys: flat, colour: INK, width: 2 },
    ]);
    drawLineAxes(ctx, layout, x, y, { xLog, yLog: false, xTitle: 'frequency (Hz)', yTitle: 'log10 P − fit', title: 'Above the aperiodic line: log10 power minus the fit' });
  };

  const overlay = (layout: LineLayout) => {
    const x = axisScale(xLog ? 'log' : 'linear', fLo, fHi, layout.left, layout.left + layout.plotWidth);
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
      if (e.key !== 'ArrowLeft' && e.key !== 'ArrowRight') return;
      e.preventDefault();
      const step = (e.shiftKey ? 5 : binHz) * (e.key === 'ArrowLeft' ? -1 : 1);
      onFitRange(clampRange(kind === 'low' ? [fitRange[0] + step, fitRange[1]] : [fitRange[0], fitRange[1] + step]));
    };
    return (
      <div className="absolute cursor-grab" style={{ left: x0, width: Math.max(4, x1 - x0), top: layout.top + layout.plotHeight - 16, height: 30, touchAction: 'none' }} onPointerDown={down('body')} onPointerMove={move} onPointerUp={up} data-testid="fit-range">
        <div className="absolute inset-x-0 top-3 h-1 bg-kelp/60" />
        {(['low', 'high'] as const).map((kind) => (
          <div
            key={kind}
            role="slider"
            tabIndex={0}
            aria-label={`Fit range ${kind === 'low' ? 'start' : 'end'}`}
            aria-valuenow={kind === 'low' ? fitRange[0] : fitRange[1]}
            aria-valuetext={`${kind === 'low' ? fitRange[0] : fitRange[1]} Hz`}
            data-testid={`fit-range-${kind}`}
            className="absolute top-0 h-7 w-3 cursor-ew-resize rounded-sm border border-kelp-deep bg-kelp"
            style={kind === 'low' ? { left: -6 } : { right: -6 }}
            onPointerDown={down(kind)}
            onPointerMove={move}
            onPointerUp={up}
            onKeyDown={key(kind)}
          />
        ))}
      </div>
    );
  };

  return (
    <div className="flex flex-col gap-2">
      <CanvasPlot height={340} label={`Spectra of ${channel}`} testId="spectrum-plot" draw={draw} overlay={overlay} exportName={`spectrum-${channel}-${axes}`} />
      <CanvasPlot height={180} label={`Power above the aperiodic line, ${channel}`} testId="above-line-plot" draw={drawAboveLine} exportName={`above-aperiodic-${channel}`} />
    </div>
  );
}
