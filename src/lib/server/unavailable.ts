/**
 * What a request gets while the database cannot be reached: 503 with Retry-After, as JSON for the API and as a plain
 * page for people. The recording and the analysis live in the browser, so nothing local is at risk: the page says so.
 */
export const RETRY_AFTER_SECONDS = 5;

export function databaseUnavailable(url: URL): Response {
  const headers = { 'retry-after': String(RETRY_AFTER_SECONDS), 'cache-control': 'no-store' };
  if (url.pathname.startsWith('/api/')) {
    return new Response(
      JSON.stringify({ error: { code: 'database_unavailable', message: "The server's database is unavailable right now; nothing was changed. Your local work is safe. Try again in a few seconds." } }),
      { status: 503, headers: { ...headers, 'content-type': 'application/json; charset=utf-8' } },
    );
  }
  return new Response(
    `<!doctype html><html lang="en"><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Unavailable · Tidemark</title>` +
      `<body style="font-family:sans-serif;background:#f5f0e6;color:#10283a;padding:3rem;max-width:40rem">` +
      `<h1>The server's database is unavailable</h1>` +
      `<p data-testid="database-unavailable">Tidemark cannot reach its database right now. Your local work is safe: recordings and analyses open in other tabs stay in your browser. Reload this page in a few seconds.</p>` +
      `<p>Research tool, not a medical device.</p></body></html>`,
    { status: 503, headers: { ...headers, 'content-type': 'text/html; charset=utf-8' } },
  );
}
