import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';
import { describeSide, distributionSentence, histogram, looksNormal, qqPoints } from '../../../../src/lib/cohort/distribution';
import reference from '../statistics/reference.json';

describe('the distribution check', () => {
  it('K² and skewness of the girls\' heights match SciPy 1.17.1 (stats.normaltest, stats.skew; reference.json)', () => {
    const x = reference.k2.girls.x.map((value, i) => ({ subject: `G${i}`, value }));
    const side = describeSide(x);
    assertClose(side.skewness!, reference.k2.girls.skewness, 1e-12, 'skewness');
    assertClose(side.normality!.k2, reference.k2.girls.k2, 1e-9, 'K²');
    assertClose(side.normality!.p, reference.k2.girls.p, 1e-9, 'p');
    // Sturges: ⌈log₂ 44⌉ + 1 = 7 bins holding all 44 values.
    expect(side.histogram).toHaveLength(7);
    expect(side.histogram.reduce((a, b) => a + b.count, 0)).toBe(44);
  });

  it('Q–Q positions are Blom\'s: the middle of 3 is 0, and Φ⁻¹(0.975) = 1.960 (NIST/SEMATECH e-Handbook, 1.3.6.7.1)', () => {
    const q = qqPoints([{ subject: 'a', value: 5 }, { subject: 'b', value: 1 }, { subject: 'c', value: 3 }]);
    expect(q.map((p) => p.sample)).toEqual([1, 3, 5]);
    assertClose(q[1].theoretical, 0, 1e-9);
    assertClose(q[0].theoretical, -q[2].theoretical, 1e-9);
    // (i − 3/8)/(n + 1/4) = 0.975 for i = 39.375 of n = 40: not a whole i, so check the inverse itself at n = 1:
    // the single point sits at Φ⁻¹((1 − 0.375)/1.25) = Φ⁻¹(0.5) = 0.
    assertClose(qqPoints([{ subject: 'x', value: 1 }])[0].theoretical, 0, 1e-9);
    // Blom position of i = 40, n = 40 is 39.625/40.25 = 0.98447; Φ⁻¹(0.98447) = 2.1560 (normal table, from memory: Φ(2.156) ≈ 0.98446).
    const forty = qqPoints(Array.from({ length: 40 }, (_, i) => ({ subject: `s${i}`, value: i })));
    assertClose(forty[39].theoretical, 2.156, 2e-3);
  });

  it('over 50 seeded cohorts of 40, normal dB values mostly look normal and their raw power (10^(dB/10)) almost never does', () => {
    let rawNormal = 0;
    let dbNormal = 0;
    let sentence = '';
    for (let seed = 1; seed <= 50; seed++) {
      const z = seededNormal(seed);
      const db = Array.from({ length: 40 }, (_, i) => ({ subject: `S${i}`, value: 2 + 4 * z() }));
      const raw = db.map((d) => ({ subject: d.subject, value: 50 * 10 ** (d.value / 10) }));
      const r = describeSide(raw);
      const n = describeSide(db);
      if (looksNormal(r)) rawNormal++;
      if (looksNormal(n)) dbNormal++;
      if (seed === 1) sentence = distributionSentence('theta · early', r, n);
    }
    console.log(`normal-looking: dB ${dbNormal} of 50, raw ${rawNormal} of 50`);
    // K² at 0.05 keeps a normal sample about 95 % of the time (its size; common practice).
    expect(dbNormal).toBeGreaterThanOrEqual(40);
    expect(rawNormal).toBeLessThanOrEqual(5);
    expect(sentence).toMatch(/^For theta · early, the normalized values look close to normal and raw power does not/);
  });

  it('says when there are too few subjects for K²', () => {
    const few = [1, 2, 3, 4, 5].map((value) => ({ subject: String(value), value }));
    const s = describeSide(few);
    expect(s.normality).toBeNull();
    expect(distributionSentence('x', s, s)).toMatch(/too few for the K² test \(it needs 8\)/);
  });

  it('histogram: a constant sample is one bin; the maximum falls in the last bin', () => {
    expect(histogram([2, 2, 2])).toEqual([{ from: 2, to: 2, count: 3 }]);
    const h = histogram([0, 1, 2, 3, 4, 5, 6, 7]);
    expect(h).toHaveLength(4);
    expect(h.map((b) => b.count)).toEqual([2, 2, 2, 2]);
  });
});
