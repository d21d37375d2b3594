/**
 * Whether the session cookie carries `Secure`: always outside local development. Local development is plain http on a
 * loopback address (the browser would drop a Secure cookie there). A deployment behind a proxy that talks to the app
 * over loopback sets TIDEMARK_SECURE_COOKIES=always so the cookie stays Secure whatever the request URL says.
 */
export function cookieIsSecure(url: URL, mode = process.env.TIDEMARK_SECURE_COOKIES ?? 'auto'): boolean {
  if (mode === 'always') return true;
  if (url.protocol === 'https:') return true;
  return !isLoopbackHost(url.hostname);
}

export function isLoopbackHost(address: string): boolean {
  const host = address.startsWith('::ffff:') ? address.slice(7) : address;
  return host === 'localhost' || host === '[::1]' || host === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(host);
}

/**
 * A same-origin path to go to after sign-in, or '/' when `next` is absent or could leave the site (`//host`,
 * `/\\host`, which browsers read as `//host`, control characters, or anything that resolves to another origin).
 */
export function safeNextPath(next: string | null, origin: string): string {
  if (!next || !next.startsWith('/') || /[\\\u0000-\u001f]/.test(next)) return '/';
  try {
    const resolved = new URL(next, origin);
    return resolved.origin === origin ? resolved.pathname + resolved.search + resolved.hash : '/';
  } catch {
    return '/';
  }
}
