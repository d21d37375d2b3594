/** A server time in UTC, to the second: `2026-03-01 14:05:09 UTC`. */
export const when = (iso: string) => new Date(iso).toISOString().replace('T', ' ').slice(0, 19) + ' UTC';
