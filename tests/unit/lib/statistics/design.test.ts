import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { DesignSchema, parseWith, runDesign } from '../../../../src/lib/statistics/design';
import { repeatedMeasuresAnova } from '../../../../src/lib/statistics/rm-anova';
import { parseTidyValues } from '../../../../src/lib/statistics/tidy-values';
import reference from './reference.json';

// Potthoff & Roy's (1964) 11 girls, written as a values table: age as the condition, split into two channels whose
// values average back to the published distance (d ± 0.5), so averaging over the unnamed channel must give the
// classical one-factor result of reference.py.
function girlsTable(): string {
  const ages = ['age8', 'age10', 'age12', 'age14'];
  let csv = 'subject,condition,band,window,channel,value\n';
  reference.girls.values.forEach((row, s) => {
    row.forEach((d, a) => {
      csv += `F${s + 1},${ages[a]},growth,all,left,${d - 0.5}\n`;
      csv += `F${s + 1},${ages[a]},growth,all,right,${d + 0.5}\n`;
    });
  });
  return csv;
}

describe('runDesign', () => {
  it('averages the ANOVA over anything not named and matches the classical one-factor result', () => {
    const table = parseTidyValues(girlsTable());
    const design = parseWith(DesignSchema, { neutral: 0, fdr: 0.05, tests: [{ name: 'growth', kind: 'repeated-anova', factors: ['condition'] }] }, 'design');
    const result = runDesign(table, design);
    const test = result.tests[0];
    if (test.kind !== 'repeated-anova') throw new Error('expected an ANOVA');
    expect(test.n).toBe(11);
    const ref = reference.girls.age;
    assertClose(test.effects[0].F, ref.F, 1e-9);
    assertClose(test.effects[0].epsilon, ref.epsilon, 1e-12);
    assertClose(test.effects[0].pGG, ref.pGG, 1e-7 * ref.pGG);
  });

  it('fixes a named level: the same ANOVA on one channel equals the core on that channel\'s values', () => {
    const table = parseTidyValues(girlsTable());
    const design = parseWith(DesignSchema, { neutral: 0, fdr: 0.05, tests: [{ name: 'g', kind: 'repeated-anova', factors: ['condition'], channel: 'left' }] }, 'design');
    const test = runDesign(table, design).tests[0];
    if (test.kind !== 'repeated-anova') throw new Error('expected an ANOVA');
    const direct = repeatedMeasuresAnova({ factors: [{ name: 'condition', levels: 4 }], nSubjects: 11, values: reference.girls.values.flat().map((d) => d - 0.5) });
    assertClose(test.effects[0].F, direct.effects[0].F, 1e-12);
  });

  it('refuses a factor that is also fixed, and a factor with one level in the selected rows', () => {
    expect(() =>
      parseWith(DesignSchema, { neutral: 0, fdr: 0.05, tests: [{ name: 'g', kind: 'repeated-anova', factors: ['channel'], channel: 'left' }] }, 'design'),
    ).toThrow(/^tests\[0\]\.channel is a factor of this test/);
    const table = parseTidyValues(girlsTable());
    const design = parseWith(DesignSchema, { neutral: 0, fdr: 0.05, tests: [{ name: 'g', kind: 'repeated-anova', factors: ['band'] }] }, 'design');
    expect(() => runDesign(table, design)).toThrow(/tests\[0\]\.factors\[0\] \("band"\) has 1 level/);
  });

  it('gives a cell with too few subjects null statistics and a warning, and leaves it out of Benjamini–Hochberg', () => {
    // Scenario of our own: three subjects, theta in a/b (band names holding "/"), one lone alpha value, and a cell
    // that only the second condition has.
    const csv = [
      'subject,condition,band,window,channel,value',
      'P1,on,theta a/b,w,Cz,1.0',
      'P2,on,theta a/b,w,Cz,2.0',
      'P3,on,theta a/b,w,Cz,2.5',
      'P1,off,theta a/b,w,Cz,0.5',
      'P2,off,theta a/b,w,Cz,0.0',
      'P3,off,theta a/b,w,Cz,1.5',
      'P1,on,alpha,w,Cz,3.0',
      'P1,off,alpha,w,Cz,1.0',
      'P1,off,beta,w,Cz,1.0',
    ].join('\n');
    const table = parseTidyValues(csv);
    const design = parseWith(
      DesignSchema,
      { neutral: 0, fdr: 0.05, tests: [{ name: 'on-off', kind: 'paired', conditions: ['on', 'off'] }] },
      'design',
    );
    const { tests, warnings } = runDesign(table, design);
    const test = tests[0];
    if (test.kind !== 'paired') throw new Error('expected a paired test');
    expect(test.cells.map((c) => [c.band, c.n])).toEqual([
      ['theta a/b', 3],
      ['alpha', 1],
    ]);
    const lone = test.cells[1];
    expect([lone.t, lone.p, lone.q, lone.discovery]).toEqual([null, null, null, false]);
    // Only one testable cell: M = 1, so q = p.
    expect(test.cells[0].q).toBe(test.cells[0].p);
    expect(warnings).toEqual([
      'test "on-off": cell beta/w/Cz has values for "off" only; not tested',
      'test "on-off": cell alpha/w/Cz has 1 subject with both conditions; a t-test needs 2',
    ]);
  });
});
