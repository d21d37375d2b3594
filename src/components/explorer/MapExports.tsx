import { useState } from 'react';
import type { PanelSpec } from '../../lib/plot/panel';
import { mapsFigureSvg } from '../../lib/plot/svg/map-svg';
import { mapCsv } from '../../lib/formats/map-csv';
import { figureFonts } from './figure-fonts';
import { downloadCsv, downloadSvg } from './download-figure';
import { fileSafe } from './download';

/** A map the CSV export can write: its key (file name part), the label in the menu, and the spec it is drawn from. */
export interface ExportableMap {
  key: string;
  label: string;
  spec: PanelSpec;
  /** Comment lines for the CSV (baseline, method …). */
  notes?: string[];
}

export interface MapExportsProps {
  /** The two panels of the figure, with the baseline band drawn in. */
  raw: PanelSpec | null;
  normalized: PanelSpec | null;
  caption: string;
  /** File name without extension, e.g. `maps-Cz-bell-decibel`. */
  stem: string;
  /** Every map whose full matrix can be written as CSV (raw, normalized, phase consistency when present). */
  maps: ExportableMap[];
}

const BUTTON = 'rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50';

/** "Export SVG" (the PNG export's figure as vector) and "Export CSV" of one map's full time × frequency matrix. */
export default function MapExports({ raw, normalized, caption, stem, maps }: MapExportsProps) {
  const [which, setWhich] = useState<string>('normalized');
  const [problem, setProblem] = useState<string | null>(null);
  const chosen = maps.find((m) => m.key === which) ?? maps[0] ?? null;

  const exportSvg = async () => {
    if (raw === null || normalized === null) return;
    try {
      setProblem(null);
      downloadSvg(await mapsFigureSvg(raw, normalized, caption, { fonts: await figureFonts() }), `${stem}.svg`);
    } catch (error) {
      setProblem(`The SVG could not be made: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
  const exportCsv = () => {
    if (chosen === null) return;
    const s = chosen.spec;
    try {
      setProblem(null);
      downloadCsv(mapCsv({ quantity: s.title, unit: s.unit, times: s.times, frequencies: s.frequencies, values: s.values, notes: chosen.notes }), `${stem}-${fileSafe(chosen.key)}.csv`);
    } catch (error) {
      setProblem(`The CSV of the ${chosen.label} map could not be made: ${error instanceof Error ? error.message : String(error)}`);
    }
  };

  return (
    <div className="flex flex-wrap items-end gap-2">
      <button type="button" className={BUTTON} disabled={raw === null || normalized === null} onClick={() => void exportSvg()} data-testid="export-svg" title="Both maps as a vector figure: axes and labels as text, fonts embedded, the maps as embedded images">
        Export SVG
      </button>
      <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
        CSV of the map
        <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={chosen?.key ?? ''} onChange={(e) => setWhich(e.target.value)} data-testid="csv-map">
          {maps.map((m) => (
            <option key={m.key} value={m.key}>
              {m.label}
            </option>
          ))}
        </select>
      </label>
      <button type="button" className={BUTTON} disabled={chosen === null} onClick={exportCsv} data-testid="export-csv" title="The full time × frequency matrix of the chosen map, every value at full precision">
        Export CSV
      </button>
      {problem !== null && (
        <p role="alert" className="text-sm text-coral-deep">
          {problem}
        </p>
      )}
    </div>
  );
}
