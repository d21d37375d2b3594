import { describe, expect, it } from 'vitest';
import { storageShare } from '../../../../src/components/source/format';

describe('storageShare (the Source screen storage meter)', () => {
  it('reads 144 KB of a 10 GB quota as a near-empty bar, not a full one', () => {
    // The case of issue 13: 144 KB used of the 10 GB Chromium granted. 147,456 / 10,737,418,240 = 1.37e-5 (by hand).
    const share = storageShare(144 * 1024, 10 * 1024 ** 3);
    expect(share.fraction).toBeCloseTo(1.373e-5, 8);
    expect(share.text).toBe('under 0.01 %');
    expect(share.fillPercent).toBe(0.5);
  });

  it('fills by the share once it is visible, caps at the quota and fills nothing for nothing stored', () => {
    expect(storageShare(2.5e9, 10e9)).toEqual({ fraction: 0.25, text: '25 %', fillPercent: 25 });
    expect(storageShare(3e7, 1e9)).toEqual({ fraction: 0.03, text: '3.00 %', fillPercent: 3 });
    expect(storageShare(12e9, 10e9).fillPercent).toBe(100);
    expect(storageShare(0, 10e9)).toEqual({ fraction: 0, text: '0 %', fillPercent: 0 });
  });

  it('says the share is unknown when the browser reports no quota', () => {
    expect(storageShare(1000, 0)).toEqual({ fraction: 0, text: 'unknown share', fillPercent: 0 });
  });
});
