import { LATIN_RANGE, type SvgFont } from '../../lib/plot/svg/fonts';

let fonts: Promise<SvgFont[]> | null = null;

/**
 * The two faces the plots print with (figure.ts MONO and SANS), as the app ships them (@fontsource, Latin subset,
 * SIL Open Font License, which allows embedding in documents), for embedding in an SVG. Loaded on the first export
 * only: the bundler turns each file into a data URL in a chunk of its own (Vite's `?url&inline`).
 */
export function figureFonts(): Promise<SvgFont[]> {
  fonts ??= Promise.all([
    import('@fontsource-variable/jetbrains-mono/files/jetbrains-mono-latin-wght-normal.woff2?url&inline'),
    import('@fontsource-variable/inter/files/inter-latin-wght-normal.woff2?url&inline'),
  ]).then(([mono, sans]) => [
    { family: 'JetBrains Mono Variable', weight: '100 800', dataUrl: mono.default, unicodeRange: LATIN_RANGE },
    { family: 'Inter Variable', weight: '100 900', dataUrl: sans.default, unicodeRange: LATIN_RANGE },
  ]);
  return fonts;
}
