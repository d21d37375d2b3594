import { describe, expect, it } from 'vitest';
import { prepareRecording, type PrepareSpec } from '../../../../src/lib/analysis/prepare-recording';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';

/**
 * Invented by hand for these checks: 10 Hz, 100 samples (10 s). Channel A alternates ±1 µV with one 200 µV spike at
 * sample 45; channel B alternates ±3 µV but sits flat at 0.2 µV over samples 72…95. Events: go 2 s, stop 3 s,
 * go 4.5 s, noise 5 s (in no condition), stop 8 s, go 9.5 s.
 */
function recording(): Recording {
  const a = new Float32Array(100);
  const b = new Float32Array(100);
  for (let i = 0; i < 100; i++) {
    a[i] = i % 2 === 0 ? 1 : -1;
    b[i] = i >= 72 && i <= 95 ? 0.2 : i % 2 === 0 ? 3 : -3;
  }
  a[45] = 200;
  const at = (onsetSeconds: number, label: string) => ({ onsetSeconds, durationSeconds: 0, label });
  return { sampleRateHz: 10, channelNames: ['A', 'B'], data: [a, b], events: [at(2, 'go'), at(3, 'stop'), at(4.5, 'go'), at(5, 'noise'), at(8, 'stop'), at(9.5, 'go')] };
}

// Window −0.5 … 1.0 s at 10 Hz: 16 samples from round(o·10) − 5 (analysis contract, "Units and grids"). By hand:
// go@2 → 15…30 fits; stop@3 → 25…40 fits; go@4.5 → 40…55 holds the spike (200 − (−1) = 201 µV > 150);
// stop@8 → 75…90 lies in B's flat stretch (SD 0 < 0.5 µV); go@9.5 → 90…105 runs past sample 99 (outside).
const spec: PrepareSpec = {
  epochs: { events: ['GO', 'STOP'], start: -0.5, end: 1.0 },
  conditions: { GO: ['go'], STOP: ['stop'] },
  rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: 0.5, scope: 'any' },
};

describe('prepareRecording', () => {
  it('leaves a recipe without conditions or rejection on the contract path, untouched', () => {
    const rec = recording();
    const p = prepareRecording(rec, { epochs: { events: ['go'], start: -0.5, end: 1 } });
    expect(p.applied).toBe(false);
    expect(p.recording).toBe(rec);
  });

  it('drops the epochs the rules reject and the one that does not fit, and says why', () => {
    const rec = recording();
    const p = prepareRecording(rec, spec);
    expect(p.decisions.map((d) => [d.eventIndex, d.condition, d.rejected, d.fit])).toEqual([
      [0, 'GO', false, 'fits'],
      [1, 'STOP', false, 'fits'],
      [2, 'GO', true, 'fits'],
      [4, 'STOP', true, 'fits'],
      [5, 'GO', true, 'outside'],
    ]);
    expect(p.decisions[2].reasons).toEqual(['peak-to-peak 201 µV on A']);
    expect(p.decisions[3].reasons[0]).toMatch(/^flat on B/);
    expect(p.decisions[2].key).toBe('2@4.5:go');
    expect(p.counts).toEqual([
      { condition: 'GO', total: 3, kept: 1, rejected: 1, manualRejects: 0, manualKeeps: 0, outside: 1, gap: 0 },
      { condition: 'STOP', total: 2, kept: 1, rejected: 1, manualRejects: 0, manualKeeps: 0, outside: 0, gap: 0 },
    ]);
    // Kept epochs only, relabelled to their condition, in event order; the samples are the same arrays.
    expect(p.recording.events.map((e) => [e.onsetSeconds, e.label])).toEqual([[2, 'GO'], [3, 'STOP']]);
    expect(p.recording.data).toBe(rec.data);
  });

  it('lets a manual keep rescue a rejected epoch and a manual reject drop a clean one, but cannot keep one outside', () => {
    const p = prepareRecording(recording(), { ...spec, rejection: { ...spec.rejection!, overrides: { '2@4.5:go': 'keep', '1@3:stop': 'reject', '5@9.5:go': 'keep' } } });
    expect(p.recording.events.map((e) => [e.onsetSeconds, e.label])).toEqual([[2, 'GO'], [4.5, 'GO']]);
    expect(p.decisions[2].manual).toBe('keep');
    expect(p.decisions[1].reasons).toEqual(['manual']);
    expect(p.decisions[4]).toMatchObject({ rejected: true, manual: null, fit: 'outside' });
    expect(p.counts[0]).toMatchObject({ kept: 2, rejected: 0, manualKeeps: 1, outside: 1 });
    expect(p.counts[1]).toMatchObject({ kept: 0, rejected: 2, manualRejects: 1 });
  });

  it('counts a manual keep of an epoch the rules already keep as no change', () => {
    // Event 0 (go at 2 s) passes the rules; keeping it by hand is not "kept against the rules".
    const p = prepareRecording(recording(), { ...spec, rejection: { ...spec.rejection!, overrides: { '0@2:go': 'keep' } } });
    expect(p.decisions[0]).toMatchObject({ rejected: false, manual: 'keep', rejectedByRules: false });
    expect(p.counts[0].manualKeeps).toBe(0);
  });

  it('checks only the named channels with scope "channel" (B’s flat stretch is then not seen)', () => {
    const p = prepareRecording(recording(), { ...spec, rejection: { ...spec.rejection!, scope: 'channel', channels: ['A'] } });
    expect(p.decisions.find((d) => d.eventIndex === 4)!.rejected).toBe(false);
    expect(() => prepareRecording(recording(), { ...spec, rejection: { ...spec.rejection!, scope: 'channel', channels: ['Cz'] } })).toThrow(/^rejection\.channels\[0\] names no signal/);
  });

  it('treats a plain label in epochs.events as its own condition, and refuses one a condition already holds', () => {
    const p = prepareRecording(recording(), { epochs: { events: ['go'], start: -0.5, end: 1 }, rejection: spec.rejection });
    expect(p.counts).toEqual([{ condition: 'go', total: 3, kept: 1, rejected: 1, manualRejects: 0, manualKeeps: 0, outside: 1, gap: 0 }]);
    expect(() => prepareRecording(recording(), { ...spec, epochs: { ...spec.epochs, events: ['GO', 'stop'] } })).toThrow(/^epochs\.events\[1\] "stop" is a label of condition "STOP"/);
  });

  it('refuses an override whose event is not the one in this recording, naming the key', () => {
    const wrong = (key: string) => () => prepareRecording(recording(), { ...spec, rejection: { ...spec.rejection!, overrides: { [key]: 'keep' } } });
    expect(wrong('2@4.5:stop')).toThrow(/^rejection\.overrides\["2@4\.5:stop"\] names "stop" at 4\.5 s, but event 2 of this recording is "go" at 4\.5 s/);
    expect(wrong('2@4.6:go')).toThrow(/is "go" at 4\.5 s/);
    expect(wrong('60@1:go')).toThrow(/names event 60, but the recording has 6 events/);
  });

  it('names a bad condition by its name', () => {
    expect(() => prepareRecording(recording(), { ...spec, conditions: { GO: ['go'], STOP: ['go'] } })).toThrow(/^conditions\["STOP"\] label "go" already belongs to condition "GO"/);
  });
});

describe('runRecipe with conditions and rejection', () => {
  const contract = {
    format: 2,
    frequencies: { min: 2, max: 3, count: 2, spacing: 'log' },
    cycles: { fixed: 1 },
    baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
    spectrum: { segment: 1, overlap: 0.5, range: [1, 4], source: 'epochs' },
    aperiodic: { range: [1, 4], model: 'power-law' },
  };

  it('counts kept, rejected and dropped epochs per condition and gives the numbers of the hand-picked epochs', () => {
    const recipe = { ...contract, epochs: spec.epochs, conditions: spec.conditions, rejection: { ...spec.rejection, overrides: { '2@4.5:go': 'keep' } } };
    const r = runRecipe(recording(), recipe);
    expect([r.conditions.GO.trials, r.conditions.GO.rejected, r.conditions.GO.dropped]).toEqual([2, 0, 1]);
    expect([r.conditions.STOP.trials, r.conditions.STOP.rejected, r.conditions.STOP.dropped]).toEqual([1, 1, 0]);
    expect(r.warnings).toContain('rejection "GO": 0 of 2 epochs rejected; 1 kept by hand against the rules; 2 kept');
    expect(r.warnings).toContain('rejection "STOP": 1 of 2 epochs rejected; 1 kept');
    // The same epochs chosen by hand (go@2, go@4.5 as GO; stop@3 as STOP) through the contract path alone.
    const byHand = recording();
    byHand.events = [
      { onsetSeconds: 2, durationSeconds: 0, label: 'GO' },
      { onsetSeconds: 3, durationSeconds: 0, label: 'STOP' },
      { onsetSeconds: 4.5, durationSeconds: 0, label: 'GO' },
    ];
    const plain = runRecipe(byHand, { ...contract, epochs: spec.epochs });
    expect(r.conditions.GO.normalized).toEqual(plain.conditions.GO.normalized);
    expect(r.conditions.STOP.power).toEqual(plain.conditions.STOP.power);
    expect(r.aperiodic).toEqual(plain.aperiodic);
  });

  it('warns when the recording is not the one the recipe was made on', () => {
    const rec = { ...recording(), fingerprint: 'b'.repeat(64) };
    const r = runRecipe(rec, { ...contract, epochs: spec.epochs, conditions: spec.conditions, recording: { fingerprint: 'a'.repeat(64) } });
    expect(r.warnings.some((w) => w.startsWith('recording.fingerprint: the recipe was made on a recording with SHA-256 aaaaaaaaaaaa'))).toBe(true);
    const same = runRecipe({ ...rec, fingerprint: 'a'.repeat(64) }, { ...contract, epochs: spec.epochs, conditions: spec.conditions, recording: { fingerprint: 'a'.repeat(64) } });
    expect(same.warnings.some((w) => w.startsWith('recording.fingerprint'))).toBe(false);
  });
});
