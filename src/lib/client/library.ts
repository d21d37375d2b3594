/**
 * The local library: recordings this person opened, kept in this browser's IndexedDB (idb-keyval) and nowhere
 * else. Nothing here is ever synchronised or sent; the file name is stored because it stays on this device.
 */
import { clear, createStore, del, get, set, values, type UseStore } from 'idb-keyval';

export interface LibraryEntry {
  fingerprint: string;
  fileName: string;
  sizeBytes: number;
  /** ISO time the recording was last opened. */
  openedAt: string;
  kind: 'edf' | 'csv';
  /** CSV/TSV: how it was read, so it reopens the same way. */
  csv: { sampleRateHz: number; delimiter: ',' | '\t'; eventsFileName: string | null } | null;
  /** EDF: the reading choices it was opened with (unit factors, signals left out), applied again on reopening. */
  edf?: { unitFactors?: Record<string, number>; exclude?: string[] } | null;
  /** EDF: the BIDS events file opened with it, if any (its bytes are kept beside the recording's). */
  edfEventsFileName?: string | null;
}

interface StoredEntry extends LibraryEntry {
  blob: Blob;
  events: Blob | null;
}

export class LibraryFullError extends Error {
  constructor() {
    super("This browser's storage for Tidemark is full (QuotaExceededError): the recording is open, but it was not kept in the library. Remove recordings from the library to make room.");
    this.name = 'LibraryFullError';
  }
}

let store: UseStore | null = null;
const library = () => (store ??= createStore('tidemark-library', 'recordings'));

const isQuotaError = (error: unknown) =>
  error instanceof DOMException && (error.name === 'QuotaExceededError' || error.code === 22) ||
  (error instanceof Error && error.name === 'QuotaExceededError');

/** Keeps (or refreshes) a recording; throws LibraryFullError when the browser's quota is exceeded. */
export async function keepInLibrary(entry: LibraryEntry, blob: Blob, events: Blob | null = null): Promise<void> {
  const stored: StoredEntry = { ...entry, blob, events };
  try {
    await set(entry.fingerprint, stored, library());
  } catch (error) {
    if (isQuotaError(error)) throw new LibraryFullError();
    throw error;
  }
}

/** Every entry, most recently opened first, without reading any file's bytes. */
export async function listLibrary(): Promise<LibraryEntry[]> {
  const all = (await values<StoredEntry>(library())).map(({ blob: _b, events: _e, ...meta }) => meta);
  return all.sort((a, b) => b.openedAt.localeCompare(a.openedAt));
}

export async function getLibraryFile(fingerprint: string): Promise<{ entry: LibraryEntry; blob: Blob; events: Blob | null } | null> {
  const stored = await get<StoredEntry>(fingerprint, library());
  if (stored === undefined) return null;
  const { blob, events, ...entry } = stored;
  return { entry, blob, events };
}

export const removeFromLibrary = (fingerprint: string) => del(fingerprint, library());
export const clearLibrary = () => clear(library());

/** Usage and quota of this origin's storage in bytes (navigator.storage.estimate), or null when unknown. */
export async function storageEstimate(): Promise<{ usage: number; quota: number } | null> {
  if (typeof navigator === 'undefined' || !navigator.storage?.estimate) return null;
  const { usage, quota } = await navigator.storage.estimate();
  return usage === undefined || quota === undefined ? null : { usage, quota };
}
