import { createHash, randomBytes } from 'node:crypto';

/** A URL-safe random token (32 bytes) and the SHA-256 hex digest we store instead of it. */
export function newToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}
