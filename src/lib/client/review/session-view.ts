import type { SummaryBand, SummaryWindow } from '../../analysis/summary';
import type { SummaryView } from './api';
import type { SessionView } from './types';

// What the session review page shows and exports, derived from the server's answers: the screen paints these.

const UNIT_WORDS: Record<string, string> = { decibel: 'dB', 'percent-change': '% change', 'z-score': 'z', 'power-ratio': '× baseline' };

/** A normalization method's unit in short words (`dB`, `% change`, `z`, `× baseline`). */
export const unitWordOf = (normalizedUnit: string): string => UNIT_WORDS[normalizedUnit] ?? normalizedUnit;

const meanOf = (xs: (number | null)[]): number | null => {
  const ok = xs.filter((x): x is number => x !== null);
  return ok.length ? ok.reduce((a, b) => a + b, 0) / ok.length : null;
};

/** One row of the summary overview: a band × window, and per condition the mean over channels of its normalized value. */
export interface OverviewRow {
  band: SummaryBand;
  window: SummaryWindow;
  /** In the order of the summary's conditions; null when no channel has a value. */
  means: (number | null)[];
}

/** The summary's band × window means over channels per condition, and the mean aperiodic exponent per condition. */
export function summaryOverview(view: SummaryView): { rows: OverviewRow[]; exponents: (number | null)[] } {
  const s = view.summary;
  const rows = s.bands.flatMap((band) =>
    s.windows.map((window) => ({
      band,
      window,
      means: s.conditions.map((c) => meanOf(s.bandValues.filter((v) => v.band === band.label && v.window === window.label && v.condition === c).map((v) => v.normalized))),
    })),
  );
  const exponents = s.conditions.map((c) => meanOf(s.aperiodic.filter((a) => a.condition === c).map((a) => a.exponent)));
  return { rows, exponents };
}

/** The session's JSON export: the session, its versions and summary, the signature manifest and the notes. */
export function sessionExport(input: {
  team: { id: string; name: string };
  study: { id: string; name: string };
  view: SessionView;
  ownerName: string;
  summary: SummaryView | null | undefined;
  notes: unknown[];
}): object {
  const { team, study, view, ownerName, summary, notes } = input;
  return {
    format: 'tidemark-session-export-1',
    exportedAt: new Date().toISOString(),
    caution: 'Research tool, not a medical device: not validated for diagnosis or treatment.',
    team: { id: team.id, name: team.name },
    study: { id: study.id, name: study.name },
    analysisSession: { ...view.analysisSession, ownerName },
    currentVersion: view.current,
    versions: view.versions,
    summary: summary ? { recipeVersion: summary.recipeVersion, summaryHash: summary.summaryHash, summary: summary.summary } : null,
    signatureManifest: view.signatures.map((g) => ({ printedName: g.printedName, signedAt: g.signedAt, meaning: g.meaning, reason: g.reason, recipeVersion: g.recipeVersion, contentSha256: g.contentHash })),
    notes,
  };
}
