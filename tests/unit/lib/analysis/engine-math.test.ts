// ECMAScript leaves Math.exp, log, pow, sin, cos, hypot and the other transcendental functions "implementation-
// approximated" (ECMA-262, §21.3.2), so engines differ in the last bit; only +, −, ×, ÷ and Math.sqrt are exactly
// rounded (IEEE 754). The core must give the same bits in the browser and on the command line, so outside
// portable-math.ts it may call none of the approximated functions.
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const APPROXIMATED = /\bMath\.(acos|acosh|asin|asinh|atan|atanh|atan2|cbrt|cos|cosh|exp|expm1|hypot|log|log1p|log10|log2|pow|sin|sinh|tan|tanh)\s*\(/;

describe('src/lib/analysis', () => {
  it('calls no engine-approximated Math function outside portable-math.ts', () => {
    const dir = path.resolve('src/lib/analysis');
    const offenders: string[] = [];
    for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts') && f !== 'portable-math.ts')) {
      readFileSync(path.join(dir, file), 'utf8')
        .split('\n')
        .forEach((line, i) => {
          const code = line.replace(/\/\/.*$/, '');
          // `a ** b` is Number::exponentiate, approximated like Math.pow (ECMA-262, §6.1.6.1.3).
          if (APPROXIMATED.test(code) || /[\w)\]]\s*\*\*\s*[\w(]/.test(code)) offenders.push(`${file}:${i + 1}: ${line.trim()}`);
        });
    }
    expect(offenders).toEqual([]);
  });
});
