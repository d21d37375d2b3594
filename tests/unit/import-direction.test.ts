// Imports flow one way (DEVELOPERS.md, "Architecture in one paragraph"; issue 10, item 2). The check parses every
// import of src/** and workers/** with TypeScript's own parser (tests/helpers/import-direction.ts).
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  describeViolation,
  importViolations,
  importsOf,
} from '../helpers/import-direction';

const root = fileURLToPath(new URL('../..', import.meta.url));
const fixture = path.join(root, 'tests/fixtures/import-direction');

describe('import direction', () => {
  it('holds in this repository (besides the temporary lists)', () => {
    expect(importViolations(root).map(describeViolation)).toEqual([]);
  }, 60_000); // parses every source file: seconds on a loaded machine

  it('fails on the fixture’s wrong imports, naming each file and import, and passes its allowed ones', () => {
    const found = importViolations(fixture).map((v) => `${v.file}:${v.line} ${v.specifier}`).sort();
    expect(found).toEqual([
      'src/components/Panel.tsx:2 ../lib/analysis/leak',
      'src/db/queries/query.ts:2 ../../lib/server/secret',
      'src/lib/analysis/leak.ts:2 node:fs',
      'src/lib/analysis/leak.ts:3 ../../stores/thing',
      'workers/thing.worker.ts:2 ../src/components/Panel',
    ]);
    const lines = importViolations(fixture).map(describeViolation);
    expect(lines.find((l) => l.startsWith('src/components/Panel.tsx'))).toMatch(/screens do not import lib\/analysis.*imported heavy/);
    expect(lines.find((l) => l.includes('node:fs'))).toMatch(/no node:\* modules/);
  });

  it('reads type-only imports, re-exports and dynamic imports as such', () => {
    const edges = importsOf(fixture, path.join(fixture, 'src/components/Panel.tsx'));
    expect(edges.map((e) => [e.line, e.target, e.names, e.typeOnly])).toEqual([
      [2, 'src/lib/analysis/leak', ['heavy'], false],
      [3, 'src/lib/analysis/channel-types', ['isBrainType'], false],
      [4, 'src/lib/analysis/leak', [], true],
    ]);
  });

  it('a temporary-list entry silences its import only, and a stale entry is no failure', () => {
    const found = importViolations(fixture, [
      { file: 'src/components/Panel.tsx', module: 'src/lib/analysis/leak' },
      { file: 'src/components/Gone.tsx', module: 'src/lib/analysis/removed-long-ago' },
    ]).map((v) => v.file);
    expect(found.sort()).toEqual(['src/db/queries/query.ts', 'src/lib/analysis/leak.ts', 'src/lib/analysis/leak.ts', 'workers/thing.worker.ts']);
  });

});
