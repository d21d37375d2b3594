/**
 * `npm run --silent analyze -- <recording> --recipe <recipe.json> [--events <events.tsv>]
 * [--channels <channels.tsv>] [--rate <Hz>] [--out <result.json>] [--summary <summary.json> --subject <code> [--summary-spec <spec.json>]]`, the analysis
 * contract's command line: exit 0 with the Result JSON, exit 2 with one line on stderr for bad input (never a stack
 * trace), exit 1 for anything unexpected. `--summary` also writes the review summary of the same run (format
 * "tidemark-summary-1", src/lib/analysis/summary.ts) with the recipe, the recording's SHA-256 and the subject code:
 * the file the study page's batch import reads. It holds no header field, no file name and no sample.
 */
import { readFile } from 'node:fs/promises';
import { oneLine, splitArgs, writeJsonOutput } from './io';
import { pathToFileURL } from 'node:url';
import { AnalysisInputError } from '../lib/analysis/errors';
import { parseRecipe, readRecipe as checkRecipe, RecipeSchema } from '../lib/analysis/recipe';
import { analyzeChannel, assembleResult, planRun, runRecipe, type ChannelAnalysis } from '../lib/analysis/run-recipe';
import { combineSummary, resolveSummarySpec, summarizeChannel, type ChannelSummary, type SummarySpec } from '../lib/analysis/summary';
import { z } from '../lib/analysis/zod';
import { Label, SubjectCode, SUMMARY_CAPS, SummaryInput } from '../lib/schemas/review';
import { FormatError } from '../lib/formats';
import { CliInputError, loadRecording, withBadChannels, type LoadOptions } from './load-recording';
import type { Recipe } from '../lib/analysis/recipe';
import type { Recording } from '../lib/analysis/recording';
import type { AnalysisResult } from '../lib/analysis/run-recipe';

const USAGE =
  'usage: analyze <recording.edf|.csv|.tsv> --recipe <recipe.json> [--events <events.tsv>] [--channels <channels.tsv>] [--rate <Hz>] [--out <result.json>] [--summary <summary.json> --subject <code> [--summary-spec <spec.json>]]';

/** The file `--summary` writes: what one subject's upload holds (the study page's batch import reads it). */
export const CLI_SUMMARY_FORMAT = 'tidemark-cli-summary-1';

interface Args {
  recording: string;
  recipe: string;
  events?: string;
  channels?: string;
  rate?: number;
  out?: string;
  summary?: string;
  subject?: string;
  summarySpec?: string;
}

/** `--summary-spec`: bands, windows and channel groups of the summary (src/lib/analysis/summary.ts `SummarySpec`). */
const finite = z.number().refine(Number.isFinite, 'must be a finite number');
const SummarySpecSchema = z
  .object({
    bands: z.array(z.object({ label: Label, lowHz: finite, highHz: finite }).strict()).optional(),
    windows: z.array(z.object({ label: Label, startS: finite, endS: finite }).strict()).optional(),
    channelGroups: z.array(z.object({ label: Label, channels: z.array(Label) }).strict()).optional(),
    mapGroup: Label.optional(),
    trialChannels: z.array(Label).optional(),
  })
  .strict();

function parseArgs(argv: string[]): Args {
  const { positional, named } = splitArgs(argv, ['recipe', 'events', 'channels', 'rate', 'out', 'summary', 'subject', 'summary-spec'], USAGE);
  if (positional.length !== 1) throw new CliInputError('arguments', `expected one recording file, got ${positional.length} (${USAGE})`);
  if (named.recipe === undefined) throw new CliInputError('--recipe', `is required (${USAGE})`);
  let rate: number | undefined;
  if (named.rate !== undefined) {
    rate = Number(named.rate);
    if (!(rate > 0) || !Number.isFinite(rate)) throw new CliInputError('--rate', `must be a positive number of Hz (got "${named.rate}")`);
  }
  if (named.summary === undefined) {
    for (const o of ['subject', 'summary-spec']) if (named[o] !== undefined) throw new CliInputError(`--${o}`, 'is used only with --summary');
  } else {
    if (named.subject === undefined) throw new CliInputError('--subject', "is required with --summary: the team's code for the subject (a code, never a name)");
    const code = SubjectCode.safeParse(named.subject);
    if (!code.success) throw new CliInputError('--subject', `"${named.subject}": ${code.error.issues[0].message}`);
  }
  return { recording: positional[0], recipe: named.recipe, events: named.events, channels: named.channels, rate, out: named.out, summary: named.summary, subject: named.subject?.trim(), summarySpec: named['summary-spec'] };
}

function issueText(issue: { path: PropertyKey[]; message: string }, prefix: string): string {
  const path = issue.path.reduce<string>((s, k) => (typeof k === 'number' ? `${s}[${k}]` : `${s}.${String(k)}`), prefix);
  return `${path}: ${issue.message}`;
}

export async function readSpecFile(path: string): Promise<SummarySpec> {
  const json = await readRecipeFile(path);
  const parsed = SummarySpecSchema.safeParse(json);
  if (!parsed.success) throw new CliInputError(path, issueText(parsed.error.issues[0], 'summary'));
  return parsed.data;
}

async function readRecipeFile(path: string): Promise<unknown> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (e) {
    throw new CliInputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new CliInputError(path, `is not valid JSON (${(e as Error).message})`);
  }
}

/**
 * The reader options a recipe asks for (`recording.units`, `recording.exclude`, DEVELOPERS.md "Recipe extensions"),
 * checked before the recording is read; a bad `recording` section is reported like any other recipe field.
 */
export function readerOptionsOf(recipe: unknown): Pick<LoadOptions, 'unitFactors' | 'exclude' | 'fingerprint'> {
  const section = typeof recipe === 'object' && recipe !== null ? (recipe as { recording?: unknown }).recording : undefined;
  if (section === undefined) return {};
  const parsed = RecipeSchema.shape.recording.safeParse(section);
  if (!parsed.success) parseRecipe(recipe); // throws AnalysisInputError naming the field
  const recording = parsed.data;
  return { unitFactors: recording?.units, exclude: recording?.exclude, fingerprint: recording?.fingerprint !== undefined };
}


/**
 * One run of `recipe` with its review summary, as `--summary` writes it and `batch` writes it per recording: the
 * run goes channel by channel, each channel's single trials summarized and then dropped (they are large), so memory
 * stays one channel's trials; the Result is the same bits as `runRecipe`'s (single-trials-same-bits test). The
 * recording must carry its fingerprint. Throws CliInputError at `where` when the summary breaks the server's rules.
 */
export function runWithSummary(recording: Recording, recipe: Recipe, spec: SummarySpec, subjectCode: string, where: string): { result: AnalysisResult; text: string; notices: string[] } {
  const { plan, recording: conditioned } = planRun(recording, recipe);
  const resolved = resolveSummarySpec(plan, spec);
  const channels: ChannelAnalysis[] = [];
  const parts: ChannelSummary[] = [];
  plan.channels.forEach((name, i) => {
    const analysis = analyzeChannel(plan, conditioned.data[plan.channelIndices[i]], { singleTrials: resolved.trialChannels.has(name) });
    parts.push(summarizeChannel(plan, i, analysis, resolved));
    channels.push({ ...analysis, singleTrials: null });
  });
  const result = assembleResult(plan, channels);
  const summary = combineSummary(plan, parts, resolved);
  const checked = SummaryInput.safeParse(summary);
  if (!checked.success) throw new CliInputError(where, `cannot be written: ${issueText(checked.error.issues[0], 'summary')}`);
  const fingerprint = recording.fingerprint!;
  const file = {
    format: CLI_SUMMARY_FORMAT,
    subjectCode,
    fingerprint,
    recipe: { ...recipe, recording: { ...recipe.recording, fingerprint } },
    summary,
  };
  const bytes = Buffer.byteLength(JSON.stringify(summary));
  if (bytes > SUMMARY_CAPS.bodyBytes) {
    throw new CliInputError(where, `cannot be written: the summary holds ${bytes} bytes; the server keeps at most ${SUMMARY_CAPS.bodyBytes} (use --summary-spec to name fewer bands, windows or trial channels)`);
  }
  return { result, text: JSON.stringify(file), notices: resolved.notices };
}

/** Runs the command; resolves with the exit code. */
export async function main(argv: string[]): Promise<number> {
  let recipePath = 'recipe';
  let specPath = '--summary';
  try {
    const args = parseArgs(argv);
    recipePath = args.recipe;
    specPath = args.summarySpec ?? '--summary';
    const json = await readRecipeFile(args.recipe);
    // A format-1 recipe is upgraded to format 2 with a one-line notice on stderr (analysis contract), never silently.
    const { recipe, notice } = checkRecipe(json);
    if (notice !== null) process.stderr.write(`analyze: ${args.recipe}: ${notice}\n`);
    const spec = args.summarySpec === undefined ? {} : await readSpecFile(args.summarySpec);
    const readerOptions = readerOptionsOf(recipe);
    const { recording, warnings: readWarnings, bad } = await loadRecording(args.recording, {
      eventsPath: args.events,
      channelsPath: args.channels,
      rateHz: args.rate,
      ...readerOptions,
      // the summary names its recording by SHA-256, as the browser does
      fingerprint: readerOptions.fingerprint === true || args.summary !== undefined,
      eventTable: recipe.eventTable,
    });
    // Channels a BIDS channels file marks bad join the recipe's signals.bad (and leave its channel lists).
    const effective = withBadChannels(recipe, bad, args.channels ?? '--channels');
    const warnings = [...readWarnings, ...effective.warnings];
    if (args.summary === undefined) {
      const result = runRecipe(recording, effective.recipe);
      result.warnings.unshift(...warnings);
      await writeJsonOutput(JSON.stringify(result), args.out);
      return 0;
    }
    const { result, text, notices } = runWithSummary(recording, effective.recipe, spec, args.subject!, args.summary);
    result.warnings.unshift(...warnings);
    for (const notice of notices) process.stderr.write(`analyze: ${notice}\n`);
    await writeJsonOutput(JSON.stringify(result), args.out);
    await writeJsonOutput(text, args.summary);
    return 0;
  } catch (e) {
    if (e instanceof CliInputError) {
      process.stderr.write(`analyze: ${oneLine(`${e.where}: ${e.message}`)}\n`);
      return 2;
    }
    if (e instanceof AnalysisInputError) {
      process.stderr.write(`analyze: ${oneLine(`${e.field.startsWith('summary') ? specPath : recipePath}: ${e.message}`)}\n`);
      return 2;
    }
    if (e instanceof FormatError) {
      process.stderr.write(`analyze: ${oneLine(`${argv.find((a) => !a.startsWith('--')) ?? 'input'}: ${e.message}`)}\n`);
      return 2;
    }
    process.stderr.write(`analyze: internal error: ${oneLine(e instanceof Error ? e.message : String(e))}\n`);
    return 1;
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
