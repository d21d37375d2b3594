/**
 * A type face to embed in an SVG: the family name the painters ask for (figure.ts MONO and SANS), its weight range
 * and a `data:font/woff2;base64,…` URL of the file the app ships (@fontsource-variable, Latin subset). Embedded, the
 * figure looks the same on a machine without the face, and a journal's converter need not substitute one.
 */
export interface SvgFont {
  family: string;
  weight: string;
  dataUrl: string;
  /** CSS unicode-range of the subset (the @fontsource Latin range). */
  unicodeRange?: string;
}

/** The @fontsource "latin" subset's unicode-range (its index.css), which covers every character the plots print. */
export const LATIN_RANGE =
  'U+0000-00FF,U+0131,U+0152-0153,U+02BB-02BC,U+02C6,U+02DA,U+02DC,U+0304,U+0308,U+0329,U+2000-206F,U+20AC,U+2122,U+2191,U+2193,U+2212,U+2215,U+FEFF,U+FFFD';

/** @font-face rules (CSS Fonts 4 §4) for an SVG's <style>; the text is plain CSS with no markup characters. */
export function fontFaceCss(fonts: readonly SvgFont[]): string {
  return fonts
    .map((f) => `@font-face{font-family:'${f.family.replace(/'/g, '')}';font-style:normal;font-weight:${f.weight};src:url(${f.dataUrl}) format('woff2');${f.unicodeRange ? `unicode-range:${f.unicodeRange};` : ''}}`)
    .join('');
}
