import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { applyOverride, checkEpochs, epochStats, peakToPeak, standardDeviation, tallyByCondition, type RejectionRule } from '../../../../src/lib/analysis/rejection';
import { selectEpochs } from '../../../../src/lib/analysis/epochs';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { assertClose } from '../../../helpers/assert-close';

const allChannels: RejectionRule = { peakToPeakMicrovolts: 150, flatMicrovolts: 0.5, channelIndices: null };

/** 10 Hz, 100 samples (10 s): channel A alternates ±1 µV, channel B alternates ±3 µV. Hand-built for the checks. */
function smallRecording(): Recording {
  const a = new Float32Array(100);
  const b = new Float32Array(100);
  for (let i = 0; i < 100; i++) {
    a[i] = i % 2 === 0 ? 1 : -1;
    b[i] = i % 2 === 0 ? 3 : -3;
  }
  return { sampleRateHz: 10, channelNames: ['A', 'B'], data: [a, b], events: [] };
}

describe('peakToPeak and standardDeviation', () => {
  it('peakToPeak is max − min over the span', () => {
    // By hand: max 9, min −5 → 14; the span [1, 4) holds −1, 4, 1 → 5.
    const x = Float32Array.from([3, -1, 4, 1, -5, 9]);
    expect(peakToPeak(x, 0, 6)).toBe(14);
    expect(peakToPeak(x, 1, 4)).toBe(5);
  });

  it('standardDeviation is the population SD (worked example 2, 4, 4, 4, 5, 5, 7, 9 → 2)', () => {
    // The textbook example: mean 5, squared deviations sum to 32, 32/8 = 4, √4 = 2 (from memory; check by hand).
    assertClose(standardDeviation(Float32Array.from([2, 4, 4, 4, 5, 5, 7, 9]), 0, 8), 2, 1e-12);
    // The same values on a 1 000 000 µV offset (exact in float32): shifting does not change the SD.
    assertClose(standardDeviation(Float32Array.from([2, 4, 4, 4, 5, 5, 7, 9].map((v) => v + 1e6)), 0, 8), 2, 1e-9);
    // A constant is flat: SD exactly 0.
    expect(standardDeviation(new Float32Array(50).fill(-12.3), 0, 50)).toBe(0);
  });

  it('standardDeviation agrees with the two-pass definition on random data (fast-check)', () => {
    // Definition: mean first, then the mean squared deviation (two passes, Float64).
    fc.assert(
      fc.property(fc.array(fc.float({ min: -1000, max: 1000, noNaN: true }), { minLength: 1, maxLength: 200 }), (values) => {
        const x = Float32Array.from(values);
        let mean = 0;
        for (const v of x) mean += v;
        mean /= x.length;
        let ss = 0;
        for (const v of x) ss += (v - mean) ** 2;
        assertClose(standardDeviation(x, 0, x.length), Math.sqrt(ss / x.length), 1e-6 * (1 + Math.sqrt(ss / x.length)));
      }),
    );
  });
});

describe('epochStats', () => {
  it('gives exactly peakToPeak and standardDeviation in one pass, on any span of random data (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.float({ min: -1e4, max: 1e4, noNaN: true }), { minLength: 1, maxLength: 300 }),
        fc.nat(),
        fc.nat(),
        (values, a, b) => {
          const x = Float32Array.from(values);
          const start = a % x.length;
          const end = start + (b % (x.length - start + 1));
          const out = new Float64Array(2);
          epochStats(x, start, end, out);
          expect(out[0]).toBe(peakToPeak(x, start, end));
          expect(out[1]).toBe(standardDeviation(x, start, end));
        },
      ),
    );
  });
});

describe('checkEpochs', () => {
  it('places the epoch at round(onset·fs) + round(start·fs) and rejects a spike inside it only', () => {
    const rec = smallRecording();
    // Event at 2.0 s, window −0.2…0.5 s at 10 Hz: start 20 − 2 = 18, length round(0.7·10) + 1 = 8 → samples 18…25.
    rec.data[0][25] = 200; // last sample of the first epoch → A's peak-to-peak 200 − (−1) = 201 µV > 150
    rec.data[0][66] = 200; // just past the second epoch (event 6.0 s → samples 58…65)
    const checks = checkEpochs(
      rec,
      [
        { eventIndex: 0, condition: 'c', onsetSeconds: 2 },
        { eventIndex: 1, condition: 'c', onsetSeconds: 6 },
      ],
      { start: -0.2, end: 0.5 },
      allChannels,
    );
    expect(checks[0].startSample).toBe(18);
    expect(checks[0].rejectedByRules).toBe(true);
    expect(checks[0].peakToPeakMicrovolts).toBe(201);
    expect(checks[0].peakToPeakChannel).toBe('A');
    expect(checks[0].reasons).toEqual(['peak-to-peak 201 µV on A']);
    expect(checks[1].startSample).toBe(58);
    expect(checks[1].rejectedByRules).toBe(false);
    // B alternates ±3 µV: peak-to-peak 6, SD 3 (by hand); A alternates ±1: SD 1, the smallest.
    expect(checks[1].peakToPeakMicrovolts).toBe(6);
    assertClose(checks[1].minStdMicrovolts!, 1, 1e-12);
    expect(checks[1].minStdChannel).toBe('A');
  });

  it('rejects a threshold-crossing epoch only when the amplitude exceeds it strictly', () => {
    const rec = smallRecording();
    rec.data[1][20] = 147; // B: 147 − (−3) = 150 µV, equal to the threshold → kept
    const kept = checkEpochs(rec, [{ eventIndex: 0, condition: 'c', onsetSeconds: 2 }], { start: -0.2, end: 0.5 }, allChannels);
    expect(kept[0].peakToPeakMicrovolts).toBe(150);
    expect(kept[0].rejectedByRules).toBe(false);
    const stricter = checkEpochs(rec, [{ eventIndex: 0, condition: 'c', onsetSeconds: 2 }], { start: -0.2, end: 0.5 }, { ...allChannels, peakToPeakMicrovolts: 149.9 });
    expect(stricter[0].rejectedByRules).toBe(true);
  });

  it('finds a flat channel, and checks only the chosen channels when asked', () => {
    const rec = smallRecording();
    rec.data[1].fill(7, 10, 40); // B held at 7 µV over samples 10…39; the epoch 18…25 lies inside → SD 0
    const window = { start: -0.2, end: 0.5 };
    const one = [{ eventIndex: 0, condition: 'c', onsetSeconds: 2 }];
    const all = checkEpochs(rec, one, window, allChannels);
    expect(all[0].reasons).toEqual(['flat on B (SD 0.00 µV)']);
    expect(all[0].minStdMicrovolts).toBe(0);
    const onlyA = checkEpochs(rec, one, window, { ...allChannels, channelIndices: [0] });
    expect(onlyA[0].rejectedByRules).toBe(false);
    const noFlatRule = checkEpochs(rec, one, window, { ...allChannels, flatMicrovolts: null });
    expect(noFlatRule[0].rejectedByRules).toBe(false);
  });

  it('counts epochs outside the recording and across a gap, as selectEpochs does', () => {
    const rec: Recording = { ...smallRecording(), gapSampleIndices: [50] };
    const events = [0.1, 5.0, 5.2, 9.5, 3.0].map((onsetSeconds) => ({ onsetSeconds, durationSeconds: 0, label: 'x' }));
    const window = { start: -0.2, end: 0.5 };
    const checks = checkEpochs(rec, events.map((e, i) => ({ eventIndex: i, condition: 'c', onsetSeconds: e.onsetSeconds })), window, allChannels);
    // By hand (length 8): 0.1 s → start −1 (before the start); 5.0 s → 48…55 holds the block start 50 (gap);
    // 5.2 s → 50…57 begins at the block start (fits); 9.5 s → 93…100 runs past sample 99 (outside); 3.0 s fits.
    expect(checks.map((c) => c.fit)).toEqual(['outside', 'gap', 'fits', 'outside', 'fits']);
    expect(checks[0].reasons).toEqual(['outside the recording']);
    expect(checks[1].reasons).toEqual(['spans a recording gap']);
    const tally = tallyByCondition(checks.map((c) => ({ condition: c.condition, rejected: c.rejectedByRules, fit: c.fit })));
    expect(tally).toEqual([{ condition: 'c', total: 5, kept: 2, rejected: 3, outside: 2, gap: 1 }]);
    // The analysis core's own epoch selection drops the same ones.
    const selection = selectEpochs(events, 'x', window.start, 8, 10, 100, [50]);
    expect([selection.droppedOutside, selection.droppedGap, selection.starts.length]).toEqual([2, 1, 2]);
  });

  it('names the bad setting', () => {
    const rec = smallRecording();
    expect(() => checkEpochs(rec, [], { start: 0.5, end: 0.5 }, allChannels)).toThrow(/epochs\.end .*must be after epochs\.start/);
    expect(() => checkEpochs(rec, [], { start: 0, end: 1 }, { ...allChannels, peakToPeakMicrovolts: -1 })).toThrow(/peakToPeakMicrovolts must be a positive/);
    expect(() => checkEpochs(rec, [], { start: 0, end: 1 }, { ...allChannels, channelIndices: [2] })).toThrow(/rejection\.channels index 2/);
  });
});

describe('applyOverride', () => {
  const rec = smallRecording();
  rec.data[0][20] = 500;
  const [bad, good, outside] = checkEpochs(
    rec,
    [
      { eventIndex: 0, condition: 'c', onsetSeconds: 2 },
      { eventIndex: 1, condition: 'c', onsetSeconds: 6 },
      { eventIndex: 2, condition: 'c', onsetSeconds: 9.9 },
    ],
    { start: -0.2, end: 0.5 },
    allChannels,
  );

  it('lets a person keep a rule-rejected epoch or reject a clean one', () => {
    expect(applyOverride(bad, 'keep')).toMatchObject({ rejected: false, manual: 'keep' });
    expect(applyOverride(good, 'reject')).toEqual({ rejected: true, reasons: ['manual'], manual: 'reject' });
    expect(applyOverride(good, undefined)).toEqual({ rejected: false, reasons: [], manual: null });
  });

  it('never keeps an epoch that does not fit the recording', () => {
    expect(applyOverride(outside, 'keep')).toEqual({ rejected: true, reasons: ['outside the recording'], manual: null });
  });
});

describe('checkEpochs on the same samples again (remembered epoch statistics)', () => {
  it('gives what a first check of fresh copies gives, for every threshold, channel choice and window', () => {
    // The statistics of each epoch are remembered per channel array and epoch length; every answer must equal a
    // check of copies of the arrays (new arrays, nothing remembered), field for field.
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.array(fc.record({ p2p: fc.option(fc.double({ min: 1, max: 200, noNaN: true }), { nil: null }), flat: fc.option(fc.double({ min: 0, max: 5, noNaN: true }), { nil: null }), end: fc.constantFrom(0.5, 0.8), both: fc.boolean() }), { minLength: 1, maxLength: 6 }),
        (seed, steps) => {
          let state = seed;
          const next = () => ((state = (state * 16807) % 2147483647) / 2147483647 - 0.5) * 80;
          const data = [0, 1].map(() => Float32Array.from({ length: 4000 }, next));
          const recording: Recording = { sampleRateHz: 100, channelNames: ['Fz', 'Cz'], data, events: [] };
          const assignments = Array.from({ length: 30 }, (_, k) => ({ eventIndex: k, condition: 'a', onsetSeconds: 0.5 + k * 1.3 }));
          for (const step of steps) {
            const rule: RejectionRule = { peakToPeakMicrovolts: step.p2p, flatMicrovolts: step.flat, channelIndices: step.both ? null : [1] };
            const window = { start: -0.2, end: step.end };
            const again = checkEpochs(recording, assignments, window, rule);
            const fresh = checkEpochs({ ...recording, data: data.map((x) => x.slice()) }, assignments, window, rule);
            expect(again).toEqual(fresh);
          }
        },
      ),
      { numRuns: 40 },
    );
  });
});
