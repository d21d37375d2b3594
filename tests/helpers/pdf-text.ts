// Reads the text of a PDF that Chromium printed, without a PDF library (ISO 32000-1): inflate the streams (zlib),
// map each font resource name (/F4) through its font object to its ToUnicode CMap (§9.10.3: bfchar, bfrange; code
// width from the codespace range), then walk each page's content stream: `Tf` picks the font, `Tj`/`TJ` hex
// strings are decoded with that font's CMap, and the pieces are joined in drawing order. Good enough to find text a
// test printed; not a general PDF reader (no object streams, no literal strings).
import { inflateSync } from 'node:zlib';

function objects(text: string): Map<number, { dict: string; streamAt: number | null }> {
  const out = new Map<number, { dict: string; streamAt: number | null }>();
  for (const m of text.matchAll(/(?:^|\n)(\d+) 0 obj\s*/g)) {
    const start = m.index! + m[0].length;
    const end = text.indexOf('endobj', start);
    const body = text.slice(start, end);
    const s = body.indexOf('stream');
    out.set(Number(m[1]), { dict: s >= 0 ? body.slice(0, s) : body, streamAt: s >= 0 ? start + s + 6 : null });
  }
  return out;
}

function streamOf(pdf: Buffer, text: string, at: number): string | null {
  let body = at;
  if (text.charCodeAt(body) === 0x0d) body++;
  if (text.charCodeAt(body) === 0x0a) body++;
  const end = text.indexOf('endstream', body);
  try {
    return inflateSync(pdf.subarray(body, end)).toString('latin1');
  } catch {
    return null;
  }
}

interface CMap {
  bytes: number;
  map: Map<number, string>;
}

function cmapOf(text: string): CMap {
  const map = new Map<number, string>();
  const hex = (h: string) => parseInt(h, 16);
  const utf16 = (h: string) => String.fromCharCode(...(h.match(/.{4}/g) ?? []).map(hex));
  const space = /begincodespacerange\s*<([0-9a-fA-F]+)>/.exec(text);
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
  return { bytes: space ? space[1].length / 2 : 2, map };
}

/** The text of every page, pieces joined in drawing order without separators. */
export function pdfText(pdf: Buffer): string {
  const text = pdf.toString('latin1');
  const objs = objects(text);
  const fonts = new Map<string, CMap>();
  for (const dict of text.matchAll(/\/Font\s*<<([^>]*)>>/g)) {
    for (const f of dict[1].matchAll(/\/(\w+)\s+(\d+) 0 R/g)) {
      const font = objs.get(Number(f[2]));
      const ref = font && /\/ToUnicode\s+(\d+) 0 R/.exec(font.dict);
      const cmapObj = ref && objs.get(Number(ref[1]));
      const cmapText = cmapObj?.streamAt != null ? streamOf(pdf, text, cmapObj.streamAt) : null;
      if (cmapText) fonts.set(f[1], cmapOf(cmapText));
    }
  }
  let out = '';
  for (const obj of objs.values()) {
    if (obj.streamAt === null || /\/(Type|Subtype)\s*\/(Font|XObject|Image|FontFile)/.test(obj.dict)) continue;
    const content = streamOf(pdf, text, obj.streamAt);
    if (content === null || !/\bBT\b/.test(content)) continue;
    let font: CMap | null = null;
    for (const m of content.matchAll(/\/(\w+)\s+[\d.]+\s+Tf|(<[0-9a-fA-F]*>|\[[^\]]*\])\s*T[jJ]/g)) {
      if (m[1] !== undefined) {
        font = fonts.get(m[1]) ?? null;
        continue;
      }
      if (font === null) continue;
      for (const h of m[2].matchAll(/<([0-9a-fA-F]*)>/g)) {
        const width = font.bytes * 2;
        for (let i = 0; i + width <= h[1].length; i += width) out += font.map.get(parseInt(h[1].slice(i, i + width), 16)) ?? '';
      }
    }
  }
  return out;
}
