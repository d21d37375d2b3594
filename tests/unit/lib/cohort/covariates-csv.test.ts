import { describe, expect, it } from 'vitest';
import { parseCovariatesCsv } from '../../../../src/lib/cohort/covariates-csv';

const known = ['S01', 'S02', 'S03'];

describe('covariates from CSV', () => {
  it('reads numbers per subject, an empty cell or n/a as not known', () => {
    expect(parseCovariatesCsv('subject,age,group\nS01,31,0\nS02,,1\r\nS03,n/a,1\n', known)).toEqual({
      names: ['age', 'group'],
      rows: [{ subject: 'S01', values: [31, 0] }, { subject: 'S02', values: [null, 1] }, { subject: 'S03', values: [null, 1] }],
    });
  });

  const bad: [string, string][] = [
    ['subject,age\nS01,31\nS02,thirty\n', 'row 3, column "age": "thirty" is not a number'],
    ['subject,age\nS01,31\nS09,40\n', 'row 3, column "subject": "S09" is not a subject of this study'],
    ['code,age\nS01,31\n', 'row 1: has no column "subject"'],
    ['subject,age,value\nS01,31,2\n', 'row 1, column "value": is a column the export already has'],
    ['subject,age\nS01,31\nS01,32\n', 'row 3, column "subject": "S01" was already given on row 2'],
    ['subject,age\nS01,31,7\n', 'row 2: has 3 cells but the header has 2 columns'],
    ['subject,2nd\nS01,1\n', 'row 1, column "2nd": is not a covariate name'],
    ['', 'row 1: the file is empty'],
  ];
  for (const [csv, message] of bad) {
    it(`refuses, naming row and column: ${message}`, () => {
      expect(() => parseCovariatesCsv(csv, known)).toThrow(message);
    });
  }
});
