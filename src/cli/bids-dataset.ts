/**
 * Finding the recordings of a BIDS dataset (BIDS specification, "Common principles": a dataset's top folder holds
 * `dataset_description.json`; data sit in `sub-<label>/[ses-<label>/]<datatype>/`; file names are `_`-separated
 * `key-value` entities in a fixed order, then a suffix and an extension). Electrophysiology datatypes are `eeg`,
 * `ieeg` and `meg`; a recording's suffix is its datatype, and its events and channels sidecars share its entities
 * with the suffix `events` / `channels` and the extension `.tsv`.
 */
import { readdir, readFile, stat } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { CliInputError } from './io';

export const DATATYPES = ['eeg', 'ieeg', 'meg'] as const;
export type Datatype = (typeof DATATYPES)[number];

/** Extensions of recordings this version reads. */
export const READ_EXTENSIONS = new Set(['.edf']);
// Other recording extensions BIDS allows for these datatypes: found and listed as failed, never passed over silently.
const OTHER_EXTENSIONS = new Set(['.bdf', '.vhdr', '.set', '.fif', '.nwb', '.mefd', '.ds', '.con', '.sqd', '.pdf', '.mhd']);

export interface DatasetRecording {
  /** The file name without its extension, e.g. `sub-01_ses-a_task-rest_run-1_eeg`: names every output. */
  stem: string;
  datatype: Datatype;
  /** Entities in file order (`sub`, `ses`, `task`, `acq`, `run`, …) with their labels. */
  entities: Record<string, string>;
  /** Absolute paths. */
  path: string;
  events: string | null;
  channels: string | null;
  /** Path from the dataset's top folder, for messages and the manifest. */
  relativePath: string;
  /** Set when this version cannot read the file (its extension), so it fails alone with this reason. */
  unreadable: string | null;
}

export interface Dataset {
  root: string;
  /** `Name` from dataset_description.json, when it has one. */
  name: string | null;
  recordings: DatasetRecording[];
}

const ENTITY = /^([a-zA-Z]+)-([a-zA-Z0-9]+)$/;

/** Entities and suffix of a BIDS file name without extension; null when it is not one. */
export function parseBidsName(stem: string): { entities: Record<string, string>; suffix: string } | null {
  const parts = stem.split('_');
  if (parts.length < 2) return null;
  const suffix = parts.pop() as string;
  if (!/^[a-zA-Z0-9]+$/.test(suffix)) return null;
  const entities: Record<string, string> = {};
  for (const p of parts) {
    const m = ENTITY.exec(p);
    if (m === null || m[1] in entities) return null;
    entities[m[1]] = m[2];
  }
  if (!('sub' in entities)) return null;
  return { entities, suffix };
}

async function list(dir: string): Promise<{ name: string; dir: boolean }[]> {
  try {
    const entries = await readdir(dir, { withFileTypes: true });
    return entries.map((e) => ({ name: e.name, dir: e.isDirectory() })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  } catch {
    return [];
  }
}

/** Splits `name` at its extension, counting `.nii.gz`-style double extensions as one where BIDS uses them. */
function splitExtension(name: string): [string, string] {
  const dot = name.indexOf('.');
  return dot < 0 ? [name, ''] : [name.slice(0, dot), name.slice(dot).toLowerCase()];
}

/**
 * Reads the dataset at `root`: every recording of the eeg, ieeg and meg datatypes, each with its events and channels
 * sidecars when present, in subject, session, file-name order. Throws CliInputError (one line) when `root` is not a
 * BIDS dataset or holds no such recording.
 */
export async function readDataset(root: string): Promise<Dataset> {
  let info;
  try {
    info = await stat(root);
  } catch (e) {
    throw new CliInputError(root, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  if (!info.isDirectory()) throw new CliInputError(root, 'is not a folder; give the top folder of a BIDS dataset');
  let description: unknown;
  try {
    description = JSON.parse(await readFile(join(root, 'dataset_description.json'), 'utf8'));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new CliInputError(root, 'is not a BIDS dataset: it has no dataset_description.json at its top');
    throw new CliInputError(join(root, 'dataset_description.json'), `cannot be read as JSON (${code ?? (e as Error).message})`);
  }
  const name = typeof description === 'object' && description !== null && typeof (description as { Name?: unknown }).Name === 'string' ? (description as { Name: string }).Name : null;
  const recordings: DatasetRecording[] = [];
  for (const sub of await list(root)) {
    if (!sub.dir || !/^sub-[a-zA-Z0-9]+$/.test(sub.name)) continue;
    const subDir = join(root, sub.name);
    const sessionDirs = (await list(subDir)).filter((e) => e.dir && /^ses-[a-zA-Z0-9]+$/.test(e.name)).map((e) => join(subDir, e.name));
    for (const base of [subDir, ...sessionDirs]) {
      for (const datatype of DATATYPES) {
        const dir = join(base, datatype);
        const entries = await list(dir);
        const files = new Set(entries.map((e) => e.name));
        for (const entry of entries) {
          const [stem, ext] = splitExtension(entry.name);
          if (!READ_EXTENSIONS.has(ext) && !OTHER_EXTENSIONS.has(ext)) continue;
          const parsed = parseBidsName(stem);
          if (parsed === null || parsed.suffix !== datatype || `sub-${parsed.entities.sub}` !== sub.name) continue;
          const prefix = stem.slice(0, stem.length - datatype.length);
          const sidecar = (suffix: string) => (files.has(`${prefix}${suffix}.tsv`) ? join(dir, `${prefix}${suffix}.tsv`) : null);
          const path = join(dir, entry.name);
          recordings.push({
            stem,
            datatype,
            entities: parsed.entities,
            path,
            events: sidecar('events'),
            channels: sidecar('channels'),
            relativePath: relative(root, path),
            unreadable: READ_EXTENSIONS.has(ext)
              ? null
              : ext === '.bdf'
                ? 'BDF (24-bit) files are not read by this version; EDF is'
                : `"${ext}" recordings are not read by this version; EDF is`,
          });
        }
      }
    }
  }
  if (recordings.length === 0) throw new CliInputError(root, `holds no EEG, iEEG or MEG recording (sub-*/[ses-*/]{eeg,ieeg,meg}/*_{eeg,ieeg,meg}.edf)`);
  return { root, name, recordings };
}

/** The entity filters `batch` takes, by option name. */
export const FILTERS = { subject: 'sub', session: 'ses', task: 'task', run: 'run' } as const;
export type FilterOption = keyof typeof FILTERS;

/**
 * The recordings whose entities match every filter (each a comma-separated list of labels, with or without the
 * `sub-`/`ses-`/`task-`/`run-` prefix). A label no recording has throws CliInputError naming the option and the
 * labels there are; filters that each match but exclude one another throw too (no matching recordings).
 */
export function filterRecordings(recordings: readonly DatasetRecording[], filters: Partial<Record<FilterOption, string>>): DatasetRecording[] {
  let kept = recordings.slice();
  const used: string[] = [];
  for (const [option, entity] of Object.entries(FILTERS) as [FilterOption, string][]) {
    const value = filters[option];
    if (value === undefined) continue;
    const labels = value.split(',').map((v) => v.trim()).filter((v) => v !== '').map((v) => (v.startsWith(`${entity}-`) ? v.slice(entity.length + 1) : v));
    if (labels.length === 0) throw new CliInputError(`--${option}`, 'needs at least one label');
    const known = [...new Set(recordings.map((r) => r.entities[entity]).filter((v): v is string => v !== undefined))];
    // BIDS run indices are numbers: "1" and "01" name the same run.
    const same = (a: string, b: string) => a === b || (entity === 'run' && /^\d+$/.test(a) && /^\d+$/.test(b) && Number(a) === Number(b));
    for (const label of labels) {
      if (!known.some((k) => same(k, label))) {
        const list = known.length === 0 ? `no recording has a ${entity} entity` : `${entity} labels: ${known.slice(0, 12).join(', ')}${known.length > 12 ? ', …' : ''}`;
        throw new CliInputError(`--${option}`, `no recording has ${entity}-${label} (${list})`);
      }
    }
    kept = kept.filter((r) => r.entities[entity] !== undefined && labels.some((l) => same(r.entities[entity], l)));
    used.push(`--${option} ${value}`);
  }
  if (kept.length === 0) throw new CliInputError(used.join(' '), 'matches no recording (each filter names recordings, but none has them all)');
  return kept;
}
