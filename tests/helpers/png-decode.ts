// A PNG reader for tests, written from the specification (W3C PNG 3rd ed.; RFC 2083) over Node's zlib (an
// independent inflate and CRC-32), undoing filter types 0 and 1 only (what our writer uses).
import zlib from 'node:zlib';
import { expect } from 'vitest';

/** Reads a PNG as the specification lays it out, undoing filter types 0 and 1 only (what the writer uses). */
export function decodePng(png: Uint8Array) {
  expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]); // PNG §5.2 signature
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  const chunks: { type: string; data: Uint8Array }[] = [];
  for (let at = 8; at < png.length; ) {
    const length = view.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    const data = png.subarray(at + 8, at + 8 + length);
    expect(view.getUint32(at + 8 + length), `CRC of ${type}`).toBe(zlib.crc32(png.subarray(at + 4, at + 8 + length)));
    chunks.push({ type, data });
    at += 12 + length;
  }
  expect(chunks.map((c) => c.type)).toEqual(['IHDR', 'IDAT', 'IEND']);
  const ihdr = new DataView(chunks[0].data.buffer, chunks[0].data.byteOffset, 13);
  const width = ihdr.getUint32(0);
  const height = ihdr.getUint32(4);
  expect([...chunks[0].data.subarray(8)]).toEqual([8, 6, 0, 0, 0]);
  const raw = zlib.inflateSync(chunks[1].data);
  const stride = 4 * width;
  expect(raw.length).toBe(height * (stride + 1));
  const out = new Uint8Array(height * stride);
  for (let y = 0; y < height; y++) {
    const type = raw[y * (stride + 1)];
    expect([0, 1]).toContain(type);
    for (let i = 0; i < stride; i++) {
      const left = type === 1 && i >= 4 ? out[y * stride + i - 4] : 0;
      out[y * stride + i] = (raw[y * (stride + 1) + 1 + i] + left) & 0xff;
    }
  }
  return { width, height, data: out };
}

