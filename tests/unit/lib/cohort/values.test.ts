import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';
import { averageChannels, groupCells, tidyCsv, toTidyValues, type PooledSession } from '../../../../src/lib/cohort/values';
import { parseTidyValues } from '../../../../src/lib/statistics/tidy-values';
import { DesignSchema, runDesign } from '../../../../src/lib/statistics/design';

// An invented cohort for the checks: 10 subjects, 2 conditions, 2 bands, 2 windows, 2 channels.
function cohort(nSubjects = 10): PooledSession[] {
  const z = seededNormal(5);
  const sessions: PooledSession[] = [];
  for (let s = 0; s < nSubjects; s++) {
    const subject = `S${String(s + 1).padStart(2, '0')}`;
    const rows: PooledSession['rows'] = [];
    for (const condition of ['lamp', 'oar']) for (const band of ['theta', 'beta']) for (const window of ['early', 'late']) for (const channel of ['Fz', 'Cz']) {
      const normalized = (condition === 'lamp' && band === 'theta' ? 3 : 0) + z();
      rows.push({ subject, condition, band, window, channel, raw: Math.exp(z()), normalized: s === 3 && channel === 'Cz' && window === 'late' ? null : normalized });
    }
    sessions.push({ analysisSessionId: `id-${s}`, subject, recipeVersion: 1, recipeHash: 'f'.repeat(64), signOff: s < 8 ? 'signed-off' : 'draft', rows });
  }
  return sessions;
}

describe('group values per band × window × condition × channel', () => {
  it('equal the subjects\' values averaged independently here, with SD, SE and a 95 % CI from t(0.975; 9) = 2.262', () => {
    const sessions = cohort();
    const cells = groupCells(sessions);
    expect(cells).toHaveLength(2 * 2 * 2 * 2);
    // Independent: pick the cell's values straight from the rows and average them by hand.
    const pick = (c: string, b: string, w: string, ch: string) => sessions.flatMap((s) => s.rows.filter((r) => r.condition === c && r.band === b && r.window === w && r.channel === ch && r.normalized !== null).map((r) => r.normalized!));
    for (const cell of cells) {
      const x = pick(cell.condition, cell.band, cell.window, cell.channel);
      let sum = 0;
      for (const v of x) sum += v;
      const m = sum / x.length;
      const sd = Math.sqrt(x.reduce((a, v) => a + (v - m) ** 2, 0) / (x.length - 1));
      expect(cell.n).toBe(x.length);
      assertClose(cell.mean, m, 1e-12, 'mean');
      assertClose(cell.sd!, sd, 1e-12, 'sd');
      assertClose(cell.se!, sd / Math.sqrt(x.length), 1e-12, 'se');
      if (x.length === 10) {
        // t(0.975; 9) = 2.262 (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.2), printed to 3 decimals.
        assertClose((cell.ci95![1] - m) / (sd / Math.sqrt(10)), 2.262, 5e-4, 'CI half-width / SE');
      }
    }
    // The one cell with a missing subject says so in n.
    expect(cells.find((c) => c.condition === 'lamp' && c.band === 'theta' && c.window === 'late' && c.channel === 'Cz')!.n).toBe(9);
  });

  it('averages a channel set per subject before pooling', () => {
    const s = cohort(1)[0];
    const rows = averageChannels(s, ['Fz', 'Cz'], 'midline');
    const fz = s.rows.find((r) => r.condition === 'oar' && r.band === 'beta' && r.window === 'early' && r.channel === 'Fz')!;
    const cz = s.rows.find((r) => r.condition === 'oar' && r.band === 'beta' && r.window === 'early' && r.channel === 'Cz')!;
    const mid = rows.find((r) => r.condition === 'oar' && r.band === 'beta' && r.window === 'early')!;
    assertClose(mid.normalized!, (fz.normalized! + cz.normalized!) / 2, 1e-12);
    expect(mid.channel).toBe('midline');
  });
});

describe('the tidy CSV', () => {
  it('reads back with the statistics contract\'s reader: recipe_hash and sign_off are not covariates, age is', () => {
    const sessions = cohort();
    const age = new Map(sessions.map((s, i) => [s.subject, 20 + i]));
    const csv = tidyCsv(sessions, new Map([['age', age]]));
    const lines = csv.trimEnd().split('\n');
    expect(lines[0]).toBe('subject,condition,band,window,channel,value,recipe_hash,sign_off,age');
    // 10 subjects × 16 cells, minus S04's undefined Cz/late values (2 conditions × 2 bands)
    expect(lines).toHaveLength(1 + 10 * 16 - 4);
    expect(lines[1]).toMatch(/^S01,lamp,theta,early,Fz,-?\d/);
    expect(lines.at(-1)).toMatch(/,f{64},draft,29$/);
    const table = parseTidyValues(csv);
    expect([...table.covariates.keys()]).toEqual(['age']);
    expect(table.rows).toHaveLength(156);
    // The same design gives the same numbers on the exported file and on the in-memory table.
    const design = DesignSchema.parse({ neutral: 0, fdr: 0.05, tests: [{ name: 'lamp', kind: 'one-sample', condition: 'lamp' }, { name: 'age', kind: 'regression', condition: 'lamp', covariate: 'age' }, { name: 'lamp-oar', kind: 'paired', conditions: ['lamp', 'oar'] }] });
    const fromFile = runDesign(table, design);
    const inMemory = runDesign(toTidyValues(sessions, new Map([['age', age]])), design);
    expect(JSON.stringify(inMemory.tests)).toBe(JSON.stringify(fromFile.tests));
  });

  it('leaves out a covariate some pooled subject lacks', () => {
    const sessions = cohort(3);
    const csv = tidyCsv(sessions, new Map([['age', new Map([['S01', 30], ['S02', 31]])]]));
    expect(csv.split('\n')[0]).toBe('subject,condition,band,window,channel,value,recipe_hash,sign_off');
  });
});
