// Names of the local library's IndexedDB databases, shared by the library (library.ts) and the sign-out script
// (sign-out-forget.ts), which must find this account's database without loading the library.

/** The object store inside each library database. */
export const LIBRARY_STORE = 'recordings';

/** The database every account shared before libraries were per account; removed wherever it is found. */
export const LEGACY_SHARED_LIBRARY = 'tidemark-library';

const PREFIX = 'tidemark-library:';

/** The database holding the recordings of account `userId` (and only that account's). */
export function libraryDatabaseName(userId: string): string {
  return `${PREFIX}${userId}`;
}
