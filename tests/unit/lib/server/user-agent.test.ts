// The Account page's plain-words summary of a User-Agent (RFC 9110 §10.1.5). The strings are the published
// User-Agent formats of each browser's own documentation (Mozilla's "User-Agent reference for Firefox", Apple's
// Safari on macOS and iOS, Chrome on Linux).
import { describe, expect, it } from 'vitest';
import { describeUserAgent } from '../../../../src/lib/server/user-agent';

describe('describeUserAgent', () => {
  it.each([
    ['Mozilla/5.0 (Windows NT 10.0; Win64; x64; rv:128.0) Gecko/20100101 Firefox/128.0', 'Firefox 128 on Windows 10'],
    ['Mozilla/5.0 (Macintosh; Intel Mac OS X 10_15_7) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.4 Safari/605.1.15', 'Safari 17 on macOS Catalina'],
    ['Mozilla/5.0 (iPhone; CPU iPhone OS 17_4 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.4 Mobile/15E148 Safari/604.1', 'Safari 17 on iOS 17 (phone)'],
    ['Mozilla/5.0 (X11; Linux x86_64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/131.0.0.0 Safari/537.36', 'Chrome 131 on Linux'],
  ])('%s → %s', (ua, words) => {
    expect(describeUserAgent(ua)).toBe(words);
  });

  it('says "Unknown browser" for an empty or unrecognised string', () => {
    expect(describeUserAgent('')).toBe('Unknown browser');
    expect(describeUserAgent('   ')).toBe('Unknown browser');
    expect(describeUserAgent('curl-like-tool')).toBe('Unknown browser');
  });
});
