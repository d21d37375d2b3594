/**
 * The server's settings, read from the environment once. `npm start`/`npm test` set them for the local demo;
 * `npm run serve` checks the production ones before it starts (scripts/serve.mjs names any missing or unsafe one).
 */
function positive(name: string, fallback: number, unit: 'minutes' | 'days'): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const value = Number(raw);
  if (!Number.isFinite(value) || value <= 0) throw new Error(`${name} must be a positive number of ${unit}, not "${raw}"`);
  return value;
}

export const settings = {
  /** A session ends after this long without a request (default 60 minutes). */
  sessionIdleMinutes: positive('TIDEMARK_SESSION_IDLE_MINUTES', 60, 'minutes'),
  /** A session ends this long after sign-in, however busy (default 12 hours). */
  sessionAbsoluteMinutes: positive('TIDEMARK_SESSION_ABSOLUTE_MINUTES', 12 * 60, 'minutes'),
  /** Recordings kept in a browser's local library expire after this many days (sent to the page). */
  libraryDays: positive('TIDEMARK_LIBRARY_DAYS', 30, 'days'),
};
