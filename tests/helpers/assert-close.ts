import { expect } from 'vitest';

/** Asserts |actual − expected| ≤ delta, element-wise for arrays (after d3's assertInDelta). */
export function assertClose(
  actual: number | ArrayLike<number>,
  expected: number | ArrayLike<number>,
  delta = 1e-6,
  label = '',
): void {
  if (typeof actual === 'number' || typeof expected === 'number') {
    const a = Number(actual);
    const e = Number(expected);
    if (!(Math.abs(a - e) <= delta)) {
      expect.fail(`${label ? label + ': ' : ''}expected ${a} to be within ${delta} of ${e}`);
    }
    return;
  }
  expect(actual.length, `${label} length`).toBe(expected.length);
  for (let i = 0; i < actual.length; i++) {
    if (!(Math.abs(actual[i] - expected[i]) <= delta)) {
      expect.fail(`${label ? label + ': ' : ''}index ${i}: expected ${actual[i]} to be within ${delta} of ${expected[i]}`);
    }
  }
}
