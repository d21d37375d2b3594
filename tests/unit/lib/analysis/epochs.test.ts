import { describe, expect, it } from 'vitest';
import { epochLength, epochTimes, selectEpochs } from '../../../../src/lib/analysis/epochs';
import { assertClose } from '../../../helpers/assert-close';

const ev = (onsetSeconds: number, label = 'go') => ({ onsetSeconds, durationSeconds: 0, label });

describe('epochs', () => {
  it('builds the contract time grid t_j = start + j/fs, j = 0 … round((end − start)·fs)', () => {
    expect(epochLength(-1, 2, 512)).toBe(1537);
    const t = epochTimes(-0.5, 0.5, 4);
    assertClose(t, [-0.5, -0.25, 0, 0.25, 0.5], 1e-15);
  });

  it('starts an epoch at round(o·fs) + round(start·fs) and drops those that do not fit', () => {
    // fs 10: onset 1.04 s → sample 10; start −0.5 → −5; start 5. Onset 0.2 → start −3 (dropped, before the start);
    // onset 9.8 with 11 samples → ends at 98 + 6 = 104 > 100 (dropped, past the end).
    const sel = selectEpochs([ev(1.04), ev(0.2), ev(9.8), ev(5, 'other'), ev(5)], 'go', -0.5, 11, 10, 100);
    expect(Array.from(sel.starts)).toEqual([5, 45]);
    expect(sel.droppedOutside).toBe(2);
    expect(sel.matched).toBe(4);
  });

  it('drops epochs that contain the start of a new continuous block', () => {
    // a block starting at sample 50 may begin an epoch, but not fall inside one
    const sel = selectEpochs([ev(5), ev(5.5), ev(3)], 'go', 0, 10, 10, 100, [50]);
    expect(Array.from(sel.starts)).toEqual([50, 55, 30]);
    expect(sel.droppedGap).toBe(0);
    const crossing = selectEpochs([ev(4.5)], 'go', 0, 10, 10, 100, [50]);
    expect(crossing.starts.length).toBe(0);
    expect(crossing.droppedGap).toBe(1);
  });
});
