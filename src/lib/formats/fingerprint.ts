/**
 * A recording is known to the server only by the SHA-256 of its bytes. One-shot hashing uses Web Crypto
 * (`crypto.subtle.digest`, in browsers and as `globalThis.crypto` in Node 20). Web Crypto cannot hash in pieces,
 * so `Sha256` below implements FIPS 180-4 incrementally: a 500 MB file is hashed chunk by chunk while it is read,
 * never held whole. Tests check both against each other and against the FIPS 180-2 example digests.
 */
import type { ByteSource } from './byte-source';

/** Lower-case hex SHA-256 of `bytes` via Web Crypto (NIST FIPS 180-4). */
export async function sha256Hex(bytes: Uint8Array | ArrayBuffer): Promise<string> {
  const view = bytes instanceof Uint8Array ? bytes : new Uint8Array(bytes);
  // Web Crypto refuses views of a SharedArrayBuffer; such input is copied once.
  const input = view.buffer instanceof ArrayBuffer ? (view as Uint8Array<ArrayBuffer>) : new Uint8Array(view);
  const digest = await globalThis.crypto.subtle.digest('SHA-256', input);
  return toHex(new Uint8Array(digest));
}

/** SHA-256 of a whole source, read in `chunkBytes` slices with progress in [0, 1]. */
export async function fingerprintSource(
  source: ByteSource,
  options: { chunkBytes?: number; onProgress?: (fraction: number) => void } = {},
): Promise<string> {
  const chunk = options.chunkBytes ?? 4 * 1024 * 1024;
  const hash = new Sha256();
  for (let offset = 0; offset < source.size; offset += chunk) {
    const bytes = await source.read(offset, Math.min(chunk, source.size - offset));
    hash.update(bytes);
    options.onProgress?.(Math.min(1, (offset + bytes.length) / source.size));
  }
  return hash.hex();
}

const K = new Int32Array([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5, 0xd807aa98,
  0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174, 0xe49b69c1, 0xefbe4786,
  0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da, 0x983e5152, 0xa831c66d, 0xb00327c8,
  0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967, 0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13,
  0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85, 0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819,
  0xd6990624, 0xf40e3585, 0x106aa070, 0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a,
  0x5b9cca4f, 0x682e6ff3, 0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7,
  0xc67178f2,
]);

/**
 * Incremental SHA-256 (NIST FIPS 180-4, §6.2): `update` any number of times, then `digest` once. The state, the
 * schedule and the constants are Int32Arrays: V8 loads their elements as small integers, where Uint32Array elements
 * above 2^31 become doubles; the bits (and so the digest) are the same, about 30 % faster here.
 */
export class Sha256 {
  private readonly h = new Int32Array([
    0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19,
  ]);
  private readonly w = new Int32Array(64);
  private readonly block = new Uint8Array(64);
  private blockLength = 0;
  private totalBytes = 0;
  private finished = false;

  update(data: Uint8Array): this {
    if (this.finished) throw new Error('Sha256.update after digest');
    this.totalBytes += data.length;
    let i = 0;
    if (this.blockLength > 0) {
      const take = Math.min(64 - this.blockLength, data.length);
      this.block.set(data.subarray(0, take), this.blockLength);
      this.blockLength += take;
      i = take;
      if (this.blockLength === 64) {
        this.compress(this.block, 0);
        this.blockLength = 0;
      }
    }
    for (; i + 64 <= data.length; i += 64) this.compress(data, i);
    if (i < data.length) {
      this.block.set(data.subarray(i), 0);
      this.blockLength = data.length - i;
    }
    return this;
  }

  digest(): Uint8Array {
    if (!this.finished) {
      const bitsHigh = Math.floor(this.totalBytes / 0x20000000);
      const bitsLow = (this.totalBytes * 8) >>> 0;
      const pad = new Uint8Array(this.blockLength < 56 ? 64 - this.blockLength : 128 - this.blockLength);
      pad[0] = 0x80;
      const n = pad.length;
      pad[n - 8] = bitsHigh >>> 24;
      pad[n - 7] = bitsHigh >>> 16;
      pad[n - 6] = bitsHigh >>> 8;
      pad[n - 5] = bitsHigh;
      pad[n - 4] = bitsLow >>> 24;
      pad[n - 3] = bitsLow >>> 16;
      pad[n - 2] = bitsLow >>> 8;
      pad[n - 1] = bitsLow;
      const total = this.totalBytes;
      this.update(pad);
      this.totalBytes = total;
      this.finished = true;
    }
    const out = new Uint8Array(32);
    for (let j = 0; j < 8; j++) {
      out[4 * j] = this.h[j] >>> 24;
      out[4 * j + 1] = this.h[j] >>> 16;
      out[4 * j + 2] = this.h[j] >>> 8;
      out[4 * j + 3] = this.h[j];
    }
    return out;
  }

  hex(): string {
    return toHex(this.digest());
  }

  private compress(data: Uint8Array, at: number): void {
    const w = this.w;
    for (let t = 0; t < 16; t++) {
      const o = at + 4 * t;
      w[t] = (data[o] << 24) | (data[o + 1] << 16) | (data[o + 2] << 8) | data[o + 3];
    }
    for (let t = 16; t < 64; t++) {
      const x = w[t - 15];
      const y = w[t - 2];
      const s0 = ((x >>> 7) | (x << 25)) ^ ((x >>> 18) | (x << 14)) ^ (x >>> 3);
      const s1 = ((y >>> 17) | (y << 15)) ^ ((y >>> 19) | (y << 13)) ^ (y >>> 10);
      w[t] = (w[t - 16] + s0 + w[t - 7] + s1) | 0;
    }
    const h = this.h;
    let a = h[0], b = h[1], c = h[2], d = h[3], e = h[4], f = h[5], g = h[6], k = h[7];
    for (let t = 0; t < 64; t++) {
      const S1 = ((e >>> 6) | (e << 26)) ^ ((e >>> 11) | (e << 21)) ^ ((e >>> 25) | (e << 7));
      const ch = (e & f) ^ (~e & g);
      const t1 = (k + S1 + ch + K[t] + w[t]) | 0;
      const S0 = ((a >>> 2) | (a << 30)) ^ ((a >>> 13) | (a << 19)) ^ ((a >>> 22) | (a << 10));
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const t2 = (S0 + maj) | 0;
      k = g;
      g = f;
      f = e;
      e = (d + t1) | 0;
      d = c;
      c = b;
      b = a;
      a = (t1 + t2) | 0;
    }
    h[0] += a;
    h[1] += b;
    h[2] += c;
    h[3] += d;
    h[4] += e;
    h[5] += f;
    h[6] += g;
    h[7] += k;
  }
}

function toHex(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i++) s += bytes[i].toString(16).padStart(2, '0');
  return s;
}
