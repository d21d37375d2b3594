/**
 * The local library: recordings a person opened, kept in this browser's IndexedDB (idb-keyval) and nowhere else.
 * Nothing here is ever synchronised or sent; the file name is stored because it stays on this device.
 *
 * Caution: each account has its own database (`libraryDatabaseName(userId)`), so two people who share a browser
 * profile never list, reopen or remove each other's recordings through the app. The browser itself does not separate
 * them (one origin owns all its databases); what protects a recording from the next person is removing it at
 * sign-out (src/lib/client/sign-out-forget.ts) and the expiry after `libraryDays`.
 */
import { clear, del, get, promisifyRequest, set, values, type UseStore } from 'idb-keyval';
import { libraryDatabaseName, LEGACY_SHARED_LIBRARY, LIBRARY_STORE } from './library-names';

export interface LibraryEntry {
  fingerprint: string;
  fileName: string;
  sizeBytes: number;
  /** ISO time the recording was last opened; the entry expires `libraryDays` after it. */
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

const isQuotaError = (error: unknown) =>
  error instanceof DOMException && (error.name === 'QuotaExceededError' || error.code === 22) ||
  (error instanceof Error && error.name === 'QuotaExceededError');

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * idb-keyval's createStore, plus: the connection closes itself when another page asks to delete or upgrade the
 * database ("versionchange", W3C Indexed Database API 3.0 §2.8). Without it, sign-out's deleteDatabase in this very
 * page would stay blocked by the library's own open connection until the page unloads.
 */
function closingStore(dbName: string, storeName: string): UseStore {
  let dbp: Promise<IDBDatabase> | undefined;
  const getDB = () => {
    if (dbp) return dbp;
    const request = indexedDB.open(dbName);
    request.onupgradeneeded = () => request.result.createObjectStore(storeName);
    const opening = promisifyRequest(request);
    dbp = opening;
    opening.then(
      (db) => {
        db.onversionchange = () => {
          db.close();
          if (dbp === opening) dbp = undefined;
        };
        db.onclose = () => {
          if (dbp === opening) dbp = undefined;
        };
      },
      () => {
        if (dbp === opening) dbp = undefined;
      },
    );
    return opening;
  };
  return (txMode, callback) => getDB().then((db) => callback(db.transaction(storeName, txMode).objectStore(storeName)));
}

export interface Library {
  /** Keeps (or refreshes) a recording; throws LibraryFullError when the browser's quota is exceeded. */
  keep(entry: LibraryEntry, blob: Blob, events?: Blob | null): Promise<void>;
  /** Every entry, most recently opened first, without reading any file's bytes. */
  list(): Promise<LibraryEntry[]>;
  /** The entry with its bytes, or null when it is not (or no longer) kept. */
  file(fingerprint: string): Promise<{ entry: LibraryEntry; blob: Blob; events: Blob | null } | null>;
  remove(fingerprint: string): Promise<void>;
  clear(): Promise<void>;
  /**
   * Removes every entry last opened more than `days` days before `now` and returns them (without bytes), oldest
   * first, so the page can say what expired.
   */
  expire(days: number, now?: number): Promise<LibraryEntry[]>;
}

const libraries = new Map<string, Library>();

/** The library of the signed-in account `userId` (one IndexedDB database per account). */
export function libraryFor(userId: string): Library {
  if (!userId) throw new Error('libraryFor() needs the signed-in user id.');
  let library = libraries.get(userId);
  if (library) return library;
  const store = closingStore(libraryDatabaseName(userId), LIBRARY_STORE);
  const meta = ({ blob: _b, events: _e, ...entry }: StoredEntry): LibraryEntry => entry;
  library = {
    async keep(entry, blob, events = null) {
      const stored: StoredEntry = { ...entry, blob, events };
      try {
        await set(entry.fingerprint, stored, store);
      } catch (error) {
        if (isQuotaError(error)) throw new LibraryFullError();
        throw error;
      }
    },
    async list() {
      const all = (await values<StoredEntry>(store)).map(meta);
      return all.sort((a, b) => b.openedAt.localeCompare(a.openedAt));
    },
    async file(fingerprint) {
      const stored = await get<StoredEntry>(fingerprint, store);
      if (stored === undefined) return null;
      return { entry: meta(stored), blob: stored.blob, events: stored.events };
    },
    remove: (fingerprint) => del(fingerprint, store),
    clear: () => clear(store),
    async expire(days, now = Date.now()) {
      if (!(days > 0)) throw new Error(`The library's expiry must be a positive number of days, not ${days}.`);
      const cutoff = now - days * DAY_MS;
      const expired = (await library!.list()).filter((e) => {
        const opened = Date.parse(e.openedAt);
        // An unreadable time cannot prove the entry is fresh: it expires too.
        return !(opened >= cutoff);
      });
      for (const e of expired) await del(e.fingerprint, store);
      return expired.reverse();
    },
  };
  libraries.set(userId, library);
  return library;
}

/**
 * Deletes the one library every account shared before libraries were per account, if this browser still has it.
 * Its entries belong to no known account, so no account may see them. Returns whether it held any recording.
 */
export async function removeSharedLegacyLibrary(): Promise<boolean> {
  if (typeof indexedDB === 'undefined' || typeof indexedDB.databases !== 'function') return false;
  const names = (await indexedDB.databases()).map((d) => d.name);
  if (!names.includes(LEGACY_SHARED_LIBRARY)) return false;
  let held = false;
  try {
    const legacy = closingStore(LEGACY_SHARED_LIBRARY, LIBRARY_STORE);
    held = (await values(legacy)).length > 0;
  } catch {
    // No such store: nothing was kept in it.
  }
  await promisifyRequest(indexedDB.deleteDatabase(LEGACY_SHARED_LIBRARY));
  return held;
}

/** Usage and quota of this origin's storage in bytes (navigator.storage.estimate), or null when unknown. */
export async function storageEstimate(): Promise<{ usage: number; quota: number } | null> {
  if (typeof navigator === 'undefined' || !navigator.storage?.estimate) return null;
  const { usage, quota } = await navigator.storage.estimate();
  return usage === undefined || quota === undefined ? null : { usage, quota };
}
