// The PNG writer behind the SVG export's embedded heat map, checked with Node's zlib (an independent deflate and
// CRC-32: the zlib library of Gailly and Adler) against the PNG specification (W3C PNG 3rd ed.; RFC 2083).
import zlib from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { base64Of, crc32, encodePng } from '../../../../../src/lib/plot/svg/png';
import { seededNormal } from '../../../../helpers/seeded-random';
import { decodePng as decode } from '../../../../helpers/png-decode';

describe('encodePng', () => {
  it('writes an RGBA image that zlib inflates back to the same bytes, every chunk CRC as zlib computes it', async () => {
    const normal = seededNormal(5);
    for (const [w, h] of [[1, 1], [7, 5], [64, 3]]) {
      const data = Uint8ClampedArray.from({ length: 4 * w * h }, () => Math.floor(Math.abs(normal()) * 97) % 256);
      const back = decode(await encodePng({ width: w, height: h, data }));
      expect([back.width, back.height]).toEqual([w, h]);
      expect(Buffer.from(back.data).equals(Buffer.from(data))).toBe(true);
    }
  });

  it('refuses an image whose byte count does not match its size, saying so', async () => {
    await expect(encodePng({ width: 3, height: 2, data: new Uint8ClampedArray(20) })).rejects.toThrow(/3 × 2 image needs 24 bytes, has 20/);
  });

  it('crc32 matches zlib on the check string of the CRC catalogue ("123456789" → 0xCBF43926)', () => {
    const bytes = new TextEncoder().encode('123456789');
    expect(crc32(bytes)).toBe(0xcbf43926);
    expect(crc32(bytes)).toBe(zlib.crc32(bytes));
  });

  it('base64Of agrees with Node Buffer base64 (RFC 4648) on 100 000 bytes', () => {
    const bytes = Uint8Array.from({ length: 100_000 }, (_, i) => (i * 7919) % 256);
    expect(base64Of(bytes)).toBe(Buffer.from(bytes).toString('base64'));
  });
});
