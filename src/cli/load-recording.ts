import { createHash } from 'node:crypto';
import { selectEventRows, type EventTableSpec } from '../lib/analysis/event-table';
import { createReadStream } from 'node:fs';
import { open, readFile } from 'node:fs/promises';
import { extname } from 'node:path';
import type { Recording } from '../lib/analysis/recording';
import { FormatError, openEdf, parseBidsChannels, parseBidsEvents, parseCsvSamples, recordingWarnings, toRecording, type BidsEventsResult, type ByteSource, type EdfFile } from '../lib/formats';
import { inferChannelType, unitOf } from '../lib/analysis/channel-types';
import type { Recipe } from '../lib/analysis/recipe';

/** A command-line input problem: `where` is the file or option, printed before the message. */
import { CliInputError } from './io';

export { CliInputError };

export interface LoadOptions {
  eventsPath?: string;
  rateHz?: number;
  /** EDF only: physical dimension → factor to µV for units the reader does not know (the recipe's `recording.units`). */
  unitFactors?: Readonly<Record<string, number>>;
  /** EDF only: signal labels to leave out (the recipe's `recording.exclude`). */
  exclude?: readonly string[];
  /** Hash the file (SHA-256) so a recipe's `recording.fingerprint` can be compared; skipped when nothing asks. */
  fingerprint?: boolean;
  /** The recipe's `eventTable`: which rows of the events file become events, and onset shifts. */
  eventTable?: EventTableSpec;
  /** A BIDS `*_channels.tsv`: its types replace the inferred ones, its `status` = bad channels are returned in `bad`. */
  channelsPath?: string;
}

export interface LoadedRecording {
  recording: Recording;
  warnings: string[];
  /** Channels the channels file marks bad (recording names); `withBadChannels` puts them into the recipe. */
  bad: string[];
}

const EDF_EXTENSIONS = new Set(['.edf']);
const TABLE_EXTENSIONS = new Set(['.csv', '.tsv', '.txt']);

/** A ByteSource over an open file, so an EDF is read record by record rather than held twice. */
async function fileSource(path: string): Promise<{ source: ByteSource; close: () => Promise<void> }> {
  const handle = await open(path, 'r');
  const { size } = await handle.stat();
  return {
    source: {
      size,
      async read(offset, length) {
        const buffer = new Uint8Array(Math.max(0, Math.min(length, size - offset)));
        let done = 0;
        while (done < buffer.length) {
          const { bytesRead } = await handle.read(buffer, done, buffer.length - done, offset + done);
          if (bytesRead === 0) break;
          done += bytesRead;
        }
        return done === buffer.length ? buffer : buffer.subarray(0, done);
      },
    },
    close: () => handle.close(),
  };
}

async function readText(path: string): Promise<string> {
  try {
    return await readFile(path, 'utf8');
  } catch (e) {
    throw new CliInputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
}

/** SHA-256 of a file's bytes in lowercase hex, as the browser fingerprints a recording (FIPS 180-4 via node:crypto). */
export async function fingerprintFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/**
 * Reads an EDF/EDF+ (annotations become events) or a CSV/TSV sample table (needs the rate) and, when given,
 * a BIDS events TSV whose events are added to the recording's own.
 */
export async function loadRecording(path: string, options: LoadOptions): Promise<LoadedRecording> {
  const ext = extname(path).toLowerCase();
  let recording: Recording;
  let edf: EdfFile | null = null;
  let events: BidsEventsResult | null = null;
  let selectionWarnings: string[] = [];
  if (EDF_EXTENSIONS.has(ext)) {
    if (options.rateHz !== undefined) throw new CliInputError('--rate', 'applies only to CSV/TSV recordings; an EDF states its own rates');
    let file;
    try {
      file = await fileSource(path);
    } catch (e) {
      throw new CliInputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
    }
    try {
      edf = await openEdf(file.source, { unitFactors: options.unitFactors, exclude: options.exclude });
      recording = toRecording(edf);
    } catch (e) {
      throw e instanceof FormatError ? new CliInputError(path, e.message) : e;
    } finally {
      await file.close();
    }
  } else if (TABLE_EXTENSIONS.has(ext)) {
    if (options.rateHz === undefined) throw new CliInputError('--rate', `is required for a CSV/TSV recording (samples per second of ${path})`);
    const text = await readText(path);
    try {
      recording = parseCsvSamples(text, { sampleRateHz: options.rateHz });
    } catch (e) {
      throw e instanceof FormatError ? new CliInputError(path, e.message) : e;
    }
  } else {
    throw new CliInputError(path, `has an unknown extension "${ext}" (expected .edf, .csv, .tsv or .txt)`);
  }
  if (options.eventsPath !== undefined) {
    const total = recording.data.length > 0 ? recording.data[0].length : 0;
    const text = await readText(options.eventsPath);
    let parsed;
    try {
      parsed = parseBidsEvents(text, { recordingSeconds: total / recording.sampleRateHz });
    } catch (e) {
      throw e instanceof FormatError ? new CliInputError(options.eventsPath, e.message) : e;
    }
    events = parsed;
    const chosen = options.eventTable === undefined ? { events: parsed.events, warnings: [] } : selectEventRows(parsed.events, parsed.header, options.eventTable, total / recording.sampleRateHz);
    selectionWarnings = chosen.warnings;
    recording.events = [...recording.events, ...chosen.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, label: e.label }))];
  } else if (options.eventTable !== undefined) {
    throw new CliInputError('--events', "is required: the recipe's eventTable selects rows of a BIDS events file");
  }
  // The same lines as the browser's intake for the same file and reading, then the recipe's eventTable selection.
  const warnings = [...recordingWarnings({ edf, reading: { unitFactors: options.unitFactors, exclude: options.exclude }, events }), ...selectionWarnings];
  const bad: string[] = [];
  if (options.channelsPath !== undefined) applyChannelsFile(recording, await readText(options.channelsPath), options.channelsPath, options.exclude ?? [], bad, warnings);
  // The browser fingerprints the recording file alone (not a separate events file), so the CLI does the same.
  if (options.fingerprint) recording.fingerprint = await fingerprintFile(path);
  return { recording, warnings, bad };
}

/** "EEG Fz" → "Fz": a channels file may name a signal by its full EDF+ label or by the name the reader gives it. */
function withoutTypeWord(label: string): string {
  const m = /^[A-Za-z0-9]+\s+(\S.*)$/.exec(label.trim());
  return m === null ? label.trim() : m[1];
}

/**
 * Sets each channel's type from a BIDS channels file and collects the channels it marks bad. A recording channel the
 * file does not list keeps the type read from the file; a listed name the recording lacks is a warning.
 */
function applyChannelsFile(recording: Recording, text: string, path: string, exclude: readonly string[], bad: string[], warnings: string[]): void {
  let parsed;
  try {
    parsed = parseBidsChannels(text);
  } catch (e) {
    throw e instanceof FormatError ? new CliInputError(path, e.message) : e;
  }
  warnings.push(...parsed.warnings.map((w) => `${path}: ${w}`));
  const names = recording.channelNames;
  const types = names.map((name, c) => recording.channelTypes?.[c] ?? inferChannelType(name, unitOf(recording, c)));
  const listed = new Set<number>();
  const missing: string[] = [];
  for (const ch of parsed.channels) {
    let c = names.indexOf(ch.name);
    if (c < 0) c = names.indexOf(withoutTypeWord(ch.name));
    if (c < 0) {
      if (!exclude.includes(ch.name)) missing.push(ch.name);
      continue;
    }
    listed.add(c);
    types[c] = ch.type;
    if (ch.bad) bad.push(names[c]);
  }
  recording.channelTypes = types;
  if (missing.length > 0) warnings.push(`${path}: ${missing.length} listed channel${missing.length > 1 ? 's are' : ' is'} not in the recording (${missing.slice(0, 8).join(', ')}${missing.length > 8 ? ', …' : ''})`);
  const unlisted = names.filter((_, c) => !listed.has(c));
  if (unlisted.length > 0) warnings.push(`${path}: does not list ${unlisted.slice(0, 8).join(', ')}${unlisted.length > 8 ? ', …' : ''}; their types are read from the recording`);
}

/**
 * The recipe with the channels a channels file marks bad added to `signals.bad`, and left out of the recipe's own
 * `channels` and `rejection.channels` (a bad channel is left out everywhere). Returns the recipe unchanged when
 * nothing is bad. A recipe whose every named channel is bad throws CliInputError.
 */
export function withBadChannels(recipe: Recipe, bad: readonly string[], where: string): { recipe: Recipe; warnings: string[] } {
  if (bad.length === 0) return { recipe, warnings: [] };
  const isBad = new Set(bad);
  const warnings = [`${where}: ${bad.join(', ')} marked bad (status = bad) and left out`];
  const allBad = [...new Set([...(recipe.signals?.bad ?? []), ...bad])];
  const out: Recipe = { ...recipe, signals: { ...recipe.signals, bad: allBad } };
  if (recipe.channels !== undefined) {
    const kept = recipe.channels.filter((c) => !isBad.has(c));
    if (kept.length === 0) throw new CliInputError(where, `marks every channel the recipe names bad (${recipe.channels.join(', ')})`);
    out.channels = kept;
  }
  if (recipe.rejection?.channels !== undefined) {
    const kept = recipe.rejection.channels.filter((c) => !isBad.has(c));
    if (kept.length === 0) throw new CliInputError(where, `marks every channel of the recipe's rejection.channels bad (${recipe.rejection.channels.join(', ')})`);
    out.rejection = { ...recipe.rejection, channels: kept };
  }
  return { recipe: out, warnings };
}
