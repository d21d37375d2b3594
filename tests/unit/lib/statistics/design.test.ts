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
});
