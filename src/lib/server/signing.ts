/**
 * Re-asking the signer's password before a signature (after 21 CFR Part 11 §11.200(a)(1): a signing that is not
 * the first of a continuous session still uses at least one component — here the password — and the signer is the
 * signed-in person). A wrong password is refused and audited; five within 15 minutes lock signing for that account
 * (limits.signingAccount; the sign-in rules of NIST SP 800-63B §5.2.2), and a locked attempt is refused before the
 * password is checked, also audited.
 */
import { getUserById } from '../../db/queries/users';
import { auditSigningRefused, type SessionWithRole } from '../../db/queries/review';
import { throttleClear, throttleHit, throttleWait } from '../../db/queries/throttles';
import { HttpError } from './http';
import { verifyPassword } from '../crypto/password';
import { limits, waitWords } from './rate-limit';

export async function confirmSigner(ctx: SessionWithRole, userId: string, password: string, meaning: string): Promise<{ id: string; displayName: string }> {
  const wait = await throttleWait(limits.signingAccount, userId);
  if (wait > 0) {
    await auditSigningRefused(ctx, userId, { meaning, why: 'locked', waitSeconds: wait });
    throw new HttpError(429, 'signing_locked', `Too many wrong passwords when signing. Wait ${waitWords(wait)} before signing again. Nothing was signed.`);
  }
  const user = await getUserById(userId);
  const ok = user?.passwordHash ? await verifyPassword(user.passwordHash, password) : false;
  if (!user || !ok) {
    const lockedFor = await throttleHit(limits.signingAccount, userId);
    await auditSigningRefused(ctx, userId, { meaning, why: 'wrong password', ...(lockedFor > 0 ? { lockedSeconds: lockedFor } : {}) });
    if (lockedFor > 0) throw new HttpError(429, 'signing_locked', `Too many wrong passwords when signing. Wait ${waitWords(lockedFor)} before signing again. Nothing was signed.`);
    throw new HttpError(403, 'wrong_password', 'That is not your password. Nothing was signed.');
  }
  await throttleClear(limits.signingAccount, userId);
  return { id: user.id, displayName: user.displayName };
}
