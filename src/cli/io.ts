// What every command line here shares: the bad-input error, the one-line message, writing the result JSON.
import { writeFile } from 'node:fs/promises';

/** Bad input outside the cores: `where` is a file or an option. */
export class CliInputError extends Error {
  constructor(
    readonly where: string,
    message: string,
  ) {
    super(message);
    this.name = 'CliInputError';
  }
}

/** A message folded onto one line (exit-2 messages are one line on standard error). */
export function oneLine(s: string): string {
  return s.replace(/\s*\n\s*/g, ' ');
}

/** Writes `json` plus a newline to `out`, or to standard output when `out` is undefined (waiting for the flush). */
export async function writeJsonOutput(json: string, out: string | undefined): Promise<void> {
  if (out !== undefined) {
    try {
      await writeFile(out, json + '\n');
    } catch (e) {
      throw new CliInputError(out, `cannot be written (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
    }
    return;
  }
  await new Promise<void>((resolve, reject) => process.stdout.write(json + '\n', (err) => (err ? reject(err) : resolve())));
}

/**
 * Splits `argv` into positional arguments and `--name value` / `--name=value` options, refusing an unknown option,
 * one without its value (`needs`: what the message says it needs) and one given twice.
 */
export function splitArgs(argv: string[], options: readonly string[], usage: string, needs = 'a value'): { positional: string[]; named: Record<string, string> } {
  const positional: string[] = [];
  const named: Record<string, string> = {};
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith('--')) {
      positional.push(a);
      continue;
    }
    const [key, inline] = a.slice(2).split('=', 2);
    if (!options.includes(key)) throw new CliInputError(`--${key}`, `is not an option (${usage})`);
    const value = inline ?? argv[++i];
    if (value === undefined || value.startsWith('--')) throw new CliInputError(`--${key}`, `needs ${needs}`);
    if (key in named) throw new CliInputError(`--${key}`, 'is given twice');
    named[key] = value;
  }
  return { positional, named };
}
