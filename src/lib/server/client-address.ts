/**
 * The client address of a request, as server/main.mjs resolved it (forwarded headers count only from the configured
 * proxies, TIDEMARK_TRUSTED_PROXIES). Nothing else in the app reads a forwarded header. Without the wrapper (the
 * built entry started on its own) the address is unknown and every such request shares one rate-limit bucket.
 */
const CLIENT_HEADER = 'x-tidemark-client';

export function clientAddress(request: Request): string {
  return request.headers.get(CLIENT_HEADER) ?? 'unknown';
}
