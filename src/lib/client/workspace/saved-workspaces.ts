// The workspace saved in this browser, per account and per recording fingerprint (IndexedDB through idb-keyval).
// Only the edits are stored (edits.ts): recipe, conditions, keep/reject decisions, channel choices, bands, view.
// Never samples: the recording itself is kept, if at all, by the local library (library.ts).
import { del, get, set, type UseStore } from 'idb-keyval';
import type { WorkspaceEdits } from './edits';
import { workspaceDatabaseName, WORKSPACE_STORE } from './saved-names';

export interface SavedWorkspace {
  format: 1;
  /** ISO 8601 time of the save. */
  savedAt: string;
  edits: WorkspaceEdits;
}

/** Where saved workspaces go; the browser's is IndexedDB, tests pass a Map. */
export interface WorkspaceShelf {
  load(fingerprint: string): Promise<SavedWorkspace | undefined>;
  save(fingerprint: string, saved: SavedWorkspace): Promise<void>;
  forget(fingerprint: string): Promise<void>;
}

/**
 * An idb-keyval store that opens the database for each call and closes it after: a connection left open would
 * block the sign-out script's deleteDatabase (sign-out-forget.ts).
 */
function shortLivedStore(dbName: string, storeName: string): UseStore {
  return (txMode, callback) =>
    new Promise((resolve, reject) => {
      const request = indexedDB.open(dbName);
      request.onupgradeneeded = () => request.result.createObjectStore(storeName);
      request.onerror = () => reject(request.error ?? new Error(`could not open ${dbName}`));
      request.onsuccess = () => {
        const db = request.result;
        db.onversionchange = () => db.close();
        let out: unknown;
        try {
          const tx = db.transaction(storeName, txMode);
          // Listeners, not on… properties: idb-keyval's own promisifyRequest(transaction) sets those.
          tx.addEventListener('complete', () => {
            db.close();
            resolve(out as never);
          });
          const failed = () => {
            db.close();
            reject(tx.error ?? new Error('the browser refused the change'));
          };
          tx.addEventListener('error', failed);
          tx.addEventListener('abort', failed);
          Promise.resolve(callback(tx.objectStore(storeName))).then((v) => (out = v), reject);
        } catch (error) {
          db.close();
          reject(error);
        }
      };
    });
}

/** The account's shelf in this browser's IndexedDB (`tidemark-workspace:<user id>`). */
export function browserShelf(userId: string): WorkspaceShelf {
  const store = shortLivedStore(workspaceDatabaseName(userId), WORKSPACE_STORE);
  return {
    load: (fingerprint) => get<SavedWorkspace>(fingerprint, store),
    save: (fingerprint, saved) => set(fingerprint, saved, store),
    forget: (fingerprint) => del(fingerprint, store),
  };
}

/** A shelf in memory (tests, and browsers without IndexedDB). */
export function memoryShelf(map: Map<string, SavedWorkspace> = new Map()): WorkspaceShelf & { map: Map<string, SavedWorkspace> } {
  return {
    map,
    load: async (fingerprint) => structuredClone(map.get(fingerprint)),
    save: async (fingerprint, saved) => void map.set(fingerprint, structuredClone(saved)),
    forget: async (fingerprint) => void map.delete(fingerprint),
  };
}
