import { describe, expect, it } from 'vitest';
import { cleanNumber, isRoutineNotice, rayleighMarks } from '../../../../../src/lib/client/workspace/maps';

describe('the Maps screen’s controller helpers', () => {
  it('writes a grid time without binary floating-point noise, moving it by at most 4 ulps', () => {
    // The epoch grid t_j = start + j/fs (epochs.ts): −0.5 + 16/500 in IEEE 754 doubles is −0.46799999999999997.
    const noisy = -0.5 + 16 / 500;
    expect(String(noisy)).toBe('-0.46799999999999997');
    expect(cleanNumber(noisy)).toBe(-0.468);
    expect(cleanNumber(-0.31399999999999995)).toBe(-0.314);
    expect(cleanNumber(0.1 + 0.2)).toBe(0.3);
    // A value that really has many digits keeps them.
    expect(cleanNumber(1 / 3)).toBe(1 / 3);
    expect(cleanNumber(Math.PI)).toBe(Math.PI);
    expect(cleanNumber(-2)).toBe(-2);
  });

  it('tells routine rejection counts from problems, by the core’s own wording (run-recipe.ts)', () => {
    expect(isRoutineNotice('rejection "lamp-watch": 3 of 40 epochs rejected; 37 kept')).toBe(true);
    expect(isRoutineNotice('rejection "oar-pull": 2 of 41 epochs rejected (1 by hand); 39 kept')).toBe(true);
    expect(isRoutineNotice('epochs.events[0] "lamp-watch": 2 of 40 epochs dropped (2 run past the recording\'s start or end, 0 span a gap)')).toBe(false);
    expect(isRoutineNotice('rejection: meg-magnetometer channels are not checked (no rejection.byType["meg-magnetometer"] limits in their unit)')).toBe(false);
  });

  it('marks phase consistency where Rayleigh’s p < 0.05 (Zar 1999, eq. 27.4; from memory)', () => {
    // For n = 30, Zar's table of critical values of Rayleigh's z gives z(0.05) ≈ 2.97 (from memory), so
    // r = √(z/n) ≈ 0.315: 0.30 is not marked, 0.33 is; r = 0 and r = 1 are the extremes.
    expect(Array.from(rayleighMarks([0, 0.3, 0.33, 1], 30))).toEqual([0, 0, 1, 1]);
  });
});
