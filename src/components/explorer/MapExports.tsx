import { useState } from 'react';
import type { PanelSpec } from '../../lib/plot/panel';
import { mapsFigureSvg } from '../../lib/plot/svg/map-svg';
import { mapCsv } from '../../lib/formats/map-csv';
import { figureFonts } from './figure-fonts';
import { downloadCsv, downloadSvg } from './download-figure';
import { downloadBlob, fileSafe } from './download';
import { renderMapsPng } from './export-maps';
import { useMapView } from '../../lib/client/workspace/map-view';

/** A map the CSV export can write: its key (file name part), the label in the menu, and the spec it is drawn from. */
export interface ExportableMap {
  key: string;
  label: string;
  spec: PanelSpec;
  /** Comment lines for the CSV (baseline, method …). */
  notes?: string[];
}

/** What the exports write, made when a button is pressed (the live baseline and values at that moment). */
export interface MapFigure {
  /** The two panels of the figure, with the baseline band drawn in. */
  raw: PanelSpec;
  normalized: PanelSpec;
  caption: string;
  /** File name without extension, e.g. `maps-Cz-bell-decibel`. */
  stem: string;
  /** Every map whose full matrix can be written as CSV (raw, normalized, phase consistency when present). */
  maps: ExportableMap[];
}

export interface MapExportsProps {
  figure: () => MapFigure | null;
  /** The menu of the CSV export: key and label of each map `figure().maps` holds. */
  csvChoices: { key: string; label: string }[];
  /** The recipe JSON of what the maps show. */
  recipe: () => Blob;
  /** The one channel shown (per-trial values need one), or null for a group. */
  channel: string | null;
  /** The per-trial values CSV and its file name; throws with the reason. */
  trialValues: () => Promise<{ csv: string; fileName: string }>;
}

const BUTTON = 'rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50';

/** The Maps screen's exports: PNG and SVG of both maps, CSV of one map's matrix, the recipe, per-trial values. */
export default function MapExports({ figure, csvChoices, recipe, channel, trialValues }: MapExportsProps) {
  const [which, setWhich] = useState<string>('normalized');
  const [problem, setProblem] = useState<string | null>(null);
  const [trialBusy, setTrialBusy] = useState(false);
  const chosen = csvChoices.find((m) => m.key === which) ?? csvChoices[0] ?? null;
  // While the normalized map is missing or being remade for a new baseline, a figure would pair the live baseline
  // with the previous values: the figure exports wait for it.
  const ready = useMapView((v) => v.normalized !== null && v.fresh);
  const waiting = ready ? undefined : 'The normalized map is being made for the current baseline; export it once it is shown.';

  const attempt = async (what: string, work: (f: MapFigure) => Promise<void> | void) => {
    const f = figure();
    if (f === null) return;
    try {
      setProblem(null);
      await work(f);
    } catch (error) {
      setProblem(`${what} could not be made: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
  const exportPng = () => attempt('The PNG', async (f) => downloadBlob(await renderMapsPng(f.raw, f.normalized, f.caption), `${f.stem}.png`));
  const exportSvg = () => attempt('The SVG', async (f) => downloadSvg(await mapsFigureSvg(f.raw, f.normalized, f.caption, { fonts: await figureFonts() }), `${f.stem}.svg`));
  const exportCsv = () =>
    attempt(`The CSV of the ${chosen?.label ?? ''} map`, (f) => {
      const m = f.maps.find((x) => x.key === chosen?.key);
      if (m === undefined) return;
      const s = m.spec;
      downloadCsv(mapCsv({ quantity: s.title, unit: s.unit, times: s.times, frequencies: s.frequencies, values: s.values, notes: m.notes }), `${f.stem}-${fileSafe(m.key)}.csv`);
    });
  const exportTrialValues = async () => {
    setTrialBusy(true);
    setProblem(null);
    try {
      const { csv, fileName } = await trialValues();
      downloadCsv(csv, fileName);
    } catch (error) {
      setProblem(`Per-trial values of ${channel} could not be made: ${error instanceof Error ? error.message : String(error)}`);
    } finally {
      setTrialBusy(false);
    }
  };

  return (
    <div className="flex flex-wrap items-end gap-2">
      <button type="button" className={BUTTON} disabled={!ready} title={waiting} onClick={() => void exportPng()} data-testid="export-png">
        Export PNG
      </button>
      <button type="button" className={BUTTON} disabled={!ready} onClick={() => void exportSvg()} data-testid="export-svg" title={waiting ?? 'Both maps as a vector figure: axes and labels as text, fonts embedded, the maps as embedded images'}>
        Export SVG
      </button>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        CSV of the map
        <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={chosen?.key ?? ''} onChange={(e) => setWhich(e.target.value)} data-testid="csv-map">
          {csvChoices.map((m) => (
            <option key={m.key} value={m.key}>
              {m.label}
            </option>
          ))}
        </select>
      </label>
      <button type="button" className={BUTTON} disabled={chosen === null || !ready} onClick={() => void exportCsv()} data-testid="export-csv" title={waiting ?? 'The full time × frequency matrix of the chosen map, every value at full precision'}>
        Export CSV
      </button>
      <button type="button" className={BUTTON} onClick={() => downloadBlob(recipe(), 'recipe.json')} data-testid="export-recipe">
        Export recipe JSON
      </button>
      <button
        type="button"
        className={BUTTON}
        onClick={() => void exportTrialValues()}
        disabled={channel === null || trialBusy}
        title={channel === null ? 'Per-trial values come from one channel’s single trials: pick a channel' : 'Each trial normalized by its own baseline, averaged over each band (Bands screen) × window, one row per trial'}
        data-testid="export-trial-values"
      >
        {trialBusy ? 'Making per-trial values…' : 'Export per-trial values (CSV)'}
      </button>
      {problem !== null && (
        <p role="alert" className="basis-full text-sm text-coral-deep" data-testid={problem.startsWith('Per-trial') ? 'trial-values-problem' : 'map-export-problem'}>
          {problem}
        </p>
      )}
    </div>
  );
}
