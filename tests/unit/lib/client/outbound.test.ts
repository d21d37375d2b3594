// fetch is replaced here only to see what the wrapper would hand to the network and that it refuses before sending;
// the real requests of the real page, against the real server, are checked in tests/browser/source.test.ts and
// tests/browser/journey.test.ts (every URL, header and body of a whole visit).
import { afterEach, describe, expect, it, vi } from 'vitest';
import { foldForMatching, guardAgainst, outboundLog, OutboundRefusedError, send } from '../../../../src/lib/client/outbound';

afterEach(() => {
  vi.unstubAllGlobals();
  guardAgainst('test', []);
});

describe('send', () => {
  it('logs method, path and the exact body text it hands to fetch', async () => {
    const fetch = vi.fn(async () => new Response('{}', { status: 201 }));
    vi.stubGlobal('fetch', fetch);
    await send('/api/studies/s1/analysis-sessions', { json: { subjectCode: 'TM-S01', fingerprint: 'ab' } });
    const [path, init] = fetch.mock.calls[0] as unknown as [string, RequestInit];
    expect(path).toBe('/api/studies/s1/analysis-sessions');
    expect(init.method).toBe('POST');
    expect(init.body).toBe('{"subjectCode":"TM-S01","fingerprint":"ab"}');
    const entry = outboundLog().at(-1)!;
    expect(entry).toMatchObject({ method: 'POST', path: '/api/studies/s1/analysis-sessions', body: init.body, status: 201, failure: null });
  });

  it('refuses, before fetch, a path or body carrying a guarded local-only string', async () => {
    const fetch = vi.fn(async () => new Response('{}'));
    vi.stubGlobal('fetch', fetch);
    guardAgainst('test', ['jane-doe-night.edf', 'X']);
    await expect(send('/api/x', { json: { note: 'from jane-doe-night.edf' } })).rejects.toBeInstanceOf(OutboundRefusedError);
    await expect(send('/demo/jane-doe-night%2Eedf')).rejects.toBeInstanceOf(OutboundRefusedError);
    expect(fetch).not.toHaveBeenCalled();
    expect(outboundLog().at(-1)).toMatchObject({ body: null, status: null });
    expect(outboundLog().at(-1)!.failure).toContain('not sent');
    // Strings shorter than 4 characters ("X", a common blanked field) are not guarded: they would block everything.
    await send('/api/x', { json: { code: 'X-1' } });
    expect(fetch).toHaveBeenCalledTimes(1);
  });

  it('refuses each identifying part of an EDF+ patient field, not only the whole field', async () => {
    // The EDF+ patient field holds "code sex birthdate name" separated by spaces, with X for unknown and _ for
    // spaces inside a name (Kemp & Olivan, 2003); the example values below are invented.
    const fetch = vi.fn(async () => new Response('{}', { status: 201 }));
    vi.stubGlobal('fetch', fetch);
    guardAgainst('test', ['QRZ-7741230 F 02-MAY-1951 Ann_Example', 'Startdate 04-MAR-2024 ROOM-7 X X', 'my "odd" name.edf']);
    for (const leak of ['QRZ-7741230', '02-MAY-1951', 'Example', '04-MAR-2024', 'ROOM-7']) {
      await expect(send('/api/x', { json: { subjectCode: leak } })).rejects.toBeInstanceOf(OutboundRefusedError);
    }
    // JSON escapes the quotes of a file name; the escaped form is guarded too.
    await expect(send('/api/x', { json: { note: 'my "odd" name.edf' } })).rejects.toBeInstanceOf(OutboundRefusedError);
    expect(fetch).not.toHaveBeenCalled();
    // The fixed keyword of the recording field is not identifying and does not block requests.
    await send('/api/x', { json: { note: 'Startdate' } });
    expect(fetch).toHaveBeenCalledTimes(1);
  });
});

// Expected values computed outside the project with Python 3's unicodedata (Unicode 14.0.0):
// unicodedata.normalize('NFKC', unicodedata.normalize('NFKC', s).casefold()), i.e. NFKC (Unicode Standard Annex #15,
// "Unicode Normalization Forms") around full case folding (Unicode Standard §3.13, CaseFolding.txt status C+F).
const PYTHON_NFKC_CASEFOLD: [string, string][] = [
  ['\uff21\uff2e\uff2e\u3000\uff25\uff38\uff21\uff2d\uff30\uff2c\uff25', 'ann example'], // full-width letters, ideographic space
  ['Stra\u00dfe', 'strasse'], // ß folds to ss (full folding, not simple)
  ['STRASSE', 'strasse'],
  ['\u03a3\u038a\u03a3\u03a5\u03a6\u039f\u03a3', '\u03c3\u03af\u03c3\u03c5\u03c6\u03bf\u03c3'], // capital sigma
  ['\u03c3\u03af\u03c3\u03c5\u03c6\u03bf\u03c2', '\u03c3\u03af\u03c3\u03c5\u03c6\u03bf\u03c3'], // final sigma folds to σ
  ['\ufb01nley', 'finley'], // ligature fi
  ['\u01c5emal', 'd\u017eemal'], // title-case digraph Dž
  ['\u212avin', 'kvin'], // KELVIN SIGN
  ['\u217b', 'xii'], // roman numeral twelve
  ['\u2460\u2461\u2462\u2463', '1234'], // circled digits
  ['\uff31\uff52\uff5a\uff0d\uff17\uff17\uff14\uff11\uff12\uff13\uff10', 'qrz-7741230'],
  ['\u0130stanbul', 'i\u0307stanbul'], // capital I with dot above: i + combining dot
  ['\u017fara', 'sara'], // long s
];

describe('foldForMatching: NFKC_Casefold (Unicode UAX #15 normalization, §3.13 case folding, default ignorables removed)', () => {
  it('gives what Python\'s unicodedata NFKC + casefold gives on full-width, ligature, sigma, ß and compatibility forms', () => {
    for (const [input, expected] of PYTHON_NFKC_CASEFOLD) expect(foldForMatching(input), JSON.stringify(input)).toBe(expected);
  });

  it('puts case-folding equivalents together even where it picks the other case as representative (Cherokee)', () => {
    // CaseFolding.txt folds Cherokee small letters (U+AB70…) to the capitals (U+13A0…); Python gives 'ᎠᎠ' for both.
    expect(foldForMatching('\u13a0\u13a0')).toBe(foldForMatching('\uab70\uab70'));
    expect(foldForMatching('\u13a0\uab70')).toBe(foldForMatching('\uab70\u13a0'));
  });

  it('removes Default_Ignorable_Code_Point characters (DerivedCoreProperties.txt): zero-width space, joiners, soft hyphen, word joiner, BOM, variation selector', () => {
    expect(foldForMatching('A\u200bn\u200cn\u200d E\u00adx\u2060a\ufeffm\ufe0fple')).toBe('ann example');
  });
});

describe('send: the deny-list matches after normalization', () => {
  it('refuses a guarded name in another case, in full-width form, with zero-width characters, or with ß spelt ss', async () => {
    const fetch = vi.fn(async () => new Response('{}', { status: 201 }));
    vi.stubGlobal('fetch', fetch);
    // Invented identification in the EDF+ patient field layout (Kemp & Olivan, 2003).
    guardAgainst('test', ['QRZ-7741230 F 02-MAY-1951 Ann_Stra\u00dfmann', 'Night-Ward-Ost.edf']);
    const leaks = [
      'qrz-7741230',
      'Qrz-7741230',
      '\uff31\uff32\uff3a-7741230', // full-width QRZ
      'QRZ\u200b-7741230', // zero-width space inside
      'Q\u00adRZ-7741230', // soft hyphen inside
      '02-may-1951',
      'STRASSMANN',
      'strassmann',
      'Stra\u00dfmann',
      'night-ward-ost.EDF',
      'NIGHT\u2060-WARD-OST.edf',
      '\uff2e\uff49\uff47\uff48\uff54-ward-ost.edf', // full-width "Night"
    ];
    for (const leak of leaks) {
      await expect(send('/api/x', { json: { note: `about ${leak}` } }), JSON.stringify(leak)).rejects.toBeInstanceOf(OutboundRefusedError);
      await expect(send(`/api/x?q=${encodeURIComponent(leak)}`), JSON.stringify(leak)).rejects.toBeInstanceOf(OutboundRefusedError);
    }
    expect(fetch).not.toHaveBeenCalled();
    // Text that only looks alike after folding of unrelated words still goes out.
    await send('/api/x', { json: { note: 'ward round at 7 pm' } });
    expect(fetch).toHaveBeenCalledTimes(1);
  });

  it('guards a value registered in an unusual form against its plain spelling', async () => {
    const fetch = vi.fn(async () => new Response('{}'));
    vi.stubGlobal('fetch', fetch);
    guardAgainst('test', ['\uff2d\uff41\uff52\uff4b\u200b\uff55\uff53']); // full-width "Mark" + ZWSP + "us"
    await expect(send('/api/x', { json: { note: 'markus' } })).rejects.toBeInstanceOf(OutboundRefusedError);
    await expect(send('/api/x', { json: { note: 'MARKUS' } })).rejects.toBeInstanceOf(OutboundRefusedError);
    expect(fetch).not.toHaveBeenCalled();
  });
});
