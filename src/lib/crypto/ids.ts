import { randomBytes } from 'node:crypto';

/** A new user id: 16 lowercase base32 characters (80 random bits). */
export function newUserId(): string {
  const bytes = randomBytes(10);
  const alphabet = 'abcdefghijklmnopqrstuvwxyz234567';
  let bits = 0;
  let value = 0;
  let out = '';
  for (const byte of bytes) {
    value = (value << 8) | byte;
    bits += 8;
    while (bits >= 5) {
      out += alphabet[(value >>> (bits - 5)) & 31];
      bits -= 5;
    }
  }
  return out;
}
