// Talks to the built app that scripts/test.mjs serves (TIDEMARK_APP_URL) the way a browser would: form posts with
// an Origin header, cookies kept per client, redirects not followed so tests can assert them.
import pg from 'pg';

export const appUrl = process.env.TIDEMARK_APP_URL ?? '';
if (!appUrl) throw new Error('TIDEMARK_APP_URL is not set: run integration tests through `npm test`.');

export const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 3 });

export class Client {
  cookies = new Map<string, string>();
  lastSetCookie: string[] = [];

  /** `base`: another instance of the app (tests/helpers/instance.ts), else the one npm test serves. */
  constructor(readonly base = appUrl) {}

  async request(path: string, init: RequestInit & { form?: Record<string, string>; json?: unknown } = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    headers.set('origin', headers.get('origin') ?? this.base);
    if (this.cookies.size) headers.set('cookie', [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; '));
    let body = init.body;
    if (init.form) {
      headers.set('content-type', 'application/x-www-form-urlencoded');
      body = new URLSearchParams(init.form).toString();
    } else if (init.json !== undefined) {
      headers.set('content-type', 'application/json');
      body = JSON.stringify(init.json);
    }
    const response = await fetch(this.base + path, { ...init, headers, body, redirect: 'manual' });
    this.lastSetCookie = response.headers.getSetCookie();
    for (const line of this.lastSetCookie) {
      const [pair] = line.split(';');
      const i = pair.indexOf('=');
      const name = pair.slice(0, i).trim();
      const value = pair.slice(i + 1).trim();
      if (value === '' || /max-age=0/i.test(line)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    return response;
  }

  post(path: string, form: Record<string, string>, headers: Record<string, string> = {}) {
    return this.request(path, { method: 'POST', form, headers });
  }

  async signIn(email: string, password: string): Promise<Response> {
    return this.post('/sign-in', { email, password });
  }
}

/** Waits for the mail fake to store a message to `to` newer than `sinceId`; returns its text. */
/**
 * The newest mail to `to` after `sinceId` (holding `containing`, when given). Mail leaves through the outbox, so a
 * message caused earlier may arrive after `sinceId` was read: name what the awaited one holds where that matters.
 */
export async function waitForMail(to: string, sinceId = 0, timeoutMs = 10_000, containing = ''): Promise<{ id: number; subject: string; text: string }> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const { rows } = await pool.query(
      "SELECT id, subject, text_body FROM mail_messages WHERE to_addresses ILIKE $1 AND id > $2 AND position($3 in coalesce(text_body, '')) > 0 ORDER BY id DESC LIMIT 1",
      [`%${to}%`, sinceId, containing],
    );
    if (rows[0]) return { id: Number(rows[0].id), subject: rows[0].subject, text: rows[0].text_body };
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to} arrived within ${timeoutMs} ms`);
}

export async function latestMailId(): Promise<number> {
  const { rows } = await pool.query('SELECT coalesce(max(id), 0) AS id FROM mail_messages');
  return Number(rows[0].id);
}

export function linkIn(text: string, pathPrefix: string): string {
  const match = new RegExp(`https?://[^\\s]+${pathPrefix}[^\\s]+`).exec(text);
  if (!match) throw new Error(`no ${pathPrefix} link in: ${text}`);
  return new URL(match[0]).pathname;
}

export function unique(prefix: string): string {
  return `${prefix}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;
}
