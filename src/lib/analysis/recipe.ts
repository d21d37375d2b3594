import { z } from './zod';
import { AnalysisInputError } from './errors';
import { EVENT_KEY } from './event-key';

const finite = z.number().refine(Number.isFinite, 'must be a finite number');
const positive = z.number().positive('must be greater than 0').refine(Number.isFinite, 'must be a finite number');
const range = z.tuple([finite, finite], { error: 'must be a pair [low, high] of numbers in Hz' });

const cycles = z.union(
  [
    z.object({ fixed: positive }).strict(),
    z.object({ min: positive, max: positive }).strict(),
    z.object({ fwhm: positive }).strict(),
  ],
  { error: 'must be { "fixed": n }, { "min": n, "max": n } or { "fwhm": seconds }' },
);

/** The recipe JSON of the analysis contract ("Recipe (input)"); `spacing` defaults to log, `scope` to average. */
// Physical dimensions with a fixed factor in the contract (ASCII and Latin-1/UTF-8 micro signs).
const BUILT_IN_UNITS = new Set(['uv', 'µv', 'μv', 'mv', 'v', 'nv']);

export const RecipeSchema = z
  .object({
    epochs: z
      .object({
        events: z.array(z.string().min(1, 'must not be empty')).min(1, 'must name at least one event label'),
        tmin: finite,
        tmax: finite,
      })
      .strict(),
    channels: z.array(z.string().min(1, 'must not be empty')).min(1, 'must name at least one channel (or be left out for all)').optional(),
    frequencies: z
      .object({
        min: positive,
        max: positive,
        count: z.number().int('must be a whole number').min(1, 'must be at least 1').max(1000, 'must be at most 1000'),
        spacing: z.enum(['log', 'linear']).default('log'),
      })
      .strict(),
    cycles,
    baseline: z
      .object({
        start: finite,
        end: finite,
        method: z.enum(['db', 'percent', 'zscore', 'ratio']),
        scope: z.enum(['average', 'trial']).default('average'),
      })
      .strict(),
    spectrum: z
      .object({
        segment: positive,
        overlap: z.number().min(0, 'must be at least 0').lt(1, 'must be less than 1'),
        range,
        source: z.enum(['recording', 'epochs']).default('recording'),
      })
      .strict(),
    aperiodic: z.object({ range, mode: z.enum(['fixed', 'knee']) }).strict(),
    // Extensions of our own (DEVELOPERS.md, "Recipe extensions"); all optional, so a contract recipe parses as is.
    conditions: z
      .record(z.string().refine((n) => n === n.trim(), 'must not begin or end with spaces'), z.array(z.string().min(1, 'must not be empty')).min(1, 'must list at least one event label'), {
        error: 'must map each condition name to a list of event labels',
      })
      .optional(),
    rejection: z
      .object({
        peakToPeakMicrovolts: positive.nullable(),
        flatMicrovolts: z.number().min(0, 'must be zero or more').refine(Number.isFinite, 'must be a finite number').nullable(),
        scope: z.enum(['any', 'channel']).default('any'),
        channels: z.array(z.string().min(1, 'must not be empty')).optional(),
        overrides: z.record(z.string().regex(EVENT_KEY, 'must be an event key "<index>@<onset seconds>:<label>", e.g. "12@30.25:cue"'), z.enum(['keep', 'reject'])).default({}),
      })
      .strict()
      .superRefine((r, ctx) => {
        // A rule set that checks no channel would silently reject nothing; one that names channels it ignores misleads.
        if (r.scope === 'channel' && (r.channels === undefined || r.channels.length === 0)) {
          ctx.addIssue({ code: 'custom', path: ['channels'], message: 'must name at least one channel when scope is "channel"' });
        }
        if (r.scope === 'any' && r.channels !== undefined && r.channels.length > 0) {
          ctx.addIssue({ code: 'custom', path: ['channels'], message: 'applies only with scope "channel" (scope "any" checks every channel)' });
        }
      })
      .optional(),
    // How the file was read: `units` maps a physical dimension the reader does not know to its factor to µV,
    // `exclude` lists signal labels left out. The core never reads files; the CLI and the browser pass these on.
    recording: z
      .object({
        fingerprint: z.string().regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in 64 lowercase hex digits').optional(),
        units: z
          .record(
            // The built-in units keep their fixed factors (analysis.md, Units), so ordinary µV signals cannot be rescaled by accident.
            z.string().refine((d) => !BUILT_IN_UNITS.has(d.trim().toLowerCase()), 'is a unit the reader already knows (µV, mV, V, nV); only other units can be mapped'),
            positive.refine((f) => f <= 1e9, 'must be at most 1e9'),
            { error: 'must map each physical dimension to a factor to µV' },
          )
          .optional(),
        exclude: z.array(z.string().min(1, 'must not be empty')).optional(),
      })
      .strict()
      .optional(),
  })
  .strict();

export type Recipe = z.output<typeof RecipeSchema>;
export type RecipeInput = z.input<typeof RecipeSchema>;

/** Dotted field path of a zod issue: `["channels", 2]` → `channels[2]`, `["conditions", "cue/left"]` → `conditions["cue/left"]`. */
export function fieldPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else if (!/^[A-Za-z_$][\w$]*$/.test(String(key))) out += `[${JSON.stringify(String(key))}]`; // a condition name or event key
    else out += out === '' ? String(key) : `.${String(key)}`;
  }
  return out === '' ? 'recipe' : out;
}

/**
 * Checks a parsed JSON value against the recipe schema. Throws AnalysisInputError naming the first bad field;
 * its problem lists the others too.
 */
export function parseRecipe(input: unknown): Recipe {
  const parsed = RecipeSchema.safeParse(input);
  if (parsed.success) return parsed.data;
  // A bad record key (an override's event key) carries its own message one level down.
  const issues = parsed.error.issues.map((i) => (i.code === 'invalid_key' && i.issues.length > 0 ? { ...i, message: i.issues[0].message } : i));
  const first = issues[0];
  const others = issues.slice(1).map((i) => `${fieldPath(i.path)} ${i.message}`);
  const problem = first.message + (others.length > 0 ? `; also ${others.join('; ')}` : '');
  throw new AnalysisInputError(fieldPath(first.path), problem);
}
