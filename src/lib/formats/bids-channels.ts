/**
 * Channels files as the open BIDS standard defines them (BIDS specification, modality-specific files for EEG, iEEG
 * and MEG, "Channels description (*_channels.tsv)": a tab-separated file whose first row names the columns; `name`
 * and `type` are required, `status` is `good`, `bad` or `n/a`; other columns may follow and are ignored here).
 * Types are the specification's upper-case codes (EEG, EOG, ECG, EMG, MEGMAG, SEEG, ECOG, TRIG, MISC, …).
 */
import type { ChannelType } from '../analysis/channel-types';
import { FormatError } from './format-error';

export interface BidsChannel {
  name: string;
  /** The file's type code, upper-cased, as written. */
  bidsType: string;
  /** Our channel type for that code (`other` for codes without a counterpart). */
  type: ChannelType;
  bad: boolean;
  /** 1-based line in the file (the header is row 1). */
  row: number;
}

export interface BidsChannelsResult {
  channels: BidsChannel[];
  warnings: string[];
}

// BIDS type codes → our channel types (BIDS specification, EEG/iEEG/MEG "Channels description" type tables).
const TYPES: Readonly<Record<string, ChannelType>> = {
  EEG: 'eeg',
  EOG: 'eog',
  HEOG: 'eog',
  VEOG: 'eog',
  ECG: 'ecg',
  EMG: 'emg',
  MEGMAG: 'meg-magnetometer',
  MEGGRADAXIAL: 'meg-gradiometer',
  MEGGRADPLANAR: 'meg-gradiometer',
  SEEG: 'intracranial',
  ECOG: 'intracranial',
  DBS: 'intracranial',
  TRIG: 'stimulus',
};
// Codes the specification lists that are neither brain signals nor stimulus lines: read as `other`, silently.
const OTHER = new Set([
  'MISC', 'RESP', 'TEMP', 'GSR', 'PPG', 'PUPIL', 'EYEGAZE', 'REF', 'AUDIO', 'ADC', 'DAC', 'SYSCLOCK', 'MEGOTHER',
  'MEGREFMAG', 'MEGREFGRADAXIAL', 'MEGREFGRADPLANAR', 'HLU', 'FITERR', 'PD',
]);

/** Parses a BIDS channels TSV. A missing column, a repeated name or an unknown status throws a FormatError naming the row. */
export function parseBidsChannels(text: string): BidsChannelsResult {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = body.split(/\r?\n/);
  while (lines.length > 0 && lines[lines.length - 1].trim() === '') lines.pop();
  if (lines.length === 0) throw new FormatError('header', 'is missing: the channels file is empty', { row: 1 });
  const header = lines[0].split('\t').map((h) => h.trim());
  if (header.length === 1 && lines[0].includes(',')) throw new FormatError('header', 'is not tab-separated (BIDS channels files use tabs)', { row: 1 });
  const nameAt = header.indexOf('name');
  const typeAt = header.indexOf('type');
  const statusAt = header.indexOf('status');
  if (nameAt < 0) throw new FormatError('header', 'has no "name" column, which BIDS requires', { row: 1 });
  if (typeAt < 0) throw new FormatError('header', 'has no "type" column, which BIDS requires', { row: 1 });
  const channels: BidsChannel[] = [];
  const warnings: string[] = [];
  const seen = new Map<string, number>();
  const unknown = new Set<string>();
  for (let i = 1; i < lines.length; i++) {
    const row = i + 1;
    if (lines[i].trim() === '') throw new FormatError('blank row', 'channel rows follow it; remove it or the rows after it', { row });
    const cells = lines[i].split('\t');
    if (cells.length !== header.length) throw new FormatError('row length', `${cells.length} cells, but the header names ${header.length} columns`, { row });
    const name = cells[nameAt].trim();
    if (name === '' || name === 'n/a') throw new FormatError('name', 'is empty; every channel needs its name', { row, column: 'name' });
    const before = seen.get(name);
    if (before !== undefined) throw new FormatError('name', `"${name}" is listed twice (rows ${before} and ${row})`, { row, column: 'name' });
    seen.set(name, row);
    const bidsType = cells[typeAt].trim().toUpperCase();
    let type = TYPES[bidsType];
    if (type === undefined) {
      if (!OTHER.has(bidsType)) unknown.add(bidsType);
      type = 'other';
    }
    const status = statusAt < 0 ? 'n/a' : cells[statusAt].trim().toLowerCase();
    if (!['good', 'bad', 'n/a', ''].includes(status)) {
      throw new FormatError('status', `${JSON.stringify(cells[statusAt].trim())} is not "good", "bad" or "n/a"`, { row, column: 'status' });
    }
    channels.push({ name, bidsType, type, bad: status === 'bad', row });
  }
  if (unknown.size > 0) warnings.push(`channel type${unknown.size > 1 ? 's' : ''} ${[...unknown].map((t) => `"${t}"`).join(', ')} not in the BIDS lists: read as "other"`);
  return { channels, warnings };
}
