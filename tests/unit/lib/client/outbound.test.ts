// fetch is replaced here only to see what the wrapper would hand to the network and that it refuses before sending;
// the real requests of the real page, against the real server, are checked in tests/browser/source.test.ts and
// tests/browser/journey.test.ts (every URL, header and body of a whole visit).
import { afterEach, describe, expect, it, vi } from 'vitest';
import { guardAgainst, outboundLog, OutboundRefusedError, send } from '../../../../src/lib/client/outbound';

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
