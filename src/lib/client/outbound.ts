/**
 * Every request the workspace makes goes through `send`, which records what left this tab: method, path, time,
 * and the exact JSON text of the body. The Outbound screen lists the log so a person can check that nothing from
 * the recording was sent.
 *
 * Caution: `guardAgainst` registers strings that must never leave the device (a recording's file name and header
 * identification); a request whose path or body contains one, in any case or Unicode form, is refused before it is
 * sent. This is the visible log and a guard against our own mistakes; what stops any other script on the page from
 * sending data elsewhere is the Content-Security-Policy (src/lib/server/security-headers.ts).
 */
export interface OutboundEntry {
  id: number;
  method: string;
  path: string;
  /** ISO time the request was sent. */
  sentAt: string;
  /** The exact body text sent, or null for none. */
  body: string | null;
  status: number | null;
  /** Set when the request failed to reach the server or was refused on this device. */
  failure: string | null;
}

export class OutboundRefusedError extends Error {
  constructor(readonly path: string) {
    super(`Refused to send ${path}: the request would carry something that stays on this device.`);
    this.name = 'OutboundRefusedError';
  }
}

let nextId = 1;
let entries: readonly OutboundEntry[] = [];
const listeners = new Set<() => void>();
const guarded = new Map<string, Set<string>>();

function publish(next: readonly OutboundEntry[]) {
  entries = next;
  for (const l of listeners) l();
}

/** For useSyncExternalStore. */
export function subscribeOutbound(listener: () => void): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

export function outboundLog(): readonly OutboundEntry[] {
  return entries;
}

// EDF+ header subfields are space-separated and use X for "unknown" (Kemp & Olivan, 2003); "Startdate" is the
// recording field's fixed keyword, not identifying.
const NOT_IDENTIFYING = new Set(['startdate']);

const DEFAULT_IGNORABLE = /\p{Default_Ignorable_Code_Point}/gu;

/**
 * The form in which guarded strings and outgoing text are compared: Unicode's NFKC_Casefold mapping — default
 * ignorable code points removed (zero-width space and joiners, soft hyphen, word joiner, BOM, variation selectors),
 * compatibility normalization NFKC (Unicode Standard Annex #15), full case folding (Unicode Standard §3.13), NFKC
 * again. So "ＡＮＮ", "ann", "A\u200Bnn" and "Ａnn" all match a guarded "Ann", and "STRASSE" matches "Straße".
 * JavaScript has no case-folding function: upper- then lower-casing gives the same equivalence classes for the
 * full folding (ß → ss, ς → σ, ſ → s, ﬁ → fi); it also joins a few pairs folding keeps apart (dotless ı with i),
 * which can only refuse more, never send more. Lower-casing's one context rule (a word-final sigma) is undone.
 */
export function foldForMatching(text: string): string {
  return text
    .replace(DEFAULT_IGNORABLE, '')
    .normalize('NFKC')
    .toUpperCase()
    .toLowerCase()
    // toLowerCase writes a word-final sigma as ς (SpecialCasing's Final_Sigma); case folding maps ς to σ.
    .replace(/ς/g, 'σ')
    .normalize('NFKC')
    .replace(DEFAULT_IGNORABLE, '');
}

/**
 * Strings that no request may carry, grouped under `owner` so they can be replaced: each value whole, its JSON-escaped
 * form, and each of its space- or underscore-separated parts of at least 4 characters (a hospital code or a birth
 * date inside an EDF+ patient field is identifying on its own). They are kept folded (`foldForMatching`) and
 * matched against the folded request, so case, full-width forms, ligatures and zero-width characters do not hide them.
 */
export function guardAgainst(owner: string, values: readonly string[]): void {
  const set = new Set<string>();
  const add = (v: string) => {
    const t = foldForMatching(v).trim();
    if ([...t].length >= 4 && !NOT_IDENTIFYING.has(t)) set.add(t);
  };
  for (const value of values) {
    add(value);
    add(JSON.stringify(value.trim()).slice(1, -1));
    for (const part of value.split(/[\s_]+/)) add(part);
    // Folding can join or split words (a zero-width space between two names, a full-width space): split after it too.
    for (const part of foldForMatching(value).split(/[\s_]+/)) add(part);
  }
  guarded.set(owner, set);
}

function carriesGuarded(text: string): boolean {
  const folded = foldForMatching(text);
  for (const set of guarded.values()) for (const v of set) if (folded.includes(v)) return true;
  return false;
}

export interface SendOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Serialised with JSON.stringify; exactly that text is sent and logged. */
  json?: unknown;
  signal?: AbortSignal;
  /**
   * What the log shows in place of the body, for a body that must not be displayed (the sign-in-again dialog's
   * password). The guard still checks the real body.
   */
  logBodyAs?: string;
}

/** fetch() for same-origin paths, logged. Rejects with OutboundRefusedError before sending a guarded string. */
export async function send(path: string, options: SendOptions = {}): Promise<Response> {
  if (!path.startsWith('/')) throw new Error(`send() takes a same-origin path, not ${path}`);
  const method = options.method ?? (options.json === undefined ? 'GET' : 'POST');
  const body = options.json === undefined ? null : JSON.stringify(options.json);
  const entry: OutboundEntry = { id: nextId++, method, path, sentAt: new Date().toISOString(), body: body === null ? null : (options.logBodyAs ?? body), status: null, failure: null };
  let decodedPath = path;
  try {
    decodedPath = decodeURIComponent(path);
  } catch {
    // A malformed escape: check the raw text only.
  }
  if (carriesGuarded(path) || carriesGuarded(decodedPath) || (body !== null && carriesGuarded(body))) {
    publish([...entries, { ...entry, body: null, failure: 'refused on this device: it carried a local-only string (not sent)' }]);
    throw new OutboundRefusedError(path);
  }
  publish([...entries, entry]);
  const update = (patch: Partial<OutboundEntry>) => publish(entries.map((e) => (e.id === entry.id ? { ...e, ...patch } : e)));
  try {
    const response = await fetch(path, {
      method,
      body,
      headers: body === null ? { accept: 'application/json' } : { 'content-type': 'application/json', accept: 'application/json' },
      credentials: 'same-origin',
      signal: options.signal,
    });
    update({ status: response.status });
    return response;
  } catch (error) {
    update({ failure: error instanceof Error ? error.message : String(error) });
    throw error;
  }
}

/** Reads an API error body `{ error: { message } }`, falling back to the status line. */
export async function errorMessageOf(response: Response): Promise<string> {
  try {
    const body = (await response.json()) as { error?: { message?: string } };
    if (body.error?.message) return body.error.message;
  } catch {
    // Not JSON.
  }
  return `The server answered ${response.status} ${response.statusText}.`;
}
