// @ts-check
/**
 * The security headers' values, in plain JavaScript so two places share one source: the app's middleware
 * (security-headers.ts, every rendered response, with the page's inline-script hashes) and the Node wrapper
 * (server/main.mjs, which puts them on every response before Astro sees the request, so static files and the
 * wrapper's own refusals carry them too; a rendered page's own values replace them).
 */

/** @type {Readonly<Record<string, string>>} */
export const FIXED_SECURITY_HEADERS = Object.freeze({
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
  'permissions-policy':
    'accelerometer=(), autoplay=(), camera=(), display-capture=(), geolocation=(), gyroscope=(), hid=(), magnetometer=(), microphone=(), midi=(), payment=(), publickey-credentials-get=(), serial=(), usb=(), xr-spatial-tracking=()',
  'cross-origin-opener-policy': 'same-origin',
  // With the opener policy above, this makes pages cross-origin isolated (HTML Standard), so decoded samples can
  // live on a SharedArrayBuffer that the page and its workers share instead of copying (src/lib/formats/sample-arrays.ts).
  // Every resource the app loads is its own (the CSP allows this origin only), so nothing else needs a CORP header.
  'cross-origin-embedder-policy': 'require-corp',
  'cross-origin-resource-policy': 'same-origin',
  'x-frame-options': 'DENY',
});

/**
 * The Content-Security-Policy (W3C CSP Level 3), with `scriptHashes` ('sha256-…' hash-sources) for a page's inline
 * scripts.
 * @param {string[]} [scriptHashes]
 * @returns {string}
 */
export function contentSecurityPolicy(scriptHashes = []) {
  return [
    `default-src 'self'`,
    // 'wasm-unsafe-eval' (CSP Level 3, WebAssembly integration) lets the analysis compile its spectral kernels
    // (kernels/spectral.ts, shipped inside our own scripts); it does not allow eval, new Function or inline code.
    `script-src 'self' 'wasm-unsafe-eval'${scriptHashes.map((h) => ` '${h}'`).join('')}`,
    // React sets style attributes on the plots; styles cannot send data anywhere that connect-src/img-src allow.
    `style-src 'self' 'unsafe-inline'`,
    `img-src 'self' data: blob:`,
    // The type faces ship their smallest subsets inlined as data: URLs.
    `font-src 'self' data:`,
    `connect-src 'self'`,
    `worker-src 'self' blob:`,
    `manifest-src 'self'`,
    `media-src 'none'`,
    `form-action 'self'`,
    `frame-src 'none'`,
    `frame-ancestors 'none'`,
    `base-uri 'none'`,
    `object-src 'none'`,
  ].join('; ');
}
