import type { APIContext } from 'astro';
import type { z } from 'zod';
import { can, refusalWords, type Action, type Role } from '../permissions';
import { isDatabaseUnavailable } from '../../db/client';

export interface ErrorBody {
  error: { code: string; message: string; issues?: { path: string; message: string }[] };
}

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly issues?: { path: string; message: string }[],
  ) {
    super(message);
  }
}

export function json(body: unknown, status = 200): Response {
  return jsonText(JSON.stringify(body), status);
}

/** A JSON answer already written as text (a route that splices stored JSON in as it is). */
export function jsonText(text: string, status = 200): Response {
  return new Response(text, { status, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
}

/** Runs an API handler, mapping HttpError to `{ error: { code, message, issues? } }`; other errors to a bare 500. */
export async function route(ctx: APIContext, handler: (ctx: APIContext) => Promise<Response>): Promise<Response> {
  try {
    return await handler(ctx);
  } catch (error) {
    if (error instanceof HttpError) {
      const body: ErrorBody = { error: { code: error.code, message: error.message, ...(error.issues ? { issues: error.issues } : {}) } };
      return json(body, error.status);
    }
    // The middleware answers these for every route alike (503 with Retry-After).
    if (isDatabaseUnavailable(error)) throw error;
    console.error(`[tidemark] ${ctx.request.method} ${ctx.url.pathname}:`, error);
    return json({ error: { code: 'internal', message: 'Something went wrong on the server; nothing was changed.' } }, 500);
  }
}

export function requireUser(locals: App.Locals): NonNullable<App.Locals['user']> {
  if (!locals.user) throw new HttpError(401, 'unauthenticated', 'Sign in first.');
  return locals.user;
}

export function notFound(what = 'That'): never {
  throw new HttpError(404, 'not_found', `${what} was not found.`);
}

export function requirePermission(role: Role | null | undefined, action: Action): void {
  if (!can(role, action)) throw new HttpError(403, 'forbidden', `${refusalWords(role, action)} Nothing was changed.`);
}

export function issuesOf(error: z.ZodError): { path: string; message: string }[] {
  return error.issues.map((i) => ({ path: i.path.join('.') || '(body)', message: i.message }));
}

/**
 * Reads a request body as text, refusing it before reading when its declared Content-Length is over `maxBytes` and
 * counting bytes as they stream in when it declares none (chunked): the read stops at the first byte over the cap.
 */
export async function readBodyText(request: Request, maxBytes: number): Promise<string> {
  const tooLarge = () => new HttpError(413, 'too_large', `The body is larger than ${maxBytes} bytes.`);
  const declared = request.headers.get('content-length');
  if (declared !== null && !(Number(declared) <= maxBytes)) throw tooLarge();
  if (!request.body) return '';
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw tooLarge();
    }
    chunks.push(value);
  }
  const all = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    all.set(c, at);
    at += c.byteLength;
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(all);
  } catch {
    throw new HttpError(400, 'bad_encoding', 'The body is not valid UTF-8.');
  }
}

/** Parses a JSON body against a zod schema; 413 when too large (before or while reading), 400 with every issue's path when invalid. */
export async function parseJson<T extends z.ZodType>(request: Request, schema: T, { maxBytes = 65_536 } = {}): Promise<z.infer<T>> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('application/json')) throw new HttpError(415, 'unsupported_media_type', 'Send the body as application/json.');
  const text = await readBodyText(request, maxBytes);
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch {
    throw new HttpError(400, 'bad_json', 'The body is not valid JSON.');
  }
  const nul = nulPath(data, '');
  if (nul !== null) {
    const issues = [{ path: nul || '(body)', message: 'Text may not contain the NUL character (U+0000).' }];
    throw new HttpError(400, 'invalid', `${issues[0].path}: ${issues[0].message}`, issues);
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) {
    const issues = issuesOf(parsed.error);
    throw new HttpError(400, 'invalid', issues.map((i) => `${i.path}: ${i.message}`).join('; '), issues);
  }
  return parsed.data;
}

/**
 * The path of the first string (value or key) holding U+0000, else null. PostgreSQL's text type cannot store NUL
 * (PostgreSQL docs, "Character Types"), so such input is refused as input, not left to fail as a server error.
 */
export function nulPath(value: unknown, path: string): string | null {
  // Walked with an explicit stack, not recursion, and paths are built only for the hit: a body of 10,000 nested
  // arrays fits in a 64 KiB cap and would otherwise overflow the call stack (a 500) or build megabytes of paths.
  // Entries are pushed in reverse so the first NUL in document order (a key before its value) is the one named.
  const nodes: { parent: number; key: string }[] = [{ parent: -1, key: path }];
  const pathOf = (node: number): string => {
    const keys: string[] = [];
    for (let n = node; n >= 0; n = nodes[n].parent) if (nodes[n].key !== '') keys.push(nodes[n].key);
    return keys.reverse().join('.');
  };
  const stack: { value: unknown; node: number; badKey: boolean }[] = [{ value, node: 0, badKey: false }];
  while (stack.length > 0) {
    const { value: v, node, badKey } = stack.pop()!;
    if (badKey || (typeof v === 'string' && v.includes('\u0000'))) return pathOf(node);
    const entries: [string, unknown][] = Array.isArray(v) ? v.map((x, i) => [String(i), x]) : v && typeof v === 'object' ? Object.entries(v) : [];
    for (let i = entries.length - 1; i >= 0; i--) {
      nodes.push({ parent: node, key: entries[i][0] });
      stack.push({ value: entries[i][1], node: nodes.length - 1, badKey: !Array.isArray(v) && entries[i][0].includes('\u0000') });
    }
  }
  return null;
}

export type FormResult<T> =
  | { ok: true; data: T }
  /** `values`: what was posted, so a page can show the form again as the person filled it in. */
  | { ok: false; message: string; fields: Record<string, string>; status?: number; values?: Record<string, string> };

/** The largest form post a page accepts (forms here carry a few short fields; no page takes an upload). */
export const MAX_FORM_BYTES = 16_384;

/**
 * Reads a urlencoded form post (capped at MAX_FORM_BYTES, counted while streaming) and validates it; a malformed
 * post (another content type, multipart included, too large, unreadable) is reported, not thrown.
 */
export async function readForm<T extends z.ZodType>(request: Request, schema: T): Promise<FormResult<z.infer<T>>> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.includes('application/x-www-form-urlencoded')) {
    return { ok: false, message: 'The form could not be read (unexpected content type). Nothing was changed.', fields: {} };
  }
  let form: URLSearchParams;
  try {
    form = new URLSearchParams(await readBodyText(request, MAX_FORM_BYTES));
  } catch (error) {
    const tooLarge = error instanceof HttpError && error.status === 413;
    return { ok: false, message: tooLarge ? `The form is larger than ${MAX_FORM_BYTES} bytes. Nothing was changed.` : 'The form could not be read. Nothing was changed.', fields: {}, status: tooLarge ? 413 : 400 };
  }
  const raw: Record<string, string> = {};
  // An absent field reads as empty, so it earns the field's own message ("Enter your password.").
  if ('shape' in schema && schema.shape && typeof schema.shape === 'object') for (const k of Object.keys(schema.shape)) raw[k] = '';
  for (const [k, v] of form.entries()) raw[k] = v;
  const nul = nulPath(raw, '');
  if (nul !== null) return { ok: false, message: 'Please correct the marked fields. Nothing was changed.', fields: { [nul]: 'Text may not contain the NUL character.' }, values: raw };
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, data: parsed.data };
  const fields: Record<string, string> = {};
  for (const issue of parsed.error.issues) {
    const key = String(issue.path[0] ?? 'form');
    fields[key] ??= issue.message;
  }
  return { ok: false, message: 'Please correct the marked fields. Nothing was changed.', fields, values: raw };
}
