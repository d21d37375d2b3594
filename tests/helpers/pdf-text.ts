// Reads the text of a PDF that Chromium printed, without a PDF library: inflate every stream (zlib), read each
// font's ToUnicode CMap (ISO 32000-1, §9.10.3: bfchar and bfrange), and decode the page content's hex-string text
// operators (Tj, TJ) with each CMap in turn. Good enough to find a string printed in one font.
import { inflateSync } from 'node:zlib';

function streams(pdf: Buffer): string[] {
  const out: string[] = [];
  let at = 0;
  for (;;) {
    const start = pdf.indexOf('stream', at, 'latin1');
    if (start < 0) break;
    let body = start + 6;
    if (pdf[body] === 0x0d) body++;
    if (pdf[body] === 0x0a) body++;
    const end = pdf.indexOf('endstream', body, 'latin1');
    if (end < 0) break;
    try {
      out.push(inflateSync(pdf.subarray(body, end)).toString('latin1'));
    } catch {
      // not a Flate stream (an image, a font program that does not inflate cleanly)
    }
    at = end + 9;
  }
  return out;
}

function cmapOf(text: string): Map<number, string> {
  const map = new Map<number, string>();
  const hex = (h: string) => parseInt(h, 16);
  const utf16 = (h: string) => String.fromCharCode(...(h.match(/.{4}/g) ?? []).map(hex));
  for (const block of text.matchAll(/beginbfchar([\s\S]*?)endbfchar/g)) {
    for (const m of block[1].matchAll(/<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]+)>/g)) map.set(hex(m[1]), utf16(m[2]));
  }
  for (const block of text.matchAll(/beginbfrange([\s\S]*?)endbfrange/g)) {
    for (const m of block[1].matchAll(/<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]+)>/g)) {
      const lo = hex(m[1]);
      const first = hex(m[3]);
      for (let g = lo; g <= hex(m[2]); g++) map.set(g, String.fromCharCode(first + g - lo));
    }
  }
  return map;
}

/** For each font's CMap, the page text decoded with it (text in other fonts comes out as noise). */
export function pdfTexts(pdf: Buffer): string[] {
  const all = streams(pdf);
  const cmaps = all.filter((s) => s.includes('begincmap')).map(cmapOf);
  const content = all.filter((s) => /\bBT\b/.test(s));
  const strings = content.flatMap((s) => [...s.matchAll(/<([0-9a-fA-F]+)>/g)].map((m) => m[1]));
  return cmaps.map((cmap) => strings.map((h) => (h.match(/.{4}/g) ?? []).map((g) => cmap.get(parseInt(g, 16)) ?? '').join('')).join(''));
}
