import { describe, expect, it } from 'vitest';
import { FORMAT_1_NOTICE, parseRecipe, readRecipe } from '../../../../src/lib/analysis/recipe';
import { eventKey, parseEventKey } from '../../../../src/lib/analysis/event-key';

// The example recipe of the analysis contract (shared/specs/analysis.md, "Recipe (input), format 2"), verbatim.
const contract = {
  format: 2,
  epochs: { events: ['cue/left', 'cue/right'], start: -1.0, end: 2.0 },
  channels: ['Fz', 'Cz'],
  frequencies: { min: 2, max: 40, count: 30, spacing: 'log' },
  cycles: { min: 3, max: 10 },
  baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2.0, overlap: 0.5, range: [1, 45], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

const extended = {
  ...contract,
  epochs: { ...contract.epochs, events: ['left', 'right'] },
  conditions: { left: ['cue/left'], right: ['cue/right'] },
  rejection: { peakToPeakMicrovolts: 120, flatMicrovolts: 0.5, scope: 'channel', channels: ['Fz'], overrides: { '3@12.5:cue/left': 'keep', '7@30.002:cue/right': 'reject' } },
  recording: { fingerprint: 'a'.repeat(64) },
};

describe('parseRecipe with the recipe extensions', () => {
  it('parses the contract example unchanged, with no extension fields added', () => {
    const r = parseRecipe(contract);
    expect(r).toEqual(contract);
    expect('conditions' in r || 'rejection' in r || 'recording' in r).toBe(false);
  });

  it('parses conditions, rejection with overrides, and a recording fingerprint', () => {
    const r = parseRecipe(extended);
    expect(r.conditions).toEqual({ left: ['cue/left'], right: ['cue/right'] });
    expect(r.rejection?.overrides['3@12.5:cue/left']).toBe('keep');
    expect(r.recording?.fingerprint).toHaveLength(64);
  });

  it('fills rejection defaults: scope "any" and no overrides; null turns a rule off', () => {
    const r = parseRecipe({ ...contract, rejection: { peakToPeakMicrovolts: null, flatMicrovolts: null } });
    expect(r.rejection).toEqual({ peakToPeakMicrovolts: null, flatMicrovolts: null, scope: 'any', overrides: {} });
  });

  it('names the bad field', () => {
    const bad = (patch: object) => () => parseRecipe({ ...contract, ...patch });
    expect(bad({ conditions: { left: [] } })).toThrow(/^conditions\.left must list at least one event label/);
    expect(bad({ conditions: ['cue/left'] })).toThrow(/^conditions must map each condition name/);
    expect(bad({ rejection: { peakToPeakMicrovolts: -5, flatMicrovolts: null } })).toThrow(/^rejection\.peakToPeakMicrovolts must be greater than 0/);
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, scope: 'some' } })).toThrow(/^rejection\.scope /);
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, overrides: { '12': 'keep' } } })).toThrow(/^rejection\.overrides\["12"\] must be an event key/);
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, overrides: { '1@2:x': 'maybe' } } })).toThrow(/^rejection\.overrides\["1@2:x"\] /);
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, threshold: 3 } })).toThrow(/^rejection /);
    expect(bad({ recording: { fingerprint: 'ABC' } })).toThrow(/^recording\.fingerprint must be a SHA-256/);
    expect(bad({ recording: { units: { '%': 0 } } })).toThrow(/^recording\.units\["%"\] must be greater than 0/);
    expect(bad({ recording: { units: { arb: -2 } } })).toThrow(/^recording\.units\.arb must be greater than 0/);
    expect(bad({ recording: { exclude: [''] } })).toThrow(/^recording\.exclude\[0\] must not be empty/);
    expect(bad({ recording: { unitFactors: { arb: 1 } } })).toThrow(/^recording /);
  });

  it('refuses settings that would be accepted and then silently do nothing or the wrong thing', () => {
    const bad = (patch: object) => () => parseRecipe({ ...contract, ...patch });
    // scope "channel" with no channel to check would reject nothing; "any" with channels would ignore them.
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, scope: 'channel' } })).toThrow(/^rejection\.channels must name at least one channel/);
    expect(bad({ rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: null, scope: 'any', channels: ['Fz'] } })).toThrow(/^rejection\.channels applies only with scope "channel"/);
    // The contract fixes the µV factors of uV/µV/mV/V/nV; a recipe may map only other units.
    expect(bad({ recording: { units: { uV: 1000 } } })).toThrow(/^recording\.units\.uV is a unit the reader already knows/);
    expect(bad({ recording: { units: { arb: 1e12 } } })).toThrow(/^recording\.units\.arb must be at most 1e9/);
    // A padded condition name would never match the names in epochs.events.
    expect(bad({ conditions: { 'lamp ': ['cue/left'] } })).toThrow(/must not begin or end with spaces/);
  });

  it('parses how the file was read (units and exclude) with or without a fingerprint', () => {
    const r = parseRecipe({ ...contract, recording: { units: { '%': 2.5, '': 1 }, exclude: ['Resp'] } });
    expect(r.recording).toEqual({ units: { '%': 2.5, '': 1 }, exclude: ['Resp'] });
    expect(parseRecipe({ ...extended, recording: { ...extended.recording, exclude: ['Resp'] } }).recording?.fingerprint).toHaveLength(64);
  });
});

// Format 1, as the contract lists its names ("epochs.tmin/tmax, methods db/percent/zscore/ratio, aperiodic.mode
// fixed/knee"): the same example written the way recipes were written before format 2.
const format1 = {
  epochs: { events: ['cue/left', 'cue/right'], tmin: -1.0, tmax: 2.0 },
  channels: ['Fz', 'Cz'],
  frequencies: { min: 2, max: 40, count: 30, spacing: 'log' },
  cycles: { min: 3, max: 10 },
  baseline: { start: -0.5, end: -0.2, method: 'db', scope: 'average' },
  spectrum: { segment: 2.0, overlap: 0.5, range: [1, 45], source: 'recording' },
  aperiodic: { range: [2, 40], mode: 'fixed' },
};

describe('recipe formats', () => {
  it('reads format 2 without a notice', () => {
    expect(readRecipe(contract)).toEqual({ recipe: contract, notice: null });
  });

  it('reads a recipe without "format" as format 1 and upgrades it to format 2 with a one-line notice', () => {
    const { recipe, notice } = readRecipe(format1);
    expect(recipe).toEqual(contract);
    expect(notice).toBe(FORMAT_1_NOTICE);
    expect(notice).not.toMatch(/\n/);
    expect(readRecipe({ ...format1, format: 1 }).recipe).toEqual(contract);
  });

  it('maps every format-1 method and model name to its format-2 name', () => {
    const pairs = [['db', 'decibel'], ['percent', 'percent-change'], ['zscore', 'z-score'], ['ratio', 'power-ratio']] as const;
    for (const [old, now] of pairs) expect(parseRecipe({ ...format1, baseline: { ...format1.baseline, method: old } }).baseline.method).toBe(now);
    expect(parseRecipe({ ...format1, aperiodic: { range: [2, 40], mode: 'knee' } }).aperiodic).toEqual({ range: [2, 40], model: 'power-law-knee' });
    // the extensions come along unchanged
    const { format: _f, ...rest } = extended;
    const old = { ...rest, ...format1, epochs: { ...format1.epochs, events: ['left', 'right'] } };
    expect(parseRecipe(old).rejection).toEqual(parseRecipe(extended).rejection);
  });

  it('names the field when the formats are mixed up or unknown', () => {
    const { format: _f, ...unmarked } = contract;
    expect(() => parseRecipe(unmarked)).toThrow(/^format is missing: .*add "format": 2/);
    expect(() => parseRecipe({ ...contract, format: 3 })).toThrow(/^format is 3; this version reads recipe formats 1 and 2/);
    expect(() => parseRecipe({ ...format1, format: 2 })).toThrow(/^epochs\.start /);
    expect(() => parseRecipe({ ...format1, baseline: { ...format1.baseline, method: 'dB' } })).toThrow(/^baseline\.method must be one of "db", "percent", "zscore", "ratio" \(format 1\)/);
    expect(() => parseRecipe({ ...contract, aperiodic: { range: [2, 40], model: 'fixed' } })).toThrow(/^aperiodic\.model must be "power-law" or "power-law-knee"/);
    expect(() => parseRecipe([contract])).toThrow(/^recipe must be a JSON object/);
  });
});

describe('event keys', () => {
  it('round-trip index, onset and a label holding ":" and "@"', () => {
    const key = eventKey(12, { onsetSeconds: 30.25, durationSeconds: 0, label: 'cue:left@A' });
    expect(key).toBe('12@30.25:cue:left@A');
    expect(parseEventKey(key)).toEqual({ index: 12, onsetSeconds: 30.25, label: 'cue:left@A' });
    expect(parseEventKey('x@1:a')).toBeNull();
    expect(parseEventKey('1@1:')).toBeNull();
  });
});
