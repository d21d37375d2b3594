import { useEffect, useMemo, useRef, useState, type PointerEvent, type KeyboardEvent } from 'react';
import Papa from 'papaparse';
import type { WorkspaceProps } from './types';
import { aperiodicLine as fitLine, type AperiodicFit, type AperiodicOutcome } from '../../lib/analysis/aperiodic';
import type { EpochSpectra } from '../../lib/analysis/epoch-spectra';
import { spectrumWork, type RecipeSpectrum } from '../../lib/client/workspace/spectra';
import { axisScale, drawLineAxes, drawSeries, type LineLayout, type Series } from '../../lib/plot/line-plot';
import { CORAL, INK } from '../../lib/plot/figure';
import { selectActive, useResultsStore, type Decomposition } from '../../lib/client/workspace/results';
import { type SpectrumAxes } from '../../lib/client/workspace/view';
import CanvasPlot from '../explorer/CanvasPlot';
import Choice from '../explorer/Choice';
import FitTable, { describePeaks, type FitRow } from '../explorer/FitTable';
import ConditionFits from '../explorer/ConditionFits';
import NumberField from '../explorer/NumberField';
import ScalpMap from '../explorer/ScalpMap';
import { downloadBlob } from '../explorer/download';
import { usePanelVisible } from '../explorer/usePanelVisible';
import { useWorkspace } from '../../lib/client/workspace/store';

/** The value of `work` for `d` once the controller has it (computed in a worker, cached there); null meanwhile. */
function useWork<T>(d: Decomposition | null, ready: boolean, work: (d: Decomposition) => Promise<T> | null, deps: unknown[]): T | null {
  const [value, setValue] = useState<{ key: unknown[]; value: T } | null>(null);
  useEffect(() => {
    if (d === null || !ready) return;
    const p = work(d);
    if (p === null) return;
    let live = true;
    // A request overtaken by a newer one (a fit range dragged on) is dropped by the controller: nothing to show.
    p.then((v) => live && setValue({ key: [d, ...deps], value: v }), () => undefined);
    return () => {
      live = false;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [d, ready, ...deps]);
  // A value made for other inputs is not shown (the previous fit while a new one is computed is, for a smooth drag).
  return value !== null && value.key[0] === d ? value.value : null;
}

type Fit = AperiodicOutcome;

/** Welch spectra per trial and averaged, the aperiodic fit with its draggable range, the spectrum above the fit. */
export default function SpectrumScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const channel = useWorkspace((s) => s.channel);
  const axes = useWorkspace((s) => s.spectrumAxes);
  const fitRange = useWorkspace((s) => s.fitRange);
  const setView = useWorkspace((s) => s.set);
  const visible = usePanelVisible('Spectrum');
  const recording = useWorkspace((s) => s.recording);
  const spectra = useWork(d, visible && recording !== null, (d) => spectrumWork.epochSpectra(d, recording!), []);
  const recipeSpectra = useWork(d, visible && recording !== null, (d) => spectrumWork.recipeSpectra(d, recording!), []);
  const model = d?.recipe.aperiodic.model ?? 'power-law';
  // Fitted as analyzeChannel fits (the recipe's spectrum over all its bins, the live fit range, the recipe's
  // model), in the explorer worker: a drag of the fit range never refits on this thread.
  const fits = useWork(d, recipeSpectra !== null, (d) => spectrumWork.fits(d, recipeSpectra!, fitRange, model), [recipeSpectra, fitRange[0], fitRange[1], model]);

  if (d === null) {
    return (
      <div className="card p-4">
        <p>No decomposition yet: run a recipe on the Recipe screen; its epochs and channels are used here.</p>
      </div>
    );
  }
  const ci = Math.max(0, channel === null ? 0 : d.channels.indexOf(channel));
  const ch = d.channels[ci];
  const sp = spectra?.[ci] ?? null;
  const rsp = recipeSpectra?.[ci] ?? null;
  const source = d.recipe.spectrum.source ?? 'recording';
  const fit = fits?.[ci] ?? null;
  const rows: FitRow[] =
    fits === null
      ? []
      : d.channels.map((c, i) => {
          const f = fits[i].fit;
          return {
            channel: c,
            exponent: f?.exponent ?? null,
            offset: f?.offset ?? null,
            knee: f?.knee ?? null,
            kneeHz: f?.kneeHz ?? null,
            r2: f?.r2 ?? null,
            rmse: f?.rmse ?? null,
            r2Kept: f?.r2Kept ?? null,
            points: f?.points ?? null,
            excluded: f?.excluded ?? null,
            peaks: describePeaks(f?.peaks),
          };
        });

  const exportFits = () => {
    const csv = Papa.unparse({
      fields: ['channel', 'exponent', 'offset', 'knee', 'knee_hz', 'r2', 'rmse', 'r2_kept', 'points', 'excluded', 'peaks', 'fit_low_hz', 'fit_high_hz', 'model', 'trials'],
      data: rows.map((r) => [r.channel, r.exponent, r.offset, r.knee, r.kneeHz, r.r2, r.rmse, r.r2Kept, r.points, r.excluded, r.peaks, fitRange[0], fitRange[1], model, sp?.trials ?? '']),
    });
    downloadBlob(new Blob([csv + '\n'], { type: 'text/csv' }), 'aperiodic-fits.csv');
  };

  return (
    <div className="flex flex-col gap-4" data-testid="spectrum-screen">
      <div className="card flex flex-wrap items-end gap-4 p-3">
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Channel
          <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={ch} onChange={(e) => setView({ channel: e.target.value })} data-testid="spectrum-channel">
            {d.channels.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </label>
        <Choice<SpectrumAxes> legend="Axes" value={axes} options={[{ value: 'linear', label: 'linear' }, { value: 'log-power', label: 'log power' }, { value: 'log-log', label: 'log-log' }]} onChange={(a) => setView({ spectrumAxes: a })} />
        <NumberField label="Fit from" unit="Hz" value={fitRange[0]} step={0.5} testId="fit-low" onValue={(v) => setView({ fitRange: [v, fitRange[1]] })} />
        <NumberField label="Fit to" unit="Hz" value={fitRange[1]} step={0.5} testId="fit-high" onValue={(v) => setView({ fitRange: [fitRange[0], v] })} />
        <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50" disabled={fits === null} onClick={exportFits} data-testid="export-fits">
          Export fit table CSV
        </button>
      </div>
      {sp === null || rsp === null ? (
        <p className="text-ink-soft" role="status">
          Computing per-epoch spectra in a worker…
        </p>
      ) : (
        <>
          <div className="card p-2">
            <SpectrumPlot spectra={sp} recipeSpectrum={rsp} source={source} fit={fit} axes={axes} fitRange={fitRange} onFitRange={(r) => setView({ fitRange: r })} channel={ch} />
            <FitReadout fit={fit} model={model} />
          </div>
          <div className="grid grid-cols-1 gap-4 lg:grid-cols-[2fr_1fr]">
            <div className="card p-2">
              <FitTable rows={rows} selected={ch} onSelect={(c) => setView({ channel: c })} />
              <p className="px-2 pt-1 text-xs text-ink-soft">
                r² and RMSE over all bins of the fit range; "kept bins" leaves out the bins the robust fit set aside as peaks. Peaks: runs of
                bins well above the line, centre by parabolic interpolation, height in log10 power above the line, width at half that height.
              </p>
            </div>
            <div className="card p-2">
              <ScalpMap title="Aperiodic exponent" unit="χ" values={rows.map((r) => ({ channel: r.channel, value: r.exponent }))} testId="scalp-exponent" />
            </div>
          </div>
          {d !== null && (
            <div className="card p-2">
              <ConditionFits byCondition={d.aperiodicByCondition} labels={d.labels} selected={ch} onSelect={(c) => setView({ channel: c })} />
            </div>
          )}
        </>
      )}
    </div>
  );
}

function FitReadout({ fit, model }: { fit: Fit | null; model: string }) {
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

function SpectrumPlot({ spectra, recipeSpectrum, source, fit, axes, fitRange, onFitRange, channel }: SpectrumPlotProps) {
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
      <CanvasPlot height={340} label={`Spectra of ${channel}`} testId="spectrum-plot" draw={draw} overlay={overlay} />
      <CanvasPlot height={180} label={`Power above the aperiodic line, ${channel}`} testId="above-line-plot" draw={drawAboveLine} />
    </div>
  );
}
