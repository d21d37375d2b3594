import { aperiodicLine, type AperiodicFit } from '../analysis/aperiodic';
import type { AxisScale } from './axes';
import { CORAL, FOAM, INK, type Ctx } from './figure';
import { axisScale, drawBand, drawLineAxes, drawSeries, type LabelRect, type LineLayout, type Series } from './line-plot';
import { epochSpread } from './spread';

export type SpectrumAxesKind = 'linear' | 'log-power' | 'log-log';

export interface SpectrumPlotInput {
  /** Bins of the per-epoch spectra, Hz. */
  frequencies: Float64Array;
  /** `trials` spectra of `frequencies.length` bins each, µV²/Hz. */
  perTrial: Float64Array;
  trials: number;
  /** The spectrum the fit uses (recipe `spectrum.source`), drawn as the thick line. */
  recipe: { frequencies: ArrayLike<number>; psd: ArrayLike<number> };
  fit: Pick<AperiodicFit, 'offset' | 'exponent' | 'knee'> | null;
  fitRange: readonly [number, number];
  axes: SpectrumAxesKind;
  /** Draw each epoch's spectrum as a thin line (otherwise only the spread band). */
  showEpochs: boolean;
}

/** Everything the spectrum plot draws, in data units: pure, so the screen and an SVG export draw the same figure. */
export interface SpectrumPlotModel {
  xLog: boolean;
  yLog: boolean;
  xDomain: [number, number];
  yDomain: [number, number];
  /** 10th and 90th percentile across epochs per bin. */
  spread: { xs: Float64Array; low: Float64Array; high: Float64Array };
  /** The recipe spectrum over the per-epoch spectra's range. */
  mean: { xs: Float64Array; ys: Float64Array };
  /** The aperiodic fit over the fit range's bins, 10^line (µV²/Hz); null without a fit. */
  fitLine: { xs: Float64Array; ys: Float64Array } | null;
  /** log10 power − fit over `mean.xs` (NaN without a fit). */
  aboveLine: Float64Array;
  epochs: { xs: Float64Array; ys: Float64Array }[];
  fitRange: readonly [number, number];
}

export const SPREAD_QUANTILES = [0.1, 0.9] as const;

export function spectrumPlotModel(input: SpectrumPlotInput): SpectrumPlotModel {
  const { frequencies, perTrial, trials, recipe, fit, fitRange, axes, showEpochs } = input;
  const bins = frequencies.length;
  const lo = frequencies[0];
  const hi = frequencies[bins - 1];
  const idx: number[] = [];
  for (let i = 0; i < recipe.frequencies.length; i++) {
    const f = recipe.frequencies[i];
    if (f >= lo - 1e-9 && f <= hi + 1e-9) idx.push(i);
  }
  const mean = { xs: Float64Array.from(idx, (i) => recipe.frequencies[i]), ys: Float64Array.from(idx, (i) => recipe.psd[i]) };
  const spread = { xs: frequencies, ...epochSpread(perTrial, trials, bins, SPREAD_QUANTILES[0], SPREAD_QUANTILES[1]) };
  const epochs = showEpochs ? Array.from({ length: trials }, (_, k) => ({ xs: frequencies, ys: perTrial.subarray(k * bins, (k + 1) * bins) })) : [];
  const xLog = axes === 'log-log';
  const yLog = axes !== 'linear';
  const fLo = xLog ? (frequencies.find((f) => f > 0) ?? 1) : lo;
  let pMin = Infinity;
  let pMax = 0;
  const scan = (values: ArrayLike<number>) => {
    for (let i = 0; i < values.length; i++) {
      const v = values[i];
      if (v > 0 && v < pMin) pMin = v;
      if (v > pMax) pMax = v;
    }
  };
  scan(mean.ys);
  scan(spread.low);
  scan(spread.high);
  if (showEpochs) scan(perTrial);
  if (!(pMax > 0)) (pMin = 1), (pMax = 10);
  if (!(pMin < pMax)) pMin = pMax / 10;
  let fitLine: SpectrumPlotModel['fitLine'] = null;
  if (fit !== null) {
    const xs = frequencies.filter((x) => x >= fitRange[0] - 1e-9 && x <= fitRange[1] + 1e-9 && x > 0);
    fitLine = { xs, ys: xs.map((v) => Math.pow(10, aperiodicLine(fit, v))) };
  }
  const aboveLine = Float64Array.from(mean.xs, (x, i) => (fit === null || x <= 0 ? NaN : Math.log10(mean.ys[i]) - aperiodicLine(fit, x)));
  return { xLog, yLog, xDomain: [fLo, hi], yDomain: [yLog ? pMin : 0, pMax], spread, mean, fitLine, aboveLine, epochs, fitRange };
}

/** The frequency axis of the model on a layout. */
export function spectrumX(model: SpectrumPlotModel, layout: LineLayout): AxisScale {
  return axisScale(model.xLog ? 'log' : 'linear', model.xDomain[0], model.xDomain[1], layout.left, layout.left + layout.plotWidth);
}

export const SPREAD_COLOUR = '#3b5366';
export const FIT_RANGE_COLOUR = '#dcebe5';

/**
 * Paints the spectra: the fit range shaded, the spread band, epoch lines on demand, the recipe spectrum in ink and
 * the aperiodic fit above it in coral, dashed on a foam halo so it stays visible where the two lines meet.
 */
export function drawSpectrum(ctx: Ctx & { clip(): void }, layout: LineLayout, model: SpectrumPlotModel, title: string): LabelRect[] {
  const x = spectrumX(model, layout);
  const y = axisScale(model.yLog ? 'log' : 'linear', model.yDomain[0], model.yDomain[1], layout.top + layout.plotHeight, layout.top);
  ctx.save();
  ctx.globalAlpha = 0.5;
  ctx.fillStyle = FIT_RANGE_COLOUR;
  ctx.fillRect(x(model.fitRange[0]), layout.top, x(model.fitRange[1]) - x(model.fitRange[0]), layout.plotHeight);
  ctx.restore();
  drawBand(ctx, layout, x, y, { ...model.spread, colour: SPREAD_COLOUR, alpha: 0.25 });
  const series: Series[] = model.epochs.map((e) => ({ ...e, colour: SPREAD_COLOUR, width: 0.75, alpha: 0.3 }));
  series.push({ ...model.mean, colour: INK, width: 2.5 });
  if (model.fitLine !== null) {
    series.push({ ...model.fitLine, colour: FOAM, width: 5.5 });
    series.push({ ...model.fitLine, colour: CORAL, width: 2.5, dash: [7, 4] });
  }
  drawSeries(ctx, layout, x, y, series);
  return drawLineAxes(ctx, layout, x, y, { xLog: model.xLog, yLog: model.yLog, xTitle: 'frequency (Hz)', yTitle: 'power (µV²/Hz)', title });
}

/** Paints log10 power minus the aperiodic fit, with its zero line. */
export function drawAboveLine(ctx: Ctx & { clip(): void }, layout: LineLayout, model: SpectrumPlotModel): LabelRect[] {
  const x = spectrumX(model, layout);
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of model.aboveLine) if (Number.isFinite(v)) (lo = Math.min(lo, v)), (hi = Math.max(hi, v));
  if (!(hi > lo)) (lo = -1), (hi = 1);
  const y = axisScale('linear', Math.min(lo, -0.1), Math.max(hi, 0.1), layout.top + layout.plotHeight, layout.top);
  drawSeries(ctx, layout, x, y, [
    { xs: model.xDomain, ys: [0, 0], colour: '#c9b896', width: 1, dash: [3, 3] },
    { xs: model.mean.xs, ys: model.aboveLine, colour: INK, width: 2 },
  ]);
  return drawLineAxes(ctx, layout, x, y, { xLog: model.xLog, yLog: false, xTitle: 'frequency (Hz)', yTitle: 'log10 P − fit', title: 'Above the aperiodic line: log10 power minus the fit' });
}
