// One app process (server/main.mjs starts it, or several under node:cluster): serves the built app (dist/ or
// TIDEMARK_OUT_DIR) over Node's http module. Before Astro sees a request it: resolves the client address
// (server/forwarded.mjs) and hands it to the app in one header; strips forwarded headers a client sent itself; refuses
// a body whose declared Content-Length is over the cap (413, before reading it). It runs a mail outbox sender
// (server/mail-sender.mjs; several processes never send one message twice, the sender claims with SKIP LOCKED).
// On SIGTERM/SIGINT it stops accepting and stops the sender (the message being sent finishes; queued mail stays in
// the outbox for the next start), lets requests in flight finish (up to 10 s), closes the pool and exits.
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import send from 'send';
import { CLIENT_HEADER, FORWARDED_HEADERS, normalizeAddress, parseTrustedProxies, resolveClientAddress } from './forwarded.mjs';
import { contentSecurityPolicy, FIXED_SECURITY_HEADERS } from '../src/lib/server/security-policy.mjs';
import { startMailSender } from './mail-sender.mjs';

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
const outDir = path.resolve(root, process.env.TIDEMARK_OUT_DIR ?? 'dist');
const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 4321);
/** The largest body any route accepts (routes cap lower: forms 16 KiB, JSON 64 KiB unless they say otherwise). */
const MAX_BODY_BYTES = Number(process.env.TIDEMARK_MAX_BODY_BYTES ?? 1_048_576);
/** Bodies over the cap but at most this size are read (and dropped) before the 413, so the client sees it. */
const DRAIN_BYTES = 8 * 1024 * 1024;
/** The study page's batch import of summaries (many files of up to 1 MB each) has its own cap (IMPORT_CAPS). */
const IMPORT_BODY_BYTES = 16 * 1_048_576;
const IMPORT_PATH = /^\/api\/studies\/[^/?#]+\/summary-imports(?:[?#]|$)/;

let trusted;
try {
  trusted = parseTrustedProxies(process.env.TIDEMARK_TRUSTED_PROXIES ?? '');
} catch (error) {
  process.stderr.write(`tidemark: ${error.message}\n`);
  process.exit(1);
}

process.env.ASTRO_NODE_AUTOSTART = 'disabled';
// The adapter runs in middleware mode: `handler` renders routes only. Static files are served below, from a list
// made once at start, so an API request never costs a file-system lookup (the adapter's standalone mode looked each
// request up on disk before rendering it: about an eighth of the app's CPU under load).
const { handler } = await import(pathToFileURL(path.join(outDir, 'server', 'entry.mjs')).href);
const clientDir = path.join(outDir, 'client');
const staticFiles = listStaticFiles(clientDir);

/** URL paths of the built static files (public/ and the bundles), without dot-files (never served). */
function listStaticFiles(dir) {
  const out = new Set();
  const walk = (abs, url) => {
    let entries;
    try {
      entries = fs.readdirSync(abs, { withFileTypes: true });
    } catch {
      return;
    }
    for (const entry of entries) {
      if (entry.name.startsWith('.')) continue;
      if (entry.isDirectory()) walk(path.join(abs, entry.name), `${url}${entry.name}/`);
      else if (entry.isFile()) out.add(`${url}${entry.name}`);
    }
  };
  walk(dir, '/');
  return out;
}

/** Sends one built file (ranges, ETag and Last-Modified by `send`); hashed bundles are cached for a year. */
function serveStatic(req, res, pathname) {
  const stream = send(req, pathname, { root: clientDir, dotfiles: 'deny' });
  stream.on('headers', (response) => {
    if (pathname.startsWith('/_astro/')) response.setHeader('cache-control', 'public, max-age=31536000, immutable');
  });
  stream.on('error', (error) => {
    if (res.headersSent) return res.destroy();
    // An error answer must not carry the file's headers (a year of caching, its length, its validators).
    for (const name of res.getHeaderNames()) if (!BASE_HEADER_NAMES.has(name)) res.removeHeader(name);
    refuse(res, error.status ?? 500, error.status === 404 ? 'Not found.' : error.status === 416 ? 'The range asked for is not in the file.' : error.status === 412 ? 'The file has changed.' : 'The file could not be read.');
  });
  stream.pipe(res);
}

function refuse(res, status, message) {
  res.writeHead(status, { 'content-type': 'text/plain; charset=utf-8', connection: 'close', 'x-content-type-options': 'nosniff' });
  res.end(message);
}

// Static files (public/, the built scripts) never pass through Astro's middleware, nor do this wrapper's own
// refusals: they get the security headers here. Anything Astro renders sets its own (a page's CSP carries the hashes
// of its inline scripts), and Node lets those replace these (http.ServerResponse#writeHead merges, its own win).
const BASE_SECURITY_HEADERS = Object.entries({ ...FIXED_SECURITY_HEADERS, 'content-security-policy': contentSecurityPolicy() });
const BASE_HEADER_NAMES = new Set(BASE_SECURITY_HEADERS.map(([name]) => name.toLowerCase()));

const server = http.createServer((req, res) => {
  for (const [name, value] of BASE_SECURITY_HEADERS) res.setHeader(name, value);
  const peer = normalizeAddress(req.socket.remoteAddress);
  const client = resolveClientAddress(peer, req.headers['x-forwarded-for'], trusted);
  if (!trusted.has(peer)) for (const name of FORWARDED_HEADERS) delete req.headers[name];
  delete req.headers[CLIENT_HEADER];
  req.headers[CLIENT_HEADER] = client;
  // Astro reads the first X-Forwarded-For value for its own clientAddress: make it agree with ours.
  req.headers['x-forwarded-for'] = client;
  const declared = req.headers['content-length'];
  const cap = req.method === 'POST' && IMPORT_PATH.test(req.url ?? '') ? Math.max(MAX_BODY_BYTES, IMPORT_BODY_BYTES) : MAX_BODY_BYTES;
  if (declared !== undefined && !(Number(declared) <= cap)) {
    const message = `The request body is larger than ${cap} bytes.`;
    // A client still sending its body when the connection closes sees a reset, not the answer. A body up to a few
    // times the cap is read and dropped first so the 413 arrives; a larger one is answered at once and cut off.
    if (Number(declared) <= DRAIN_BYTES) {
      let answered = false;
      const answer = () => {
        if (answered) return;
        answered = true;
        refuse(res, 413, message);
      };
      req.on('end', answer);
      req.on('error', answer);
      req.resume();
    } else {
      refuse(res, 413, message);
      req.resume();
    }
    return;
  }
  const rawPath = (req.url ?? '/').split(/[?#]/, 1)[0];
  let pathname;
  try {
    pathname = decodeURI(rawPath);
  } catch {
    refuse(res, 400, 'Bad request: the address is not valid percent-encoding.');
    return;
  }
  // The list holds decoded names; send decodes the path itself, so it gets the path as it came.
  if ((req.method === 'GET' || req.method === 'HEAD') && staticFiles.has(pathname)) serveStatic(req, res, rawPath);
  else handler(req, res);
});
server.requestTimeout = 60_000;
server.headersTimeout = 20_000;
server.keepAliveTimeout = 5_000;

server.listen(port, host, () => {
  process.stdout.write(`tidemark: Server listening on http://${host}:${port}\n`);
});

// Mail queued before this start (a stop, a crash) goes out now; routes wake the sender after they queue more.
const mailSender = startMailSender();
globalThis.tidemarkWakeMailSender = () => mailSender.wake();

let closing = false;
function shutdown(signal) {
  if (closing) return;
  closing = true;
  process.stdout.write(`tidemark: ${signal}: finishing requests in flight, then stopping\n`);
  const force = setTimeout(() => process.exit(0), 10_000);
  force.unref();
  const senderStopped = mailSender.stop().then((waiting) => {
    process.stdout.write(`tidemark: mail outbox sender stopped${waiting === null ? '' : `; ${waiting} message(s) wait in the outbox for the next start`}\n`);
  });
  server.close(async () => {
    await senderStopped;
    // Then the database pool (src/db/client.ts registers how to close it), so PostgreSQL sees a clean goodbye.
    await globalThis.__closeTidemarkDatabasePool?.().catch(() => {});
    process.exit(0);
  });
  server.closeIdleConnections();
}
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
