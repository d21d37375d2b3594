import { describe, expect, it } from 'vitest';
import { scalpPosition } from '../../../../src/lib/plot/scalp-positions';
import { assertClose } from '../../../helpers/assert-close';

// Checks are properties of the 10-20 system's construction (common practice, from memory): Cz at the vertex,
// Fpz/T7/Oz/T8 on the 10 % ring, midline points 20 % apart, left hemisphere odd numbers.
describe('scalpPosition', () => {
  it('puts Cz at the centre and T7, T8 on the ring at the ears', () => {
    assertClose([scalpPosition('Cz')!.x, scalpPosition('Cz')!.y], [0, 0], 1e-12);
    assertClose([scalpPosition('T7')!.x, scalpPosition('T7')!.y], [-1, 0], 1e-12);
    assertClose([scalpPosition('T8')!.x, scalpPosition('T8')!.y], [1, 0], 1e-12);
  });
  it('spaces the midline evenly: Fz and Pz halfway between Cz and the ring', () => {
    assertClose(scalpPosition('Fz')!.y, 0.5, 1e-12);
    assertClose(scalpPosition('Pz')!.y, -0.5, 1e-12);
    assertClose(scalpPosition('Oz')!.y, -1, 1e-12);
  });
  it('places ring electrodes 18° apart: Fp1 at 18°, F7 at 54° from the nose', () => {
    const fp1 = scalpPosition('Fp1')!;
    assertClose(Math.atan2(-fp1.x, fp1.y) * (180 / Math.PI), 18, 1e-9);
    const f7 = scalpPosition('F7')!;
    assertClose(Math.hypot(f7.x, f7.y), 1, 1e-12);
    assertClose(Math.atan2(-f7.x, f7.y) * (180 / Math.PI), 54, 1e-9);
  });
  it('mirrors odd (left) and even (right) names and keeps C3 halfway to T7', () => {
    for (const [l, r] of [['F3', 'F4'], ['FC5', 'FC6'], ['CP1', 'CP2'], ['P3', 'P4'], ['TP9', 'TP10'], ['PO9', 'PO10'], ['O1', 'O2']]) {
      const a = scalpPosition(l)!;
      const b = scalpPosition(r)!;
      expect(a.x).toBeLessThan(0);
      assertClose([a.x, a.y], [-b.x, b.y], 1e-12, `${l}/${r}`);
    }
    assertClose([scalpPosition('C3')!.x, scalpPosition('C3')!.y], [-0.5, 0], 1e-12);
  });
  it('puts 9/10 positions outside the ring, accepts old names, rejects non-10-20 labels', () => {
    expect(Math.hypot(scalpPosition('TP9')!.x, scalpPosition('TP9')!.y)).toBeCloseTo(1.2, 9);
    expect(scalpPosition('T3')).toEqual(scalpPosition('T7'));
    expect(scalpPosition('EOG left')).toBeNull();
    expect(scalpPosition('X1')).toBeNull();
  });
});
