import { describe, expect, it } from 'vitest';
import { NoteInput, SummaryInput, SUMMARY_CAPS } from '../../../../src/lib/schemas/review';
import { smallSummary } from '../../../helpers/review';

const paths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) => (r.error?.issues ?? []).map((i) => i.path.join('.'));

describe('summary schema', () => {
  it('accepts a small summary', () => {
    expect(SummaryInput.safeParse(smallSummary()).success).toBe(true);
  });
  it('refuses identifying or unknown fields by name, at any level', () => {
    const s = { ...smallSummary(), patient: 'X X X', fileName: 'sub-01.edf' };
    expect(paths(SummaryInput.safeParse(s))).toEqual(['']);
    expect(SummaryInput.safeParse(s).error!.issues[0].message).toMatch(/patient.*fileName|fileName.*patient/);
    const nested = smallSummary();
    (nested.bandValues[0] as Record<string, unknown>).recording = 'sub-01.edf';
    expect(paths(SummaryInput.safeParse(nested))).toEqual(['bandValues.0']);
  });
  it('refuses a label that looks like a file name', () => {
    const s = smallSummary();
    s.channels[1] = 'harbour-lights-01.edf';
    expect(paths(SummaryInput.safeParse(s))).toContain('channels.1');
  });
  it('refuses a run of values longer than a cap (raw samples stay in the browser)', () => {
    const s = smallSummary();
    s.trialValues[0].values = Array.from({ length: SUMMARY_CAPS.trialsPerRow + 1 }, (_, i) => i);
    const r = SummaryInput.safeParse(s);
    expect(paths(r)).toEqual(['trialValues.0.values']);
    expect(r.error!.issues[0].message).toMatch(/at most 1000/);
    const m = smallSummary();
    m.maps[0].timesS = Array.from({ length: 129 }, (_, i) => i);
    expect(paths(SummaryInput.safeParse(m))).toContain('maps.0.timesS');
  });
  it('refuses references to bands, channels and groups the summary does not declare', () => {
    const s = smallSummary();
    s.bandValues[0].channel = 'Pz';
    s.maps[0].channelGroup = 'occipital';
    expect(paths(SummaryInput.safeParse(s)).sort()).toEqual(['bandValues.0.channel', 'maps.0.channelGroup']);
  });
  it('refuses a map whose rows do not match its axes', () => {
    const s = smallSummary();
    s.maps[0].values[1] = [1, 2];
    expect(paths(SummaryInput.safeParse(s))).toEqual(['maps.0.values.1']);
  });
});

describe('note schema', () => {
  it('needs a recipe version for an anchor, and one of channel or group', () => {
    expect(paths(NoteInput.safeParse({ body: 'x', anchor: { channel: 'Fz' } }))).toEqual(['anchor']);
    expect(paths(NoteInput.safeParse({ body: 'x', recipeVersion: 1, anchor: { channel: 'Fz', channelGroup: 'mid' } }))).toEqual(['anchor.channelGroup']);
    expect(NoteInput.safeParse({ body: 'x', recipeVersion: 1, anchor: { channel: 'Fz', condition: 'lamp', timeS: [0.1, 0.4], frequencyHz: [4, 8] } }).success).toBe(true);
    expect(paths(NoteInput.safeParse({ body: 'x', recipeVersion: 1, anchor: { timeS: [0.4, 0.1] } }))).toEqual(['anchor.timeS']);
  });
});
