import { describe, expect, it } from 'vitest';
import { cookieIsSecure, isLoopbackHost, safeNextPath } from '../../../../src/lib/server/cookies';

describe('cookieIsSecure', () => {
  it('drops Secure only for plain http on a loopback address (local development)', () => {
    expect(cookieIsSecure(new URL('http://127.0.0.1:4321/'), 'auto')).toBe(false);
    expect(cookieIsSecure(new URL('http://localhost:4321/'), 'auto')).toBe(false);
    expect(cookieIsSecure(new URL('https://127.0.0.1/'), 'auto')).toBe(true);
    expect(cookieIsSecure(new URL('http://lab.example/'), 'auto')).toBe(true);
    expect(cookieIsSecure(new URL('http://127.0.0.1.lab.example/'), 'auto')).toBe(true);
  });

  it('keeps Secure on loopback when the deployment says always (an app behind a local proxy)', () => {
    expect(cookieIsSecure(new URL('http://127.0.0.1:4321/'), 'always')).toBe(true);
  });
});

describe('isLoopbackHost', () => {
  it('knows the loopback range and IPv4-mapped addresses (RFC 1122 §3.2.1.3, RFC 4291 §2.5.5.2)', () => {
    for (const host of ['127.0.0.1', '127.10.0.3', 'localhost', '::1', '[::1]', '::ffff:127.0.0.1']) expect(isLoopbackHost(host)).toBe(true);
    for (const host of ['10.0.0.1', '128.0.0.1', '::ffff:10.0.0.1', 'example.org', '127.0.0.1.example.org']) expect(isLoopbackHost(host)).toBe(false);
  });
});

describe('safeNextPath', () => {
  const origin = 'http://127.0.0.1:4321';
  it('keeps same-origin paths with their query', () => {
    expect(safeNextPath('/teams/abc?x=1', origin)).toBe('/teams/abc?x=1');
  });
  it('refuses anything a browser would take off the site', () => {
    // WHATWG URL parsing treats "\" like "/" in special schemes, so "/\evil" is "//evil" (URL Standard, path state).
    for (const next of ['//evil.example', '/\\evil.example', 'https://evil.example', 'evil', '/\t/evil.example', null, '']) {
      expect(safeNextPath(next, origin)).toBe('/');
    }
  });
});
