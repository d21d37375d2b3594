/**
 * A User-Agent string (RFC 9110 §10.1.5) summarised in plain words for the Account page's list of sessions:
 * "Firefox 128 on Windows 10", "Chrome 140 on Linux". Parsed with bowser (pinned in package.json); an empty or
 * unrecognised string reads "Unknown browser".
 */
import Bowser from 'bowser';

export function describeUserAgent(userAgent: string): string {
  if (!userAgent.trim()) return 'Unknown browser';
  let parsed: ReturnType<typeof Bowser.parse>;
  try {
    parsed = Bowser.parse(userAgent);
  } catch {
    return 'Unknown browser';
  }
  const major = parsed.browser.version?.split('.')[0];
  const browser = parsed.browser.name ? `${parsed.browser.name}${major ? ` ${major}` : ''}` : 'Unknown browser';
  const osVersion = parsed.os.versionName ?? (parsed.os.name === 'Android' || parsed.os.name === 'iOS' ? parsed.os.version?.split('.')[0] : undefined);
  const os = parsed.os.name ? `${parsed.os.name}${osVersion ? ` ${osVersion}` : ''}` : null;
  const device = parsed.platform.type === 'mobile' ? 'phone' : parsed.platform.type === 'tablet' ? 'tablet' : null;
  return [browser, os && `on ${os}`, device && `(${device})`].filter(Boolean).join(' ');
}
