// Serves the generated demo cohort (invented data, never a user's recording) from ./demo-data at /demo/<file>.
// Only plain names of files directly in that folder are served: no paths, no dot-files, no traversal. Any signed-in
// person may read them (invented demo data belongs to no team), so the route asks for sign-in only, not the matrix.
import fs from 'node:fs/promises';
import path from 'node:path';
import type { APIRoute } from 'astro';
import { json, requireUser, route } from '../lib/server/http';

const DEMO_DIR = path.resolve(process.cwd(), 'demo-data');
const SAFE_NAME = /^[a-z0-9][a-z0-9-]{0,80}\.(edf|json)$/;

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    requireUser(locals);
    const name = params.file ?? '';
    const missing = json({ error: { code: 'not_found', message: 'No such demo file.' } }, 404);
    if (!SAFE_NAME.test(name)) return missing;
    const file = path.join(DEMO_DIR, name);
    if (path.dirname(file) !== DEMO_DIR) return missing;
    let bytes: Buffer;
    try {
      const real = await fs.realpath(file);
      if (path.dirname(real) !== (await fs.realpath(DEMO_DIR))) return missing;
      bytes = await fs.readFile(real);
    } catch {
      return missing;
    }
    return new Response(new Uint8Array(bytes), {
      status: 200,
      headers: {
        'content-type': name.endsWith('.json') ? 'application/json; charset=utf-8' : 'application/octet-stream',
        'content-length': String(bytes.length),
        'cache-control': 'private, max-age=300',
      },
    });
  });
