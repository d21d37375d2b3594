/**
 * Cross-site request refusal for every state-changing request (POST, PUT, PATCH, DELETE), pages and API alike.
 * Our pages send `Referrer-Policy: no-referrer`, under which browsers send `Origin: null` even on same-origin
 * form posts (Fetch standard, "serializing a request origin"), so an Origin comparison alone would refuse our own
 * forms. The browser's Fetch Metadata header `Sec-Fetch-Site` (W3C Fetch Metadata Request Headers) says whether the
 * request came from our own pages; it is checked first, then `Origin`. A request with neither (a command-line
 * client) carries no ambient browser credentials worth forging and is let through to the route's own checks.
 */
const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

export function crossSiteRefusal(request: Request, ownOrigin: string): string | null {
  if (!UNSAFE.has(request.method)) return null;
  const site = request.headers.get('sec-fetch-site');
  const origin = request.headers.get('origin');
  if (site !== null) {
    if (site === 'same-origin') return origin && origin !== 'null' && origin !== ownOrigin ? `Origin ${origin} is not this site` : null;
    return `a ${site} request may not change anything here`;
  }
  if (origin !== null && origin !== ownOrigin) return `Origin ${origin} is not this site`;
  return null;
}
