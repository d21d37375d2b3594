// The page's Content-Security-Policy has no 'unsafe-eval' (W3C CSP Level 3), and zod probes `new Function("")` when an
// object schema is built unless it is configured jitless. src/lib/analysis/zod.ts configures it once; a schema built
// from a bare 'zod' import elsewhere could run before that and raise a CSP violation in the browser
// (tests/browser/csp.test.ts sees any), so every value import of zod must go through that module.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { z } from '../../../../src/lib/analysis/zod';

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? files(full) : /\.(ts|tsx|astro)$/.test(name) ? [full] : [];
  });
}

describe('zod in the app', () => {
  it('is imported for values only through src/lib/analysis/zod.ts (type-only imports may name zod)', () => {
    const offenders = files(path.resolve('src'))
      .filter((f) => !f.endsWith(path.join('lib', 'analysis', 'zod.ts')))
      .flatMap((f) =>
        readFileSync(f, 'utf8')
          .split('\n')
          .map((line, i) => ({ line, at: `${path.relative(process.cwd(), f)}:${i + 1}` }))
          .filter(({ line }) => /from\s+['"]zod(\/[^'"]*)?['"]/.test(line) && !/^\s*import\s+type\b/.test(line)),
      )
      .map(({ at, line }) => `${at}: ${line.trim()}`);
    expect(offenders).toEqual([]);
  });

  it('is configured jitless before any schema is built', () => {
    expect(z.config().jitless).toBe(true);
  });
});
