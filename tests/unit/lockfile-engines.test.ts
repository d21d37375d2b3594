// The lock file installs on the Node that runs the tests without an engine warning. npm itself judges the ranges
// (its own `npm ci`, dry run, offline, in a scratch folder holding only package.json and the lock file), so no
// range parser of ours can disagree with what a user sees at `npm ci` or `npm start`.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../..', import.meta.url));
const npm = process.platform === 'win32' ? 'npm.cmd' : 'npm';
const scratch: string[] = [];

/** Runs `npm ci --dry-run --offline` on the given manifest and lock and returns its EBADENGINE lines. */
function engineWarnings(packageJson: string, lockJson: string): { lines: string[]; status: number | null; output: string } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-engines-'));
  scratch.push(dir);
  fs.writeFileSync(path.join(dir, 'package.json'), packageJson);
  fs.writeFileSync(path.join(dir, 'package-lock.json'), lockJson);
  // No node_modules in the scratch folder, so npm plans to add every locked package and checks each one's engines.
  const run = spawnSync(npm, ['ci', '--dry-run', '--offline', '--ignore-scripts', '--no-audit', '--no-fund'], {
    cwd: dir,
    encoding: 'utf8',
    env: { ...process.env, npm_config_loglevel: 'warn', npm_config_engine_strict: 'false' },
  });
  const output = `${run.stdout}\n${run.stderr}`;
  return { lines: output.split('\n').filter((line) => line.includes('EBADENGINE')), status: run.status, output };
}

afterAll(() => {
  for (const dir of scratch) fs.rmSync(dir, { recursive: true, force: true });
});

describe('package-lock.json on the running Node', () => {
  it('the check sees a locked package whose engines exclude this Node (undici 8 asks for Node ≥ 22.19)', () => {
    // A lock of one entry, as undici 8.13.1 was locked before unifont was pinned (its engines field as published).
    // The range is raised above the running Node so the check stays meaningful on any Node this test runs on.
    const major = Number(process.versions.node.split('.')[0]);
    const manifest = JSON.stringify({ name: 'engine-probe', version: '1.0.0', dependencies: { undici: '8.13.1' } });
    const lock = JSON.stringify({
      name: 'engine-probe', version: '1.0.0', lockfileVersion: 3, requires: true,
      packages: {
        '': { name: 'engine-probe', version: '1.0.0', dependencies: { undici: '8.13.1' } },
        'node_modules/undici': {
          version: '8.13.1',
          resolved: 'https://registry.npmjs.org/undici/-/undici-8.13.1.tgz',
          integrity: 'sha512-Kt7EaPjh0s93lJH/PmW3d5rhkcpUa6fS3jqZ7+YGxNd9L7Xy/i827xe4C2uhhq+pJebM4tQOl5AgHmW11G5Skg==',
          license: 'MIT',
          engines: { node: `>=${Math.max(22, major + 1)}.19.0` },
        },
      },
    });
    const { lines, output } = engineWarnings(manifest, lock);
    expect(lines.length, output).toBeGreaterThan(0);
    expect(output).toContain('undici@8.13.1');
  });

  it(`npm ci plans every locked package without an EBADENGINE warning on Node ${process.versions.node}`, () => {
    const manifest = fs.readFileSync(path.join(root, 'package.json'), 'utf8');
    const lock = fs.readFileSync(path.join(root, 'package-lock.json'), 'utf8');
    const { lines, status, output } = engineWarnings(manifest, lock);
    expect(status, output).toBe(0);
    // Each warning is followed by the package and its range; show the whole block on failure.
    expect(lines, output).toEqual([]);
  });

  it("the project's own engines range admits the running Node (package.json engines.node)", () => {
    const manifest = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as { engines: { node: string } };
    const floor = /^>=(\d+)\.(\d+)\.(\d+)$/.exec(manifest.engines.node);
    expect(floor, `engines.node "${manifest.engines.node}" is not a plain ">=x.y.z" floor`).not.toBeNull();
    const [major, minor, patch] = process.versions.node.split('.').map(Number);
    const [fMajor, fMinor, fPatch] = floor!.slice(1).map(Number);
    const atLeast = major !== fMajor ? major > fMajor : minor !== fMinor ? minor > fMinor : patch >= fPatch;
    expect(atLeast, `Node ${process.versions.node} is below ${manifest.engines.node}`).toBe(true);
  });
});
