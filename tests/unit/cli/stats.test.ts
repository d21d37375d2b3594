import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { assertClose } from '../../helpers/assert-close';
import { seededNormal } from '../../helpers/seeded-random';
import { main } from '../../../src/cli/stats';
import { benjaminiHochberg } from '../../../src/lib/statistics/fdr';
import { linearRegression } from '../../../src/lib/statistics/regression';
import { oneSampleTest, pairedTest } from '../../../src/lib/statistics/t-tests';

// These tests start the command line in a child process (tsx), several runs per test: on a loaded two-core
// machine one run alone has taken 15 s, so they get more than the suite's 30 s.
vi.setConfig({ testTimeout: 120_000 });

const run = promisify(execFile);
const root = fileURLToPath(new URL('../../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'tidemark-stats-'));
const file = (name: string) => join(dir, name);

// Scenario of our own: 8 subjects of a "tide-gauge watching" task, two cue conditions, two bands, two windows, two
// channels, a per-subject covariate "years" (of practice). Numbers are seeded noise with a theta effect for
// cue/left; the checks compare the command's output with the core's functions on the same rows.
const SUBJECTS = ['G01', 'G02', 'G03', 'G04', 'G05', 'G06', 'G07', 'G08'];
const CONDITIONS = ['cue/left', 'cue/right'];
const BANDS = ['theta', 'alpha'];
const WINDOWS = ['early', 'late'];
const CHANNELS = ['Fz', 'Cz'];
const years = (s: number) => 2 + 3 * s;
const value = new Map<string, number>();
let csv = 'subject,condition,band,window,channel,value,years\n';
const lines: string[] = [];

const design = {
  neutral: 0,
  fdr: 0.05,
  tests: [
    { name: 'left', kind: 'one-sample', condition: 'cue/left' },
    { name: 'left-right', kind: 'paired', conditions: ['cue/left', 'cue/right'] },
    { name: 'practice', kind: 'regression', condition: 'cue/left', covariate: 'years' },
    { name: 'cond-band', kind: 'repeated-anova', factors: ['condition', 'band'], window: 'early', channel: 'Fz' },
  ],
};
const times = Array.from({ length: 12 }, (_, i) => Math.round((i * 0.05 - 0.1) * 100) / 100);
const frequencies = [4, 6, 8, 10, 12];

function maps(change: (m: Record<string, Record<string, number[][]>>) => void = () => undefined, test: object = { kind: 'one-sample', condition: 'cue/left', neutral: 0, alpha: 0.05 }) {
  const z = seededNormal(99);
  const subjects: Record<string, Record<string, number[][]>> = {};
  for (const s of SUBJECTS) {
    subjects[s] = {
      'cue/left': frequencies.map((_, f) => times.map((_, t) => Math.round((z() + (f >= 1 && f <= 2 && t >= 3 && t <= 8 ? 2 : 0)) * 1000) / 1000)),
      'cue/right': frequencies.map(() => times.map(() => Math.round(z() * 1000) / 1000)),
    };
  }
  change(subjects);
  return JSON.stringify({ times, frequencies, subjects, test });
}

beforeAll(() => {
  const z = seededNormal(5);
  SUBJECTS.forEach((s, i) => {
    for (const c of CONDITIONS) for (const b of BANDS) for (const w of WINDOWS) for (const ch of CHANNELS) {
      const v = Math.round((z() + (c === 'cue/left' && b === 'theta' ? 1.5 + 0.1 * i : 0)) * 1000) / 1000;
      value.set([s, c, b, w, ch].join('|'), v);
      lines.push(`${s},${c},${b},${w},${ch},${v},${years(i)}`);
    }
  });
  csv += lines.join('\n') + '\n';
  writeFileSync(file('values.csv'), csv);
  writeFileSync(file('design.json'), JSON.stringify(design));
  writeFileSync(file('maps.json'), maps());
});

interface Outcome {
  code: number;
  stderr: string;
  stdout: string;
}

async function inProcess(args: string[]): Promise<Outcome> {
  let stderr = '';
  let stdout = '';
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((s, cb?: unknown) => {
    stdout += String(s);
    if (typeof cb === 'function') cb();
    return true;
  });
  try {
    return { code: await main(args), stderr, stdout };
  } finally {
    err.mockRestore();
    out.mockRestore();
  }
}

afterEach(() => vi.restoreAllMocks());

const vals = (c: string, b: string, w: string, ch: string) => SUBJECTS.map((s) => value.get([s, c, b, w, ch].join('|'))!);

describe('npm run --silent stats', () => {
  it('runs a full design with maps as a process and writes the contract\'s result shape', async () => {
    await run(process.execPath, ['--import', 'tsx', 'src/cli/stats.ts', file('values.csv'), '--design', file('design.json'), '--maps', file('maps.json'), '--out', file('result.json')], { cwd: root });
    const result = JSON.parse(readFileSync(file('result.json'), 'utf8'));
    expect(Object.keys(result)).toEqual(['tests', 'clusters', 'mapTest', 'warnings']);
    expect(result.tests.map((t: { name: string; kind: string }) => `${t.name}:${t.kind}`)).toEqual([
      'left:one-sample',
      'left-right:paired',
      'practice:regression',
      'cond-band:repeated-anova',
    ]);
    const [left, pairedT, practice, anova] = result.tests;
    expect(left.cells).toHaveLength(8);
    expect(Object.keys(left.cells[0])).toEqual(['band', 'window', 'channel', 'n', 'mean', 'sd', 'se', 't', 'df', 'p', 'ci95', 'dz', 'q', 'discovery']);
    expect(Object.keys(practice.cells[0])).toEqual(['band', 'window', 'channel', 'n', 'slope', 'intercept', 'r', 't', 'df', 'p', 'q', 'discovery']);
    expect(Object.keys(anova)).toEqual(['name', 'kind', 'n', 'effects']);
    expect(anova.effects.map((e: { effect: string }) => e.effect)).toEqual(['condition', 'band', 'condition:band']);
    expect(Object.keys(anova.effects[0])).toEqual(['effect', 'F', 'df1', 'df2', 'p', 'eta2p', 'epsilon', 'pGG']);

    // The cells are the core's tests on the CSV's rows, in the file's band/window/channel order.
    const first = left.cells[0];
    expect([first.band, first.window, first.channel]).toEqual(['theta', 'early', 'Fz']);
    const expected = oneSampleTest(vals('cue/left', 'theta', 'early', 'Fz'));
    for (const k of ['n', 'mean', 'sd', 'se', 't', 'df', 'p', 'dz'] as const) assertClose(first[k], expected[k], 1e-12, k);
    expect(first.discovery).toBe(first.q <= 0.05);
    const q = benjaminiHochberg(left.cells.map((c: { p: number }) => c.p));
    assertClose(left.cells.map((c: { q: number }) => c.q), q, 1e-15, 'q');
    const pd = pairedTest(vals('cue/left', 'alpha', 'late', 'Cz'), vals('cue/right', 'alpha', 'late', 'Cz'));
    const cell = pairedT.cells.find((c: { band: string; window: string; channel: string }) => c.band === 'alpha' && c.window === 'late' && c.channel === 'Cz');
    assertClose(cell.t, pd.t, 1e-12, 'paired t');
    const lr = linearRegression(SUBJECTS.map((_, i) => years(i)), vals('cue/left', 'theta', 'early', 'Fz'));
    assertClose(practice.cells[0].slope, lr.slope, 1e-12, 'slope');
    assertClose(practice.cells[0].p, lr.p, 1e-15, 'regression p');
    expect(left.cells.filter((c: { band: string }) => c.band === 'theta').every((c: { discovery: boolean }) => c.discovery)).toBe(true);

    expect(result.clusters[0]).toMatchObject({ sign: 1, times: [0.05, 0.3], frequencies: [6, 8] });
    expect(Object.keys(result.clusters[0])).toEqual(['sign', 'mass', 'size', 'p', 'times', 'frequencies']);
    expect(result.clusters[0].p).toBeLessThan(0.01);
    expect(result.mapTest).toMatchObject({ n: 8, permutations: 256, exact: true, seed: null, df: 7, alpha: 0.05 });
    expect(result.warnings).toEqual([]);
  });

  it('tests a cell on the subjects that have it, and n says so', async () => {
    writeFileSync(file('missing.csv'), csv.replace(`${lines[0]}\n`, ''));
    const { code, stdout } = await inProcess([file('missing.csv'), '--design', file('design.json')]);
    expect(code).toBe(0);
    const result = JSON.parse(stdout);
    const n = (band: string, window: string, channel: string) =>
      result.tests[0].cells.find((c: { band: string; window: string; channel: string }) => c.band === band && c.window === window && c.channel === channel).n;
    expect(n('theta', 'early', 'Fz')).toBe(7);
    expect(n('theta', 'early', 'Cz')).toBe(8);
    expect(result.tests[3].n).toBe(7); // the ANOVA keeps complete subjects only
    expect(result.warnings.join('\n')).toMatch(/cond-band.*1 subject left out for missing cells \(G01\)/);
  });

  it('runs a paired map test with random flips above 12 subjects, the design\'s seed reported', async () => {
    const z = seededNormal(123);
    const subjects: Record<string, Record<string, number[][]>> = {};
    for (let s = 0; s < 14; s++) {
      const right = frequencies.map(() => times.map(() => Math.round(z() * 1000) / 1000));
      const left = right.map((row, f) => row.map((v, t) => Math.round((v + z() + (f <= 1 && t >= 6 ? 1.8 : 0)) * 1000) / 1000));
      subjects[`H${s + 1}`] = { 'cue/left': left, 'cue/right': right };
    }
    delete subjects.H14['cue/right'];
    const mapsText = JSON.stringify({ times, frequencies, subjects, test: { kind: 'paired', conditions: ['cue/left', 'cue/right'] } });
    writeFileSync(file('paired-maps.json'), mapsText);
    writeFileSync(file('seeded.json'), JSON.stringify({ ...design, seed: 42 }));
    const seeded = await inProcess([file('values.csv'), '--design', file('seeded.json'), '--maps', file('paired-maps.json')]);
    expect(seeded.code).toBe(0);
    const result = JSON.parse(seeded.stdout);
    expect(result.mapTest).toMatchObject({ n: 13, permutations: 10_000, exact: false, seed: 42, df: 12 });
    expect(result.mapTest.subjects).not.toContain('H14');
    expect(result.warnings).toEqual(['map test: 1 subject left out without "cue/left" and "cue/right" (H14)']);
    expect(result.clusters[0]).toMatchObject({ sign: 1, frequencies: [4, 6] });
    expect(result.clusters[0].p).toBeLessThan(0.01);
    expect(result.clusters[0].p).toBeGreaterThanOrEqual(1 / 10_000);

    const again = await inProcess([file('values.csv'), '--design', file('seeded.json'), '--maps', file('paired-maps.json')]);
    expect(again.stdout).toBe(seeded.stdout);
    const unseeded = JSON.parse((await inProcess([file('values.csv'), '--design', file('design.json'), '--maps', file('paired-maps.json')])).stdout);
    expect(unseeded.mapTest.seed).toBe(1);
    expect(unseeded.warnings).toContain('map test: 13 subjects need random sign flips and no seed was given; seed 1 was used');
  });

  it('exits 2 with one line and no stack trace as a process', async () => {
    const e = await run(process.execPath, ['--import', 'tsx', 'src/cli/stats.ts', file('nothing.csv'), '--design', file('design.json')], { cwd: root }).catch((x) => x);
    expect(e.code).toBe(2);
    expect(e.stderr).toBe(`stats: ${file('nothing.csv')}: cannot be read (ENOENT)\n`);
  });

  const bad = (name: string, text: string) => {
    writeFileSync(file(name), text);
    return file(name);
  };
  const cases: [string, () => string[], RegExp][] = [
    ['a missing column', () => [bad('no-value.csv', csv.replace('value,years', 'amount,years')), '--design', file('design.json')], /no-value\.csv: line 1: has no column "value"/],
    ['a non-numeric value', () => [bad('text.csv', csv.replace(`,${value.get('G01|cue/left|theta|late|Fz')},`, ',high,')), '--design', file('design.json')], /text\.csv: line 4, column "value": "high" is not a finite number/],
    ['an infinite value', () => [bad('inf.csv', csv.replace(`,${value.get('G01|cue/left|theta|early|Cz')},`, ',Infinity,')), '--design', file('design.json')], /inf\.csv: line 3, column "value": "Infinity"/],
    ['a covariate not constant per subject', () => [bad('years.csv', csv.replace(/^(G02,cue\/right,theta,early,Fz,[^,]+),5$/m, '$1,6')), '--design', file('design.json')], /years\.csv: line 26, column "years": gives subject "G02" 6, but line 18 gave 5; a covariate holds one value per subject/],
    ['a non-numeric covariate', () => [bad('cov.csv', csv.replace(/,2\n/, ',two\n')), '--design', file('design.json')], /cov\.csv: line 2, column "years": "two" is not a number/],
    ['a ragged row', () => [bad('ragged.csv', csv.replace(/\n(G01,cue\/left,theta,early,Cz,[^,]+),2\n/, '\n$1\n')), '--design', file('design.json')], /ragged\.csv: line 3: has 6 cells but the header has 7 columns/],
    ['a bad value after a quoted cell that spans two lines', () => [bad('quoted.csv', csv.replace('G01,cue/left,theta,early,Fz,', 'G01,"cue/left\n(quoted)",theta,early,Fz,').replace(`,${value.get('G01|cue/left|theta|late|Fz')},`, ',n/a,')), '--design', file('design.json')], /quoted\.csv: line 5, column "value": "n\/a"/],
    ['a repeated row', () => [bad('twice.csv', csv + lines[5] + '\n'), '--design', file('design.json')], /twice\.csv: line 130: repeats subject "G01".* of line 7/],
    ['an unknown condition in the design', () => [file('values.csv'), '--design', bad('cond.json', JSON.stringify({ ...design, tests: [design.tests[0], { name: 'x', kind: 'paired', conditions: ['cue/left', 'cue/up'] }] }))], /cond\.json: tests\[1\]\.conditions\[1\]: condition "cue\/up" is not in the values \(they have: cue\/left, cue\/right\)/],
    ['an unknown covariate column', () => [file('values.csv'), '--design', bad('covname.json', JSON.stringify({ ...design, tests: [{ name: 'a', kind: 'regression', condition: 'cue/left', covariate: 'age' }] }))], /covname\.json: tests\[0\]\.covariate: "age" is not a column of the values \(covariates: years\)/],
    ['an unknown window of an ANOVA', () => [file('values.csv'), '--design', bad('win.json', JSON.stringify({ ...design, tests: [{ ...design.tests[3], window: 'middle' }] }))], /win\.json: tests\[0\]\.window: window "middle" is not in the values/],
    ['an unknown test kind', () => [file('values.csv'), '--design', bad('kind.json', JSON.stringify({ ...design, tests: [{ name: 'a', kind: 'two-sample', condition: 'cue/left' }] }))], /kind\.json: tests\[0\]\.kind: /],
    ['a design without neutral', () => [file('values.csv'), '--design', bad('neutral.json', JSON.stringify({ fdr: 0.05, tests: [] }))], /neutral\.json: neutral: /],
    ['a repeated test name', () => [file('values.csv'), '--design', bad('names.json', JSON.stringify({ ...design, tests: [design.tests[0], design.tests[0]] }))], /names\.json: tests\[1\]\.name: "left" is already the name of tests\[0\]/],
    ['a design that is not JSON', () => [file('values.csv'), '--design', bad('broken.json', '{"neutral": 0,')], /broken\.json: is not valid JSON/],
    ['a ragged map', () => [file('values.csv'), '--design', file('design.json'), '--maps', bad('ragged.json', maps((m) => m.G03['cue/left'][2].pop()))], /ragged\.json: subjects\.G03\["cue\/left"\]\[2\]: has 11 values; times has 12/],
    ['a map with too few rows', () => [file('values.csv'), '--design', file('design.json'), '--maps', bad('rows.json', maps((m) => m.G04['cue/left'].pop()))], /rows\.json: subjects\.G04\["cue\/left"\]: has 4 rows; frequencies has 5/],
    ['a non-number in a map', () => [file('values.csv'), '--design', file('design.json'), '--maps', bad('nan.json', maps((m) => ((m.G05['cue/left'][1] as unknown[])[3] = 'x')))], /nan\.json: subjects\.G05\["cue\/left"\]\[1\]\[3\]: /],
    ['an unknown map condition', () => [file('values.csv'), '--design', file('design.json'), '--maps', bad('mcond.json', maps(undefined, { kind: 'paired', conditions: ['cue/left', 'cue/down'] }))], /mcond\.json: test\.conditions\[1\]: "cue\/down" is not a condition of any subject's maps/],
    ['an unknown option', () => [file('values.csv'), '--design', file('design.json'), '--seed', '3'], /--seed: is not an option/],
    ['no design', () => [file('values.csv')], /--design: is required/],
  ];
  for (const [what, args, message] of cases) {
    it(`exits 2 naming where for ${what}`, async () => {
      const { code, stderr, stdout } = await inProcess(args());
      expect(code).toBe(2);
      expect(stdout).toBe('');
      expect(stderr.endsWith('\n') && stderr.indexOf('\n') === stderr.length - 1).toBe(true);
      expect(stderr).toMatch(/^stats: /);
      expect(stderr).toMatch(message);
    });
  }
});
