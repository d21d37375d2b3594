/**
 * Team review (issue 11): the request bodies the review API accepts, shared by the routes and (later) the browser.
 * Only derived numbers and what people write reach the server: every object is strict (an unknown key such as a
 * patient field or a file name is refused by name), every array and string has a cap, labels are short codes, and
 * the only free text is a note's body and a return reason. No module here touches the DOM or node:*.
 */
import { z } from '../analysis/zod';
import { BASELINE_METHODS, RecipeSchema } from '../analysis/recipe';
import { AnalysisSessionInput } from './studies';

/** Caps on a summary, in one place so the routes, the docs and the tests agree. */
export const SUMMARY_CAPS = {
  bands: 16,
  windows: 16,
  conditions: 16,
  channels: 256,
  channelGroups: 32,
  bandValues: 16_384,
  trialRows: 4_096,
  trialsPerRow: 1_000,
  trialValuesTotal: 50_000,
  aperiodic: 4_096,
  maps: 8,
  mapFrequencies: 64,
  mapTimes: 128,
  /** Bytes of one summary upload (under the server-wide 1 MiB cap, so the route's own message is the one seen). */
  bodyBytes: 1_000_000,
} as const;

export const NOTE_CAPS = { bodyChars: 4_000, mentions: 20, bodyBytes: 16_384 } as const;
export const RECIPE_BODY_BYTES = 65_536;

/** A code the team chose for a subject (the same rule as when creating an analysis session). */
export const SubjectCode = AnalysisSessionInput.shape.subjectCode;
export const SubjectInput = z.object({ code: SubjectCode }).strict();

// Something that looks like a recording's file name is not a label: refused wherever a label is accepted.
const FILE_NAME = /\.(edf|bdf|rec|csv|tsv|txt|fif|set|fdt|vhdr|vmrk|eeg|cnt|mat|gdf|xdf|json|nwb|mef|dat|bin)$/i;
const LABEL = /^[\p{L}\p{N}][\p{L}\p{N} ._+\-/:()]*$/u;

/** A channel, channel-group, band or window label: a short code, never a file name or a sentence. */
export const Label = z
  .string()
  .min(1, 'must not be empty')
  .max(40, 'must be at most 40 characters')
  .regex(LABEL, 'may hold only letters, digits, space and . _ + - / : ( )')
  .refine((s) => !FILE_NAME.test(s), 'looks like a file name; labels name channels, bands and windows only');

/** A condition name, as src/lib/analysis/conditions.ts allows it. */
export const ConditionName = z
  .string()
  .min(1, 'must not be empty')
  .max(40, 'must be at most 40 characters')
  .regex(/^[\p{L}\p{N}][\p{L}\p{N} ._/:-]*$/u, 'may hold only letters, digits, space, dot, dash, underscore, slash and colon')
  .refine((s) => !FILE_NAME.test(s), 'looks like a file name; conditions are named after events');

const finite = z.number().refine(Number.isFinite, 'must be a finite number');
/** A derived value; JSON has no NaN or ±Infinity, so an undefined value (dB of zero power) is null. */
const value = finite.nullable();
const capped = <T extends z.ZodType>(item: T, max: number, what: string) =>
  z.array(item).max(max, `holds at most ${max} ${what} (a longer array looks like raw samples, which never leave the browser)`);

const Band = z.object({ label: Label, lowHz: finite.min(0, 'must be at least 0'), highHz: finite }).strict().refine((b) => b.highHz > b.lowHz, { message: 'highHz must be above lowHz', path: ['highHz'] });
const Window = z.object({ label: Label, startS: finite, endS: finite }).strict().refine((w) => w.endS > w.startS, { message: 'endS must be after startS', path: ['endS'] });
const ChannelGroup = z.object({ label: Label, channels: capped(Label, SUMMARY_CAPS.channels, 'channels').min(1, 'must list at least one channel') }).strict();

const BandValue = z
  .object({ band: Label, window: Label, channel: Label, condition: ConditionName, raw: value, normalized: value })
  .strict();
const TrialValues = z
  .object({ band: Label, window: Label, channel: Label, condition: ConditionName, values: capped(value, SUMMARY_CAPS.trialsPerRow, 'trial values') })
  .strict();
const AperiodicFit = z
  .object({
    channel: Label,
    condition: ConditionName,
    offset: value,
    exponent: value,
    knee: value,
    r2: value,
    rmse: value,
  })
  .strict();
const ReducedMap = z
  .object({
    condition: ConditionName,
    channelGroup: Label,
    frequenciesHz: capped(finite, SUMMARY_CAPS.mapFrequencies, 'frequencies').min(1, 'must hold at least one frequency'),
    timesS: capped(finite, SUMMARY_CAPS.mapTimes, 'times').min(1, 'must hold at least one time'),
    /** Normalized units, one row per frequency, one value per time. */
    values: capped(capped(value, SUMMARY_CAPS.mapTimes, 'cells per row'), SUMMARY_CAPS.mapFrequencies, 'rows'),
  })
  .strict();

/**
 * The derived numbers of one recipe version, computed in the browser (or by the command line): band × window ×
 * channel × condition values in raw power and in the recipe's normalized units, per-trial band values for
 * within-subject statistics, aperiodic parameters per channel and condition, and a reduced normalized map per
 * condition over a named channel group (at most 64 frequencies × 128 times).
 */
export const SummaryInput = z
  .object({
    format: z.literal('tidemark-summary-1', { error: 'must be "tidemark-summary-1"' }),
    /** The recipe's baseline method (format 2 names), which the normalized values are in. */
    normalizedUnit: z.enum(BASELINE_METHODS),
    bands: capped(Band, SUMMARY_CAPS.bands, 'bands'),
    windows: capped(Window, SUMMARY_CAPS.windows, 'windows'),
    conditions: capped(ConditionName, SUMMARY_CAPS.conditions, 'conditions'),
    channels: capped(Label, SUMMARY_CAPS.channels, 'channels'),
    channelGroups: capped(ChannelGroup, SUMMARY_CAPS.channelGroups, 'channel groups'),
    bandValues: capped(BandValue, SUMMARY_CAPS.bandValues, 'band values'),
    trialValues: capped(TrialValues, SUMMARY_CAPS.trialRows, 'rows of trial values'),
    aperiodic: capped(AperiodicFit, SUMMARY_CAPS.aperiodic, 'aperiodic fits'),
    maps: capped(ReducedMap, SUMMARY_CAPS.maps, 'maps'),
  })
  .strict()
  .superRefine((s, ctx) => {
    const known = {
      band: new Set(s.bands.map((b) => b.label)),
      window: new Set(s.windows.map((w) => w.label)),
      channel: new Set(s.channels),
      condition: new Set(s.conditions),
      channelGroup: new Set(s.channelGroups.map((g) => g.label)),
    };
    const unique = (list: string[], path: string) => {
      const seen = new Set<string>();
      list.forEach((x, i) => {
        if (seen.has(x)) ctx.addIssue({ code: 'custom', path: [path, i], message: `"${x}" is listed twice` });
        seen.add(x);
      });
    };
    unique(s.bands.map((b) => b.label), 'bands');
    unique(s.windows.map((w) => w.label), 'windows');
    unique(s.conditions, 'conditions');
    unique(s.channels, 'channels');
    unique(s.channelGroups.map((g) => g.label), 'channelGroups');
    const refs = (rows: Record<string, unknown>[], list: string, keys: (keyof typeof known)[]) =>
      rows.forEach((row, i) => {
        for (const key of keys) {
          const v = row[key] as string;
          if (!known[key].has(v)) ctx.addIssue({ code: 'custom', path: [list, i, key], message: `"${v}" is not among the summary's ${key === 'channelGroup' ? 'channelGroups' : `${key}s`}` });
        }
      });
    s.channelGroups.forEach((g, i) => g.channels.forEach((c, j) => {
      if (!known.channel.has(c)) ctx.addIssue({ code: 'custom', path: ['channelGroups', i, 'channels', j], message: `"${c}" is not among the summary's channels` });
    }));
    refs(s.bandValues, 'bandValues', ['band', 'window', 'channel', 'condition']);
    refs(s.trialValues, 'trialValues', ['band', 'window', 'channel', 'condition']);
    refs(s.aperiodic, 'aperiodic', ['channel', 'condition']);
    refs(s.maps, 'maps', ['condition', 'channelGroup']);
    const total = s.trialValues.reduce((n, r) => n + r.values.length, 0);
    if (total > SUMMARY_CAPS.trialValuesTotal) {
      ctx.addIssue({ code: 'custom', path: ['trialValues'], message: `holds ${total} trial values in all; at most ${SUMMARY_CAPS.trialValuesTotal}` });
    }
    s.maps.forEach((m, i) => {
      if (m.values.length !== m.frequenciesHz.length) {
        ctx.addIssue({ code: 'custom', path: ['maps', i, 'values'], message: `has ${m.values.length} rows; frequenciesHz has ${m.frequenciesHz.length}` });
      }
      m.values.forEach((row, f) => {
        if (row.length !== m.timesS.length) ctx.addIssue({ code: 'custom', path: ['maps', i, 'values', f], message: `has ${row.length} cells; timesS has ${m.timesS.length}` });
      });
    });
  });
export type SummaryInputT = z.infer<typeof SummaryInput>;

/**
 * Save a recipe version: `baseVersion` is the version the edit started from (null when there is none yet). The
 * recipe is format 2 (RecipeSchema); a format-1 recipe is upgraded by the client (`readRecipe`) before it is sent.
 */
export const RecipeVersionInput = z
  .object({
    baseVersion: z.number().int('must be a whole number').min(1, 'must be at least 1').nullable(),
    recipe: RecipeSchema,
  })
  .strict();

const VersionNumber = z.number({ error: 'must name the recipe version you looked at' }).int('must be a whole number').min(1, 'must be at least 1');
/** The password asked again at signing; bounded so a huge string cannot make the hash check expensive. */
const SigningPassword = z.string({ error: 'enter your password to sign' }).min(1, 'enter your password to sign').max(1024, 'must be at most 1024 characters');
export const ReturnReason = z.string().trim().min(1, 'say why the session goes back').max(2000, 'must be at most 2000 characters');

/** A status change. Submitting asks nothing more; returning and signing off are signatures and ask the password again. */
export const StatusChangeInput = z.discriminatedUnion(
  'change',
  [
    z.object({ change: z.literal('submit'), recipeVersion: VersionNumber }).strict(),
    z.object({ change: z.literal('return'), recipeVersion: VersionNumber, password: SigningPassword, reason: ReturnReason }).strict(),
    z.object({ change: z.literal('signOff'), recipeVersion: VersionNumber, password: SigningPassword }).strict(),
  ],
  { error: 'change must be "submit", "return" or "signOff"' },
);
export type StatusChange = z.infer<typeof StatusChangeInput>;

/** A signature that changes no status: "reviewed" (read through, no decision). */
export const ReviewedSignatureInput = z.object({ meaning: z.literal('reviewed', { error: 'must be "reviewed" (approving and returning are status changes)' }), recipeVersion: VersionNumber, password: SigningPassword }).strict();

const UserId = z.string().min(1).max(64).regex(/^[A-Za-z0-9_-]+$/, 'is not a user id');
const NoteBody = z.string().trim().min(1, 'write something').max(NOTE_CAPS.bodyChars, `must be at most ${NOTE_CAPS.bodyChars} characters`);
const Mentions = z.array(UserId).max(NOTE_CAPS.mentions, `mention at most ${NOTE_CAPS.mentions} people`).default([]);
/** A key the client picks for one post (a UUID): sending the same post again returns the stored note, not a second one. */
const ClientKey = z.uuid('must be a UUID the client chose for this post').optional();
const Range = z.tuple([finite, finite], { error: 'must be a pair [from, to]' }).refine(([a, b]) => b > a, 'the second value must be above the first');

/** Where a note points on a recipe version's maps: a channel or a channel group, a condition, a time and a frequency range. */
export const NoteAnchor = z
  .object({
    channel: Label.optional(),
    channelGroup: Label.optional(),
    condition: ConditionName.optional(),
    timeS: Range.optional(),
    frequencyHz: Range.refine(([a]) => a >= 0, 'frequencies start at 0 Hz or above').optional(),
  })
  .strict()
  .refine((a) => !(a.channel && a.channelGroup), { message: 'name a channel or a channel group, not both', path: ['channelGroup'] });
export type NoteAnchorT = z.infer<typeof NoteAnchor>;

/** A new note: on a recipe version (with an optional anchor) or, with recipeVersion null, on the session as a whole. */
export const NoteInput = z
  .object({ body: NoteBody, recipeVersion: VersionNumber.nullable().default(null), anchor: NoteAnchor.nullable().default(null), mentions: Mentions, clientKey: ClientKey })
  .strict()
  .refine((n) => n.anchor === null || n.recipeVersion !== null, { message: 'an anchor needs the recipe version it points into', path: ['anchor'] });

export const NoteReplyInput = z.object({ body: NoteBody, mentions: Mentions, clientKey: ClientKey }).strict();

/** An edit of one's own note: `revision` is the one the edit started from; a stale one answers 409 with the current note. */
export const NoteEditInput = z.object({ revision: z.number().int().min(1), body: NoteBody, mentions: Mentions }).strict();

export const NoteResolutionInput = z.object({ resolved: z.boolean({ error: 'must be true (resolve) or false (reopen)' }) }).strict();

/** Mail a person can mute, and the words the account page shows for each. */
export const MAIL_KINDS = ['review-requested', 'review-outcome', 'note-mention'] as const;
export type MailKind = (typeof MAIL_KINDS)[number];
export const MAIL_KIND_WORDS: Record<MailKind, string> = {
  'review-requested': 'A session in one of my teams awaits review (sent to leads)',
  'review-outcome': 'My session was returned or signed off',
  'note-mention': 'Someone mentioned me in a note',
};

/**
 * The notifications form: a ticked box sends "on", an unticked one sends nothing (read as empty). The hidden `form`
 * field tells a real submission from an empty post, which must not mute everything.
 */
export const MailPreferencesInput = z.object({
  form: z.literal('mail-preferences', { error: 'The form could not be read. Nothing was changed.' }),
  ...(Object.fromEntries(MAIL_KINDS.map((k) => [k, z.enum(['', 'on'], { error: 'must be ticked or not' })])) as Record<MailKind, z.ZodEnum<{ '': ''; on: 'on' }>>),
});

/** The SHA-256 of a recording's bytes, 64 lowercase hex digits. */
export const Fingerprint = z.string().regex(/^[0-9a-f]{64}$/, 'must be the SHA-256 of the recording: 64 lowercase hex digits');

/**
 * One file written by `analyze … --summary` (src/cli/analyze.ts): a subject's code, the recording's fingerprint, the
 * recipe (format 2) and the summary of that run. The study page's batch import reads many of these at once.
 */
export const CliSummaryFile = z
  .object({
    format: z.literal('tidemark-cli-summary-1', { error: 'must be "tidemark-cli-summary-1" (a file written by analyze --summary)' }),
    subjectCode: SubjectCode,
    fingerprint: Fingerprint,
    recipe: RecipeSchema,
    summary: SummaryInput,
  })
  .strict()
  .refine((f) => f.recipe.recording?.fingerprint === undefined || f.recipe.recording.fingerprint === f.fingerprint, {
    message: 'names another recording than the file\'s fingerprint',
    path: ['recipe', 'recording', 'fingerprint'],
  });
export type CliSummaryFileT = z.infer<typeof CliSummaryFile>;

/** Batch import caps: files per batch and bytes of the whole multipart body (each file's summary keeps its own cap). */
export const IMPORT_CAPS = { files: 50, bodyBytes: 16 * 1_048_576, fileBytes: SUMMARY_CAPS.bodyBytes + RECIPE_BODY_BYTES + 1_024 } as const;
