// The one place that decides a request's client address. Forwarded headers are honoured only when the socket peer
// is a configured proxy; then X-Forwarded-For is read from the right, skipping further configured proxies, and the
// first address that is not one of them is the client (RFC 7239 section 5.2 describes the same right-to-left
// reading for `Forwarded`; X-Forwarded-For is the common-practice header of the same meaning).
import net from 'node:net';

/** "127.0.0.1, 10.0.0.5" → a Set of normalized addresses; throws naming the bad entry. */
export function parseTrustedProxies(raw = '') {
  const out = new Set();
  for (const entry of raw.split(',').map((s) => s.trim()).filter(Boolean)) {
    const address = normalizeAddress(entry);
    if (!net.isIP(address)) throw new Error(`TIDEMARK_TRUSTED_PROXIES: "${entry}" is not an IP address`);
    out.add(address);
  }
  return out;
}

/** IPv4-mapped IPv6 ("::ffff:127.0.0.1") reads as IPv4; brackets and a zone are dropped. */
export function normalizeAddress(address = '') {
  let a = String(address).trim();
  if (a.startsWith('[') && a.includes(']')) a = a.slice(1, a.indexOf(']'));
  if (a.toLowerCase().startsWith('::ffff:') && net.isIPv4(a.slice(7))) a = a.slice(7);
  return a.toLowerCase();
}

/**
 * The client address of a request whose socket peer is `socketAddress`, given the raw X-Forwarded-For header and
 * the trusted proxies.
 */
export function resolveClientAddress(socketAddress, forwardedFor, trusted) {
  const peer = normalizeAddress(socketAddress);
  if (!trusted.has(peer) || !forwardedFor) return peer;
  const hops = (Array.isArray(forwardedFor) ? forwardedFor.join(',') : forwardedFor)
    .split(',')
    .map((s) => normalizeAddress(s))
    .filter(Boolean);
  for (let i = hops.length - 1; i >= 0; i--) {
    if (!net.isIP(hops[i])) return peer; // a garbled chain: trust only what we saw
    if (!trusted.has(hops[i])) return hops[i];
  }
  return hops[0] ?? peer;
}

/** Headers that only a trusted proxy may set; removed from every other request before the app sees it. */
export const FORWARDED_HEADERS = ['x-forwarded-for', 'x-forwarded-host', 'x-forwarded-proto', 'x-forwarded-port', 'forwarded', 'x-real-ip'];
/** The header the app reads its client address from (src/lib/server/client-address.ts); a client's own copy is dropped. */
export const CLIENT_HEADER = 'x-tidemark-client';
