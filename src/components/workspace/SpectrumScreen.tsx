import { useEffect, useState } from 'react';
import Papa from 'papaparse';
import type { WorkspaceProps } from './types';
import type { AperiodicOutcome } from '../../lib/analysis/aperiodic';
import { spectrumWork } from '../../lib/client/workspace/spectra';
import { selectActive, useResultsStore, type Decomposition } from '../../lib/client/workspace/results';
import { type SpectrumAxes } from '../../lib/client/workspace/view';
import SpectrumPlot, { FitReadout } from '../explorer/SpectrumPlot';
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

export default function SpectrumScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const channel = useWorkspace((s) => s.channel);
  const axes = useWorkspace((s) => s.spectrumAxes);
  const fitRange = useWorkspace((s) => s.fitRange);
  const setView = useWorkspace((s) => s.set);
  const visible = usePanelVisible('Spectrum');
  // A display choice, not part of the recipe or the undo history: the spread band says what the lines would.
  const [showEpochs, setShowEpochs] = useState(false);
  // The run's own spectra (its workers made them with the decomposition); only the refit below is new work.
  const spectra = d === null ? null : spectrumWork.epochSpectra(d);
  const recipeSpectra = d === null ? null : spectrumWork.recipeSpectra(d);
  const model = d?.recipe.aperiodic.model ?? 'power-law';
  // Fitted as analyzeChannel fits (the recipe's spectrum over all its bins, the live fit range, the recipe's
  // model), in the explorer worker: a drag of the fit range never refits on this thread.
  const fits = useWork(d, visible && recipeSpectra !== null, (d) => spectrumWork.fits(d, recipeSpectra!, fitRange, model), [recipeSpectra, fitRange[0], fitRange[1], model]);

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
        <label className="flex items-center gap-1.5 self-center text-sm">
          <input type="checkbox" checked={showEpochs} onChange={(e) => setShowEpochs(e.target.checked)} data-testid="show-epochs" />
          Show each epoch
        </label>
        <NumberField label="Fit from" unit="Hz" value={fitRange[0]} step={0.5} testId="fit-low" onValue={(v) => setView({ fitRange: [v, fitRange[1]] })} />
        <NumberField label="Fit to" unit="Hz" value={fitRange[1]} step={0.5} testId="fit-high" onValue={(v) => setView({ fitRange: [fitRange[0], v] })} />
        <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50" disabled={fits === null} onClick={exportFits} data-testid="export-fits">
          Export fit table CSV
        </button>
      </div>
      {sp === null || rsp === null ? (
        <p className="text-ink-soft" role="status">
          {spectra === null ? 'This run kept no per-epoch spectra: run the recipe again to see them.' : 'Loading the spectra…'}
        </p>
      ) : (
        <>
          <div className="grid grid-cols-1 gap-4 xl:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
            <div className="card p-2">
              <SpectrumPlot spectra={sp} recipeSpectrum={rsp} source={source} fit={fit} axes={axes} fitRange={fitRange} onFitRange={(r) => setView({ fitRange: r })} channel={ch} showEpochs={showEpochs} />
              <FitReadout fit={fit} model={model} />
            </div>
            <div className="card p-2">
              <ScalpMap title="Aperiodic exponent" unit="χ" values={rows.map((r) => ({ channel: r.channel, value: r.exponent }))} testId="scalp-exponent" />
            </div>
          </div>
          <div className="card p-2">
            <FitTable rows={rows} selected={ch} onSelect={(c) => setView({ channel: c })} />
            <p className="px-2 pt-1 text-xs text-ink-soft">
              r² and RMSE over all bins of the fit range; "kept bins" leaves out the bins the robust fit set aside as peaks. Peaks: runs of
              bins well above the line, centre by parabolic interpolation, height in log10 power above the line, width at half that height.
            </p>
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
