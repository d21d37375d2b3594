import type { ImageBuffer } from '../raster';

/**
 * A PNG file (W3C Portable Network Graphics, 3rd ed., 2025; RFC 2083) of an RGBA image: 8-bit truecolour with alpha
 * (colour type 6), every scanline with filter 1 ("Sub", each byte minus the byte one pixel to its left), so a map's
 * runs of equal cells become runs of zeros for the deflate stream (zlib format, RFC 1950, through the Compression
 * Streams standard's `CompressionStream('deflate')`, present in browsers and Node ≥ 18).
 */
export async function encodePng(image: ImageBuffer): Promise<Uint8Array> {
  const { width, height, data } = image;
  if (!(width > 0 && height > 0) || data.length !== 4 * width * height) throw new Error(`encodePng: ${width} × ${height} image needs ${4 * width * height} bytes, has ${data.length}`);
  const stride = 4 * width;
  const filtered = new Uint8Array(height * (stride + 1));
  for (let y = 0; y < height; y++) {
    const src = y * stride;
    const dst = y * (stride + 1);
    filtered[dst] = 1;
    for (let i = 0; i < stride; i++) filtered[dst + 1 + i] = (data[src + i] - (i >= 4 ? data[src + i - 4] : 0)) & 0xff;
  }
  const idat = await deflate(filtered);
  const ihdr = new Uint8Array(13);
  const v = new DataView(ihdr.buffer);
  v.setUint32(0, width);
  v.setUint32(4, height);
  ihdr.set([8, 6, 0, 0, 0], 8); // bit depth 8, RGBA, deflate, filter method 0, no interlace
  const parts = [new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', idat), chunk('IEND', new Uint8Array(0))];
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

async function deflate(bytes: Uint8Array<ArrayBuffer>): Promise<Uint8Array> {
  const stream = new Blob([bytes]).stream().pipeThrough(new CompressionStream('deflate'));
  return new Uint8Array(await new Response(stream).arrayBuffer());
}

/** length, type, data, CRC-32 over type and data (PNG §5.3). */
function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const v = new DataView(out.buffer);
  v.setUint32(0, data.length);
  for (let i = 0; i < 4; i++) out[4 + i] = type.charCodeAt(i);
  out.set(data, 8);
  v.setUint32(8 + data.length, crc32(out.subarray(4, 8 + data.length)));
  return out;
}

let table: Uint32Array | null = null;

/** CRC-32 with polynomial 0xEDB88320 (reflected), as PNG Annex D computes it. */
export function crc32(bytes: Uint8Array): number {
  if (table === null) {
    table = new Uint32Array(256);
    for (let n = 0; n < 256; n++) {
      let c = n;
      for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
      table[n] = c >>> 0;
    }
  }
  let c = 0xffffffff;
  for (let i = 0; i < bytes.length; i++) c = table[(c ^ bytes[i]) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** Standard base64 (RFC 4648 §4) of bytes, in slices so a large image does not overflow the argument list. */
export function base64Of(bytes: Uint8Array): string {
  let binary = '';
  for (let i = 0; i < bytes.length; i += 0x8000) binary += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(binary);
}
