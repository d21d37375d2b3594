/**
 * The audit hash chain (its intent: 21 CFR Part 11 §11.10(e), secure, computer-generated, time-stamped audit trails
 * whose changes do not obscure what was recorded; not a claim of compliance): each audit event stores the SHA-256 (FIPS 180-4) of the previous event of the same team and
 * its own, so changing, removing or reordering a stored event breaks every later link of that team's chain. Site
 * events (no team) form one more chain. The hashed form is the RFC 8785 JSON Canonicalization Scheme (JCS, via the
 * `canonicalize` package by the RFC's author) of the fields below, so the verifier (`npm run audit:verify`,
 * scripts/audit-verify.ts) recomputes the same bytes from the stored row. Pure: no database access here.
 *
 * Limits (stated, not hidden): a chain proves that nothing inside it changed; the newest events of a chain could
 * still be cut off by someone with the database owner's rights. Copying the latest hash elsewhere (a printout, a
 * site log) closes that gap; the study page shows each chain's head for that reason.
 */
import { createHash, randomBytes } from 'node:crypto';
import canonicalize from 'canonicalize';

/** The previous hash of a chain's first event. */
export const CHAIN_GENESIS = '0'.repeat(64);

export interface ChainedFields {
  id: number;
  teamId: string | null;
  actorId: string | null;
  action: string;
  targetTable: string;
  targetId: string;
  detail: unknown;
  at: Date;
  prevHash: string;
}

/** The exact fields hashed, as a plain JSON value (`at` as ISO 8601 with milliseconds, UTC). */
export function chainedForm(e: ChainedFields): Record<string, unknown> {
  return {
    chain: 'tidemark-audit-1',
    id: e.id,
    teamId: e.teamId,
    actorId: e.actorId,
    action: e.action,
    targetTable: e.targetTable,
    targetId: e.targetId,
    detail: e.detail,
    at: e.at.toISOString(),
    prevHash: e.prevHash,
  };
}

export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

export function eventHash(e: ChainedFields): string {
  return sha256Hex(canonicalJson(chainedForm(e)));
}

/** RFC 8785 canonical JSON of a JSON value (throws on NaN/Infinity, which JSON cannot hold). */
export function canonicalJson(value: unknown): string {
  const text = canonicalize(value);
  if (text === undefined) throw new Error('cannot canonicalize an undefined value');
  return text;
}

/**
 * The canonical text `eventHash` hashes, with holes for values only PostgreSQL knows when it stores the event (its
 * id, time and previous hash, or a team id read in the same statement). `mark(name)` makes a hole's marker, to put in
 * place of the value in `chainedForm`; `pieces(form)` cuts the canonical text at the markers and returns the text
 * between them (one more piece than holes) and the hole names in text order; the caller puts each value's JSON text
 * (quotes included for a string) between the pieces. RFC 8785 orders members by name, whatever their values, so the
 * markers give the real text's pieces. Each call has its own random nonce in its markers, so no stored value can
 * look like one.
 */
export function holedText(): { mark: (name: string) => string; pieces: (form: Record<string, unknown>) => { pieces: string[]; holes: string[] } } {
  const nonce = randomBytes(12).toString('hex');
  const mark = (name: string): string => `\u0000${nonce}:${name}\u0000`;
  const pieces = (form: Record<string, unknown>) => {
    const text = canonicalJson(form);
    const marker = new RegExp(`"\\\\u0000${nonce}:([^"\\\\]+)\\\\u0000"`, 'g');
    const out: string[] = [];
    const holes: string[] = [];
    let from = 0;
    for (let m = marker.exec(text); m; m = marker.exec(text)) {
      out.push(text.slice(from, m.index));
      holes.push(m[1]);
      from = m.index + m[0].length;
    }
    out.push(text.slice(from));
    if (new Set(holes).size !== holes.length) throw new Error(`audit: a hole appears twice in the hashed text (${holes.join(', ')})`);
    return { pieces: out, holes };
  };
  return { mark, pieces };
}

/** What JSON (and so jsonb) keeps of a value: drops undefined, turns Dates into strings, NaN into null. */
export function asJsonValue<T>(value: T): T {
  return JSON.parse(JSON.stringify(value ?? {})) as T;
}

export interface ChainRow extends ChainedFields {
  hash: string | null;
  prevHash: string;
}

export type ChainBreak = { eventId: number; problem: string };

/**
 * Walks one chain's events (in id order) and returns the first broken link, or null. `prevHash`/`hash` null on an
 * event after the chain's start is itself a break.
 */
export function firstBreak(rows: Iterable<{ id: number; hash: string | null; prevHash: string | null } & Omit<ChainedFields, 'prevHash'>>): ChainBreak | null {
  let previous = CHAIN_GENESIS;
  for (const row of rows) {
    if (row.hash === null || row.prevHash === null) return { eventId: row.id, problem: 'has no hash although it was written after the chain started' };
    if (row.prevHash !== previous) {
      return { eventId: row.id, problem: `prev_hash ${row.prevHash.slice(0, 12)}… does not match the previous event's hash ${previous.slice(0, 12)}… (an event before it was changed, removed or inserted)` };
    }
    const computed = eventHash({ ...row, prevHash: row.prevHash });
    if (computed !== row.hash) return { eventId: row.id, problem: `stored hash ${row.hash.slice(0, 12)}… differs from the hash of its contents ${computed.slice(0, 12)}… (the row was edited)` };
    previous = row.hash;
  }
  return null;
}
