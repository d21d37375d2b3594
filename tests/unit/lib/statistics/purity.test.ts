// The statistics core runs in the browser, its workers, the server and the CLI (DEVELOPERS.md, "Statistics core"),
// so it may import neither node:* modules nor the DOM, and nothing from the app's client, server or database layers.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

describe('src/lib/statistics', () => {
  it('imports no node:* module, no DOM global and nothing from client, server, db or cli', () => {
    const dir = path.resolve('src/lib/statistics');
    const offenders: string[] = [];
    for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts'))) {
      readFileSync(path.join(dir, file), 'utf8')
        .split('\n')
        .forEach((line, i) => {
          const code = line.replace(/\/\/.*$/, '');
          if (/from ['"](node:|fs|path|os|worker_threads)/.test(code) || /\b(document|window|localStorage)\./.test(code) || /from ['"]\.\.\/(client|server|cli)|\.\.\/\.\.\/db/.test(code)) {
            offenders.push(`${file}:${i + 1}: ${line.trim()}`);
          }
        });
    }
    expect(offenders).toEqual([]);
  });
});
