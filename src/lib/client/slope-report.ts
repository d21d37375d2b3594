// Slope check reports on the client: the report made from a bench run (settings and figures only), saving it with
// the study, and its CSV. Light on purpose: the study page's list loads it without the workers or the core.
import Papa from 'papaparse';
import type { SlopeSweepCell, SlopeSweepInput } from '../analysis/slope-check/sweep';
import type { SlopeReportInputT, SlopeReportListItem } from '../schemas/slope-reports';
import type { SensitivityResult } from './slope-check';
import { errorMessageOf, send } from './outbound';

const orNull = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** The report the server keeps: settings and figures only (no per-repetition estimate, no spectrum, no sample). */
export function slopeReportOf(title: string, input: SlopeSweepInput, cells: SlopeSweepCell[], sensitivity: SensitivityResult | null): SlopeReportInputT {
  const t = input.truth;
  return {
    title,
    truth: {
      offset: t.offset,
      exponents: input.exponents,
      knee: t.knee && t.knee > 0 ? t.knee : null,
      peaks: t.peaks ?? [],
      durationSeconds: t.durationSeconds,
      sampleRateHz: t.sampleRateHz,
      noiseMicrovolts: t.noiseMicrovolts ?? 0,
      repetitions: input.repetitions,
      seed: t.seed,
    },
    settings: input.settings.map((s) => ({ name: s.name, rangeHz: s.range, model: s.model, robust: s.robust, segmentSeconds: s.segmentSeconds, overlap: s.overlap })),
    coverageLevel: input.coverage?.level ?? null,
    results: cells.map((c) => ({
      setting: c.setting,
      trueExponent: c.trueExponent,
      meanEstimate: orNull(c.meanEstimate),
      bias: orNull(c.bias),
      spread: orNull(c.spread),
      rmse: orNull(c.rmse),
      failed: c.failed,
      coverage: c.coverage === null || !Number.isFinite(c.coverage) ? null : c.coverage,
    })),
    sensitivity:
      sensitivity === null
        ? null
        : {
            channel: sensitivity.request.channel,
            // Only a SHA-256 names a recording to the server (a demo made in the page has a label instead).
            fingerprint: sensitivity.request.fingerprint !== null && /^[0-9a-f]{64}$/.test(sensitivity.request.fingerprint) ? sensitivity.request.fingerprint : null,
            rangeHz: sensitivity.request.rangeHz,
            model: sensitivity.request.model,
            startsHz: sensitivity.request.startsHz,
            endsHz: sensitivity.request.endsHz,
            grid: Array.from(sensitivity.grid, orNull),
            interval: sensitivity.interval,
            comparison: { preferred: sensitivity.comparison.preferred, deltaBic: sensitivity.comparison.deltaBic, reason: sensitivity.comparison.reason.slice(0, 400) },
          },
  };
}

/** Saves a report with the study (analysts and leads); the server answers with the stored row. */
export async function saveSlopeReport(studyId: string, report: SlopeReportInputT): Promise<SlopeReportListItem> {
  const response = await send(`/api/studies/${studyId}/slope-reports`, { method: 'POST', json: report });
  if (!response.ok) throw new Error(await errorMessageOf(response));
  return ((await response.json()) as { report: SlopeReportListItem }).report;
}

/** One row per setting × true exponent (RFC 4180 CSV, papaparse), with the settings and the truth repeated on each row. */
export function slopeReportCsv(report: SlopeReportInputT): string {
  const fields = ['title', 'setting', 'true_exponent', 'mean_estimate', 'bias', 'spread', 'rmse', 'failed', 'coverage', 'coverage_level', 'fit_low_hz', 'fit_high_hz', 'model', 'robust', 'segment_s', 'overlap', 'offset', 'knee', 'peaks', 'duration_s', 'sample_rate_hz', 'noise_uv', 'repetitions', 'seed'];
  const t = report.truth;
  const rows = report.results.map((r) => {
    const s = report.settings.find((x) => x.name === r.setting)!;
    return [report.title, r.setting, r.trueExponent, r.meanEstimate, r.bias, r.spread, r.rmse, r.failed, r.coverage, report.coverageLevel, s.rangeHz[0], s.rangeHz[1], s.model, s.robust, s.segmentSeconds, s.overlap, t.offset, t.knee, t.peaks.map((p) => `${p.centreHz}/${p.widthHz}/${p.heightLog10}`).join(' '), t.durationSeconds, t.sampleRateHz, t.noiseMicrovolts, t.repetitions, t.seed];
  });
  return Papa.unparse({ fields, data: rows }) + '\r\n';
}
