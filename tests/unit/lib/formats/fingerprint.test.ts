import fc from 'fast-check';
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { bytesSource, fingerprintSource, Sha256, sha256Hex } from '../../../../src/lib/formats';

const ascii = (s: string) => new TextEncoder().encode(s);

describe('SHA-256 fingerprints', () => {
  it('match the FIPS 180-2 Appendix B example digests', async () => {
    // NIST FIPS 180-2, Appendix B.1 ("abc") and B.2 (the 448-bit message).
    const abc = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    const two = '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1';
    const msg2 = 'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq';
    expect(await sha256Hex(ascii('abc'))).toBe(abc);
    expect(new Sha256().update(ascii('abc')).hex()).toBe(abc);
    expect(await sha256Hex(ascii(msg2))).toBe(two);
    expect(new Sha256().update(ascii(msg2)).hex()).toBe(two);
  });

  it('the incremental hash equals Node’s SHA-256 for any split of any input', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 600 }), fc.array(fc.nat(600), { maxLength: 5 }), (bytes, cuts) => {
        const points = [...new Set(cuts.map((c) => Math.min(c, bytes.length)))].sort((a, b) => a - b);
        const h = new Sha256();
        let from = 0;
        for (const p of [...points, bytes.length]) {
          h.update(bytes.subarray(from, p));
          from = p;
        }
        expect(h.hex()).toBe(createHash('sha256').update(bytes).digest('hex'));
      }),
      { numRuns: 300 },
    );
  });

  it('fingerprintSource reads in chunks and agrees with Web Crypto', async () => {
    const bytes = Uint8Array.from({ length: 100_003 }, (_, i) => (i * 31) & 0xff);
    const seen: number[] = [];
    const hex = await fingerprintSource(bytesSource(bytes), { chunkBytes: 4096, onProgress: (f) => seen.push(f) });
    expect(hex).toBe(await sha256Hex(bytes));
    expect(seen.length).toBe(Math.ceil(bytes.length / 4096));
    expect(seen[seen.length - 1]).toBe(1);
  });
});
