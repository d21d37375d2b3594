/**
 * Slope check reports (issue 15): the bench's settings and figures and, when run, one channel's sensitivity results,
 * saved with a study. Only settings and derived figures: no per-repetition estimate, no spectrum, no sample. Every
 * object is strict (a `fileName` or `patient` key is refused by name), every array is capped, and the only text is a
 * short title and the model comparison's sentence.
 */
import { z } from '../analysis/zod';
import { Fingerprint, Label } from './review';

export const SLOPE_REPORT_CAPS = {
  titleChars: 80,
  exponents: 8,
  settings: 6,
  peaks: 4,
  repetitions: 500,
  rangeSteps: 24,
  reasonChars: 400,
  /** Bytes of one report (a full one is about 20 kB). */
  bodyBytes: 65_536,
  /** Reports listed per study, newest first. */
  listed: 200,
} as const;

const finite = z.number().refine(Number.isFinite, 'must be a finite number');
/** A figure that may be undefined (every fit of a setting failed); JSON has no NaN, so it is null. */
const figure = finite.nullable();
const capped = <T extends z.ZodType>(item: T, max: number, what: string) => z.array(item).max(max, `holds at most ${max} ${what}`);
const Hz = finite.gt(0, 'must be above 0 Hz');
const RangeHz = z.tuple([Hz, Hz]).refine((r) => r[1] > r[0], 'must end above where it starts');
const Model = z.enum(['power-law', 'power-law-knee'], { error: 'must be "power-law" or "power-law-knee"' });

export const SlopeReportTitle = z
  .string()
  .trim()
  .min(1, 'must not be empty')
  .max(SLOPE_REPORT_CAPS.titleChars, `must be at most ${SLOPE_REPORT_CAPS.titleChars} characters`)
  .regex(/^[\p{L}\p{N}][\p{L}\p{N} ._,+\-/:()%]*$/u, 'may hold only letters, digits, space and . _ , + - / : ( ) %')
  .refine((s) => !/\.(edf|bdf|csv|tsv|txt|fif|set|vhdr|mat|gdf|json)$/i.test(s), 'looks like a file name; give the report a short title');

const Peak = z.object({ centreHz: Hz, widthHz: Hz, heightLog10: finite }).strict();

const Truth = z
  .object({
    offset: finite,
    exponents: capped(finite.min(0, 'must be at least 0').max(6, 'must be at most 6'), SLOPE_REPORT_CAPS.exponents, 'true exponents').min(1, 'must list at least one true exponent'),
    knee: finite.min(0, 'must not be negative').nullable(),
    peaks: capped(Peak, SLOPE_REPORT_CAPS.peaks, 'peaks'),
    durationSeconds: finite.gt(0, 'must be above 0 s'),
    sampleRateHz: Hz,
    noiseMicrovolts: finite.min(0, 'must not be negative'),
    repetitions: z.number().int('must be a whole number').min(2, 'must be at least 2').max(SLOPE_REPORT_CAPS.repetitions, `must be at most ${SLOPE_REPORT_CAPS.repetitions}`),
    seed: z.number().int('must be a whole number'),
  })
  .strict();

const Setting = z
  .object({
    name: Label,
    rangeHz: RangeHz,
    model: Model,
    robust: z.boolean(),
    segmentSeconds: finite.gt(0, 'must be above 0 s'),
    overlap: finite.min(0, 'must be at least 0').lt(1, 'must be below 1'),
  })
  .strict();

const ResultRow = z
  .object({
    setting: Label,
    trueExponent: finite,
    meanEstimate: figure,
    bias: figure,
    spread: figure,
    rmse: figure,
    failed: z.number().int().min(0),
    coverage: finite.min(0).max(1).nullable(),
  })
  .strict();

const Sensitivity = z
  .object({
    channel: Label,
    /** SHA-256 of the recording it ran on (what the server may know of a recording); null when unknown. */
    fingerprint: Fingerprint.nullable(),
    rangeHz: RangeHz,
    model: Model,
    startsHz: capped(Hz, SLOPE_REPORT_CAPS.rangeSteps, 'range starts').min(1),
    endsHz: capped(Hz, SLOPE_REPORT_CAPS.rangeSteps, 'range ends').min(1),
    /** Exponent per start × end, `[i·ends + j]`; null where the range held no fit. */
    grid: capped(figure, SLOPE_REPORT_CAPS.rangeSteps * SLOPE_REPORT_CAPS.rangeSteps, 'grid cells'),
    interval: z.object({ estimate: finite, lower: finite, upper: finite, level: finite.gt(0).lt(1), segments: z.number().int().min(2) }).strict(),
    comparison: z
      .object({ preferred: Model, deltaBic: figure, reason: z.string().max(SLOPE_REPORT_CAPS.reasonChars, `must be at most ${SLOPE_REPORT_CAPS.reasonChars} characters`) })
      .strict(),
  })
  .strict()
  .refine((s) => s.grid.length === s.startsHz.length * s.endsHz.length, { message: 'must hold one cell per start × end', path: ['grid'] });

export const SlopeReportInput = z
  .object({
    title: SlopeReportTitle,
    truth: Truth,
    settings: capped(Setting, SLOPE_REPORT_CAPS.settings, 'fit settings').min(1, 'must hold at least one fit setting'),
    coverageLevel: finite.gt(0).lt(1).nullable(),
    results: capped(ResultRow, SLOPE_REPORT_CAPS.exponents * SLOPE_REPORT_CAPS.settings, 'result rows'),
    sensitivity: Sensitivity.nullable(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const names = new Set<string>();
    r.settings.forEach((s, i) => {
      if (names.has(s.name)) ctx.addIssue({ code: 'custom', path: ['settings', i, 'name'], message: `"${s.name}" is used twice; each setting needs its own name` });
      names.add(s.name);
    });
    r.results.forEach((row, i) => {
      if (!names.has(row.setting)) ctx.addIssue({ code: 'custom', path: ['results', i, 'setting'], message: `"${row.setting}" is not one of the settings` });
    });
  });
export type SlopeReportInputT = z.infer<typeof SlopeReportInput>;

/** A saved report as the API lists it and the study page shows it. */
export interface SlopeReportListItem {
  id: string;
  title: string;
  report: SlopeReportInputT;
  createdByName: string | null;
  createdAt: string;
}
