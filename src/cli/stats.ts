/**
 * `npm run --silent stats -- <values.csv> --design <design.json> [--maps <maps.json>] [--out <result.json>]`, the
 * statistics contract's command line: exit 0 with the result JSON, exit 2 with one line on stderr naming the file
 * and the line, column or field for bad input (never a stack trace), exit 1 for anything unexpected.
 */
import { readFile } from 'node:fs/promises';
import { CliInputError, oneLine, splitArgs, writeJsonOutput } from './io';
import { pathToFileURL } from 'node:url';
import { DesignSchema, parseWith, runDesign } from '../lib/statistics/design';
import { StatisticsInputError } from '../lib/statistics/errors';
import { runMapTestSync } from '../lib/statistics/map-test';
import { clustersOut, mapTestSummary, MapsSchema, prepareMapTest } from '../lib/statistics/maps';
import { parseTidyValues } from '../lib/statistics/tidy-values';

const USAGE = 'usage: stats <values.csv> --design <design.json> [--maps <maps.json>] [--out <result.json>]';
const OPTIONS = ['design', 'maps', 'out'];


interface Args {
  values: string;
  design: string;
  maps?: string;
  out?: string;
}

function parseArgs(argv: string[]): Args {
  const { positional, named } = splitArgs(argv, OPTIONS, USAGE, 'a file name');
  if (positional.length !== 1) throw new CliInputError('arguments', `expected one values CSV file, got ${positional.length} (${USAGE})`);
  if (named.design === undefined) throw new CliInputError('--design', `is required (${USAGE})`);
  return { values: positional[0], design: named.design, maps: named.maps, out: named.out };
}

async function readText(path: string): Promise<string> {
  try {
    return await readFile(path, 'utf8');
  } catch (e) {
    throw new CliInputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
}

async function readJson(path: string): Promise<unknown> {
  const text = await readText(path);
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new CliInputError(path, `is not valid JSON (${(e as Error).message})`);
  }
}


/** Runs the command; resolves with the exit code. */
export async function main(argv: string[]): Promise<number> {
  const files = { values: 'values', design: 'design', maps: 'maps' };
  try {
    const args = parseArgs(argv);
    Object.assign(files, { values: args.values, design: args.design, maps: args.maps ?? 'maps' });
    const table = parseTidyValues(await readText(args.values));
    const design = parseWith(DesignSchema, await readJson(args.design), 'design');
    const { tests, warnings } = runDesign(table, design);
    const result: Record<string, unknown> = { tests };
    if (args.maps !== undefined) {
      const maps = parseWith(MapsSchema, await readJson(args.maps), 'maps');
      const prepared = prepareMapTest(maps, design);
      warnings.push(...prepared.warnings);
      const outcome = runMapTestSync(prepared.input);
      result.clusters = clustersOut(outcome, maps);
      result.mapTest = mapTestSummary(outcome, prepared.subjects);
    }
    result.warnings = warnings;
    const json = JSON.stringify(result);
    await writeJsonOutput(json, args.out);
    return 0;
  } catch (e) {
    if (e instanceof CliInputError) {
      process.stderr.write(`stats: ${oneLine(`${e.where}: ${e.message}`)}\n`);
      return 2;
    }
    if (e instanceof StatisticsInputError) {
      const file = e.source === null ? 'input' : files[e.source];
      process.stderr.write(`stats: ${oneLine(`${file}: ${e.field}: ${e.problem}`)}\n`);
      return 2;
    }
    process.stderr.write(`stats: internal error: ${oneLine(e instanceof Error ? e.message : String(e))}\n`);
    return 1;
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
