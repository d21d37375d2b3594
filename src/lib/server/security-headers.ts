/**
 * Security headers on every response the app renders (pages, API routes, redirects, errors). The Content-Security-
 * Policy is what makes "the recording never leaves the device" hold in the browser: scripts, workers, fetches,
 * beacons, images and form posts may reach this origin only, whatever a script on the page tries. Inline scripts
 * Astro writes into a page (island bootstrapping) are allowed by their SHA-256 hash, computed here per page
 * (CSP Level 3, "hash-source"); nothing may use eval.
 */
import { createHash } from 'node:crypto';
import { contentSecurityPolicy, FIXED_SECURITY_HEADERS } from './security-policy.mjs';

const PRODUCTION = import.meta.env.TIDEMARK_PRODUCTION === true;

const fixed: Record<string, string> = FIXED_SECURITY_HEADERS;

export { contentSecurityPolicy };

const hashCache = new Map<string, string>();
function hashOf(script: string): string {
  let h = hashCache.get(script);
  if (!h) {
    h = `sha256-${createHash('sha256').update(script, 'utf8').digest('base64')}`;
    if (hashCache.size < 500) hashCache.set(script, h);
  }
  return h;
}

/** SHA-256 sources of every inline classic or module script (no `src`) in an HTML document. */
export function inlineScriptHashes(html: string): string[] {
  const hashes = new Set<string>();
  const re = /<script\b([^>]*)>([\s\S]*?)<\/script>/gi;
  for (let m = re.exec(html); m; m = re.exec(html)) {
    if (/\bsrc\s*=/i.test(m[1]) || /type\s*=\s*["']?application\/(ld\+)?json/i.test(m[1])) continue;
    if (m[2].length > 0) hashes.add(hashOf(m[2]));
  }
  return [...hashes];
}

/** Returns `response` with every security header set (a copy when its headers are immutable). */
export async function withSecurityHeaders(response: Response): Promise<Response> {
  let out = response;
  let hashes: string[] = [];
  const type = response.headers.get('content-type') ?? '';
  if (type.includes('text/html') && response.body) {
    const html = await response.text();
    hashes = inlineScriptHashes(html);
    out = new Response(html, { status: response.status, statusText: response.statusText, headers: response.headers });
  }
  try {
    setAll(out.headers, hashes);
  } catch {
    // Response.redirect() and some error responses carry immutable headers: copy.
    out = new Response(out.body, { status: out.status, statusText: out.statusText, headers: new Headers(out.headers) });
    setAll(out.headers, hashes);
  }
  return out;
}

function setAll(headers: Headers, hashes: string[]): void {
  for (const [k, v] of Object.entries(fixed)) headers.set(k, v);
  headers.set('content-security-policy', contentSecurityPolicy(hashes));
  if (PRODUCTION) headers.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
}

export const SECURITY_HEADER_NAMES = [...Object.keys(fixed), 'content-security-policy'];
