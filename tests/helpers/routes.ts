// The app's routes as the file system defines them (Astro's file-based routing) and the HTTP methods each answers.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const repoRootDir = fileURLToPath(new URL('../../', import.meta.url));
const HTTP_METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS', 'HEAD', 'ALL'];

/** The methods an endpoint file exports (`export const POST`, `export async function GET`, `export { x as PUT }`). */
export function endpointMethods(file: string): string[] {
  const source = fs.readFileSync(file, 'utf8');
  const found = new Set<string>();
  for (const re of [/export\s+(?:const|let|var)\s+([A-Z]+)\b/g, /export\s+(?:async\s+)?function\s+([A-Z]+)\b/g]) {
    for (const m of source.matchAll(re)) if (HTTP_METHODS.includes(m[1])) found.add(m[1]);
  }
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(',')) {
      const name = part.trim().split(/\s+as\s+/).pop()!.trim();
      if (HTTP_METHODS.includes(name)) found.add(name);
    }
  }
  return [...found].sort();
}

/** JSON endpoints under src/pages/api: pattern (e.g. /api/studies/[studyId]) and the methods the file exports. */
export function apiEndpoints(): { pattern: string; methods: string[] }[] {
  const dir = path.join(repoRootDir, 'src', 'pages', 'api');
  const out: { pattern: string; methods: string[] }[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      if (e.name.startsWith('_') || e.name.startsWith('.')) continue;
      const full = path.join(d, e.name);
      if (e.isDirectory()) walk(full);
      else if (e.name.endsWith('.ts')) {
        const rel = path.relative(path.join(repoRootDir, 'src', 'pages'), full).replace(/\\/g, '/').replace(/\.ts$/, '');
        out.push({ pattern: `/${rel}`.replace(/\/index$/, ''), methods: endpointMethods(full) });
      }
    }
  };
  walk(dir);
  return out.sort((a, b) => a.pattern.localeCompare(b.pattern));
}
