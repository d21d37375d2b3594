import { z } from './zod';
import { AnalysisInputError } from './errors';
import { CHANNEL_TYPES } from './channel-types';
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

// Physical dimensions with a fixed factor in the contract (ASCII and Latin-1/UTF-8 micro signs).
const BUILT_IN_UNITS = new Set(['uv', 'µv', 'μv', 'mv', 'v', 'nv']);

/** Baseline methods of recipe format 2 (analysis contract, "Baseline normalization"). */
export const BASELINE_METHODS = ['decibel', 'percent-change', 'z-score', 'power-ratio'] as const;
/** Aperiodic models of recipe format 2 (analysis contract, "Power spectrum and aperiodic fit"). */
export const APERIODIC_MODELS = ['power-law', 'power-law-knee'] as const;

// Format 1's names and the format-2 names they became (analysis contract, "Recipe (input), format 2").
const METHOD_OF_FORMAT_1 = { db: 'decibel', percent: 'percent-change', zscore: 'z-score', ratio: 'power-ratio' } as const;
const MODEL_OF_FORMAT_1 = { fixed: 'power-law', knee: 'power-law-knee' } as const;

const events = z.array(z.string().min(1, 'must not be empty')).min(1, 'must name at least one event label');
const name = z.string().min(1, 'must not be empty');
const channelType = z.enum(CHANNEL_TYPES, { error: `must be a channel type: ${CHANNEL_TYPES.map((t) => `"${t}"`).join(', ')}` });
const typeLimits = z
  .object({
    peakToPeak: positive.nullable(),
    flat: z.number().min(0, 'must be zero or more').refine(Number.isFinite, 'must be a finite number').nullable(),
  })
  .strict();

/** The recipe's `reference` (DEVELOPERS.md, "References"): how the electrode channels are re-referenced. */
const reference = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('as-recorded') }).strict(),
    z.object({ kind: z.literal('common-average') }).strict(),
    z.object({ kind: z.literal('mean-of-channels'), channels: z.array(name).min(1, 'must name at least one channel') }).strict(),
    z
      .object({
        kind: z.literal('bipolar'),
        pairs: z.array(z.tuple([name, name], { error: 'must be a pair ["A", "B"] of channel names (A − B)' })).optional(),
        shafts: z.array(name).optional(),
      })
      .strict()
      .refine((r) => (r.pairs?.length ?? 0) + (r.shafts?.length ?? 0) > 0, 'must list pairs, shafts or both'),
  ],
  { error: 'must be { "kind": "as-recorded" | "common-average" | "mean-of-channels" | "bipolar", … }' },
);

/** The recipe's `filters` (DEVELOPERS.md, "Filters"): zero-phase high-pass and line-noise notch. */
const filters = z
  .object({
    highPass: z
      .object({
        cutoffHz: positive,
        order: z.union([z.literal(2), z.literal(4), z.literal(6), z.literal(8)], { error: 'must be 2, 4, 6 or 8 (Butterworth order of one pass)' }).default(4),
      })
      .strict()
      .optional(),
    notch: z
      .object({
        lineHz: positive.optional(),
        harmonics: z.number().int('must be a whole number').min(1, 'must be at least 1').max(20, 'must be at most 20').default(1),
        q: positive.refine((q) => q >= 1 && q <= 200, 'must be between 1 and 200').default(30),
      })
      .strict()
      .superRefine((n, ctx) => {
        if (n.lineHz === undefined) ctx.addIssue({ code: 'custom', path: ['lineHz'], message: 'is required for a notch: the line frequency, 50 or 60 Hz' });
      })
      .optional(),
  })
  .strict();

// Fields both formats share: the contract's and our extensions (DEVELOPERS.md, "Recipe extensions"; all optional,
// so a contract recipe parses as is).
const shared = {
  // Analysis contract, "Inter-trial phase consistency": each condition also gets `itpc` beside `power`.
  itpc: z.boolean({ error: 'must be true or false' }).optional(),
  // Extension (DEVELOPERS.md, "Recipe extensions"): "induced" takes each condition's evoked response out of every
  // epoch before the transform; absent means "total".
  trialPower: z.enum(['total', 'induced'], { error: 'must be "total" or "induced"' }).optional(),
  // Extension: named channel groups (regions) whose maps are averaged (src/lib/analysis/channel-groups.ts).
  channelGroups: z
    .record(z.string().min(1, 'must not be empty').max(40, 'must be at most 40 characters'), z.array(z.string().min(1, 'must not be empty')).min(1, 'must list at least one channel'), {
      error: 'must map each group name to a list of channel names',
    })
    .optional(),
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
  spectrum: z
    .object({
      segment: positive,
      overlap: z.number().min(0, 'must be at least 0').lt(1, 'must be less than 1'),
      range,
      source: z.enum(['recording', 'epochs']).default('recording'),
    })
    .strict(),
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
      // Per channel type, limits in that type's unit (µV; fT or fT/cm for MEG) replacing the two µV limits above.
      byType: z
        .record(z.string(), typeLimits)
        .superRefine((r, ctx) => {
          for (const key of Object.keys(r)) {
            if (!(CHANNEL_TYPES as readonly string[]).includes(key)) ctx.addIssue({ code: 'custom', path: [key], message: `is not a channel type (${CHANNEL_TYPES.join(', ')})` });
          }
        })
        .optional(),
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
  // Channel types changed by hand and channels marked bad (DEVELOPERS.md, "Channel types").
  signals: z.object({ types: z.record(name, channelType).optional(), bad: z.array(name).optional() }).strict().optional(),
  reference: reference.optional(),
  // Which rows of a BIDS events file become events, and response-locking (DEVELOPERS.md, "Event tables").
  eventTable: z.object({ labelColumn: name.optional(), where: z.array(name).optional(), shiftBy: name.optional() }).strict().optional(),
  filters: filters.optional(),
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
};

/** The recipe JSON of the analysis contract ("Recipe (input), format 2"); `spacing` defaults to log, `scope` to average. */
export const RecipeSchema = z
  .object({
    format: z.literal(2, { error: 'must be 2 (the recipe format this version writes)' }),
    epochs: z.object({ events, start: finite, end: finite }).strict(),
    baseline: z
      .object({
        start: finite,
        end: finite,
        method: z.enum(BASELINE_METHODS, { error: `must be one of ${BASELINE_METHODS.map((m) => `"${m}"`).join(', ')}` }),
        scope: z.enum(['average', 'trial']).default('average'),
        // Extension (DEVELOPERS.md, "Baseline spread"): where a z-score's S comes from; absent means "time".
        spread: z.enum(['time', 'trials'], { error: 'must be "time" or "trials"' }).optional(),
      })
      .strict()
      .superRefine((b, ctx) => {
        if (b.spread !== undefined && b.method !== 'z-score') ctx.addIssue({ code: 'custom', path: ['spread'], message: `applies only to method "z-score" (the method is "${b.method}")` });
      }),
    aperiodic: z.object({ range, model: z.enum(APERIODIC_MODELS, { error: `must be "power-law" or "power-law-knee"` }) }).strict(),
    ...shared,
  })
  .strict();

/** Format 1, the names before format 2: read, then upgraded (`readRecipe`). */
const RecipeFormat1Schema = z
  .object({
    format: z.literal(1).optional(),
    epochs: z.object({ events, tmin: finite, tmax: finite }).strict(),
    baseline: z
      .object({
        start: finite,
        end: finite,
        method: z.enum(['db', 'percent', 'zscore', 'ratio'], { error: 'must be one of "db", "percent", "zscore", "ratio" (format 1)' }),
        scope: z.enum(['average', 'trial']).default('average'),
      })
      .strict(),
    aperiodic: z.object({ range, mode: z.enum(['fixed', 'knee'], { error: 'must be "fixed" or "knee" (format 1)' }) }).strict(),
    ...shared,
  })
  .strict();

export type Recipe = z.output<typeof RecipeSchema>;
export type RecipeInput = z.input<typeof RecipeSchema>;
export type BaselineMethodName = (typeof BASELINE_METHODS)[number];
export type AperiodicModelName = (typeof APERIODIC_MODELS)[number];

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

function throwIssues(error: z.ZodError): never {
  // A bad record key (an override's event key) carries its own message one level down.
  const issues = error.issues.map((i) => (i.code === 'invalid_key' && i.issues.length > 0 ? { ...i, message: i.issues[0].message } : i));
  const first = issues[0];
  const others = issues.slice(1).map((i) => `${fieldPath(i.path)} ${i.message}`);
  const problem = first.message + (others.length > 0 ? `; also ${others.join('; ')}` : '');
  throw new AnalysisInputError(fieldPath(first.path), problem);
}

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** The one-line notice for a format-1 recipe (analysis contract: upgraded, never silently). */
export const FORMAT_1_NOTICE =
  'recipe format 1 (no "format" field) read and upgraded to format 2: epochs.tmin/tmax → epochs.start/end, baseline methods db/percent/zscore/ratio → decibel/percent-change/z-score/power-ratio, aperiodic.mode fixed/knee → aperiodic.model power-law/power-law-knee; export it again to keep it in format 2';

/**
 * Reads a parsed recipe JSON of either format. Format 2 (`"format": 2`) is checked with `RecipeSchema`; a recipe
 * without `format` (or with `"format": 1`) is checked with format 1's names and upgraded to format 2, with
 * `notice` saying so in one line. Throws AnalysisInputError naming the first bad field; its problem lists the others.
 */
export function readRecipe(input: unknown): { recipe: Recipe; notice: string | null } {
  if (!isObject(input)) throw new AnalysisInputError('recipe', 'must be a JSON object');
  const format = input.format;
  if (format === 2) {
    const parsed = RecipeSchema.safeParse(input);
    if (!parsed.success) throwIssues(parsed.error);
    return { recipe: parsed.data, notice: null };
  }
  if (format !== undefined && format !== 1) throw new AnalysisInputError('format', `is ${JSON.stringify(format)}; this version reads recipe formats 1 and 2`);
  // Without "format" the recipe is format 1; format-2 names there most likely mean a forgotten "format": 2.
  const epochs = isObject(input.epochs) ? input.epochs : {};
  const baseline = isObject(input.baseline) ? input.baseline : {};
  const aperiodic = isObject(input.aperiodic) ? input.aperiodic : {};
  const newNames =
    'start' in epochs || 'end' in epochs || 'model' in aperiodic || (typeof baseline.method === 'string' && (BASELINE_METHODS as readonly string[]).includes(baseline.method));
  if (format === undefined && newNames) {
    throw new AnalysisInputError('format', 'is missing: a recipe without "format" is read as format 1 (epochs.tmin/tmax, method "db" …), but this one uses format 2 names; add "format": 2');
  }
  const parsed = RecipeFormat1Schema.safeParse(input);
  if (!parsed.success) throwIssues(parsed.error);
  const { format: _format, epochs: e, baseline: b, aperiodic: a, ...rest } = parsed.data;
  const recipe: Recipe = {
    format: 2,
    epochs: { events: e.events, start: e.tmin, end: e.tmax },
    ...rest,
    baseline: { ...b, method: METHOD_OF_FORMAT_1[b.method] },
    aperiodic: { range: a.range, model: MODEL_OF_FORMAT_1[a.mode] },
  };
  return { recipe, notice: FORMAT_1_NOTICE };
}

/** `readRecipe` without the notice, for callers that have already shown it (or that check a recipe they wrote). */
export function parseRecipe(input: unknown): Recipe {
  return readRecipe(input).recipe;
}
