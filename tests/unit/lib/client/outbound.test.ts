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
});
