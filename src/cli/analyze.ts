/**
 * `npm run --silent analyze -- <recording> --recipe <recipe.json> [--events <events.tsv>] [--rate <Hz>]
 * [--out <result.json>]`, the analysis contract's command line: exit 0 with the Result JSON, exit 2 with one line
 * on stderr for bad input (never a stack trace), exit 1 for anything unexpected.
 */
import { readFile } from 'node:fs/promises';
import { oneLine, splitArgs, writeJsonOutput } from './io';
import { pathToFileURL } from 'node:url';
import { AnalysisInputError } from '../lib/analysis/errors';
import { parseRecipe, readRecipe as checkRecipe, RecipeSchema } from '../lib/analysis/recipe';
import { runRecipe } from '../lib/analysis/run-recipe';
import { FormatError } from '../lib/formats';
import { CliInputError, loadRecording, type LoadOptions } from './load-recording';

const USAGE = 'usage: analyze <recording.edf|.csv|.tsv> --recipe <recipe.json> [--events <events.tsv>] [--rate <Hz>] [--out <result.json>]';

interface Args {
  recording: string;
  recipe: string;
  events?: string;
  rate?: number;
  out?: string;
}

function parseArgs(argv: string[]): Args {
  const { positional, named } = splitArgs(argv, ['recipe', 'events', 'rate', 'out'], USAGE);
  if (positional.length !== 1) throw new CliInputError('arguments', `expected one recording file, got ${positional.length} (${USAGE})`);
  if (named.recipe === undefined) throw new CliInputError('--recipe', `is required (${USAGE})`);
  let rate: number | undefined;
  if (named.rate !== undefined) {
    rate = Number(named.rate);
    if (!(rate > 0) || !Number.isFinite(rate)) throw new CliInputError('--rate', `must be a positive number of Hz (got "${named.rate}")`);
  }
  return { recording: positional[0], recipe: named.recipe, events: named.events, rate, out: named.out };
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


/** Runs the command; resolves with the exit code. */
export async function main(argv: string[]): Promise<number> {
  let recipePath = 'recipe';
  try {
    const args = parseArgs(argv);
    recipePath = args.recipe;
    const json = await readRecipeFile(args.recipe);
    // A format-1 recipe is upgraded to format 2 with a one-line notice on stderr (analysis contract), never silently.
    const { recipe, notice } = checkRecipe(json);
    if (notice !== null) process.stderr.write(`analyze: ${args.recipe}: ${notice}\n`);
    const { recording, warnings } = await loadRecording(args.recording, {
      eventsPath: args.events,
      rateHz: args.rate,
      ...readerOptionsOf(recipe),
      eventTable: recipe.eventTable,
    });
    const result = runRecipe(recording, recipe);
    result.warnings.unshift(...warnings);
    const text = JSON.stringify(result);
    await writeJsonOutput(text, args.out);
    return 0;
  } catch (e) {
    if (e instanceof CliInputError) {
      process.stderr.write(`analyze: ${oneLine(`${e.where}: ${e.message}`)}\n`);
      return 2;
    }
    if (e instanceof AnalysisInputError) {
      process.stderr.write(`analyze: ${oneLine(`${recipePath}: ${e.message}`)}\n`);
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
