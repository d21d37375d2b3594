// The report the Slope check screen sends: what slopeReportOf makes from a real bench run always passes the route's
// own schema (undefined figures become null, as JSON needs), and its CSV reads back as RFC 4180 (papaparse's parser).
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { runSlopeSweep, type SlopeSweepInput } from '../../../../src/lib/analysis/slope-check';
import { slopeReportCsv, slopeReportOf } from '../../../../src/lib/client/slope-report';
import { SlopeReportInput } from '../../../../src/lib/schemas/slope-reports';

const input: SlopeSweepInput = {
  truth: { offset: 1, durationSeconds: 8, sampleRateHz: 200, seed: 2 },
  exponents: [1, 2],
  settings: [
    { name: 'robust', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
    // 0.1–0.3 Hz holds no bin of a 2 s segment (bins every 0.5 Hz): every fit fails, so its figures are undefined.
    { name: 'empty, "quoted"', range: [0.1, 0.3], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
  ],
  repetitions: 2,
  coverage: null,
};

describe('slopeReportOf', () => {
  it('makes a report the route accepts, with failed settings as nulls', () => {
    const cells = runSlopeSweep(input);
    expect(cells[1].failed).toBe(2);
    const report = slopeReportOf('Unit check', input, cells, null);
    const parsed = SlopeReportInput.safeParse(report);
    // The second name holds a comma and quotes, which a Label refuses: the schema names the field.
    expect(parsed.success).toBe(false);
    expect(parsed.error!.issues.map((i) => i.path.join('.'))).toEqual(['settings.1.name', 'results.1.setting', 'results.3.setting']);
    const named = { ...input, settings: [input.settings[0], { ...input.settings[1], name: 'empty range' }] };
    const ok = SlopeReportInput.parse(slopeReportOf('Unit check', named, runSlopeSweep(named), null));
    expect(ok.results[1]).toMatchObject({ setting: 'empty range', meanEstimate: null, bias: null, spread: null, rmse: null, failed: 2, coverage: null });
    expect(ok.truth).toMatchObject({ exponents: [1, 2], knee: null, peaks: [], noiseMicrovolts: 0, repetitions: 2, seed: 2 });
  });
});

describe('slopeReportCsv', () => {
  it('reads back with papaparse: one row per setting × true exponent, empty cells for undefined figures', () => {
    const named = { ...input, settings: [input.settings[0], { ...input.settings[1], name: 'empty range' }] };
    const report = slopeReportOf('Title, with "quotes"', named, runSlopeSweep(named), null);
    const back = Papa.parse<Record<string, string>>(slopeReportCsv(report), { header: true, skipEmptyLines: true });
    expect(back.errors).toEqual([]);
    expect(back.data).toHaveLength(4);
    expect(back.data[0]).toMatchObject({ title: 'Title, with "quotes"', setting: 'robust', true_exponent: '1', fit_low_hz: '2', fit_high_hz: '40', model: 'power-law', robust: 'true' });
    expect(Number(back.data[0].bias)).toBe(report.results[0].bias);
    expect(back.data[1]).toMatchObject({ setting: 'empty range', bias: '', spread: '', failed: '2' });
  });
});
