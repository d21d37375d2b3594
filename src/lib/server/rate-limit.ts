/**
 * The rate limits, kept in PostgreSQL (src/db/queries/throttles.ts) so they hold across restarts and processes.
 * Accounts are keyed by the e-mail as typed (lower-cased), so an address without an account is limited and answered
 * exactly like one with an account. Addresses come from `clientAddress` (src/lib/server/client-address.ts), which
 * honours forwarded headers only from configured proxies.
 */
import type { ThrottleRule } from '../../db/queries/throttles';

export const limits = {
  signInAccount: { bucket: 'sign-in:account', max: 10, windowMinutes: 15, lockMinutes: 15 },
  signInAddress: { bucket: 'sign-in:address', max: 50, windowMinutes: 15, lockMinutes: 15 },
  resetAccount: { bucket: 'reset:account', max: 3, windowMinutes: 60, lockMinutes: 60 },
  resetAddress: { bucket: 'reset:address', max: 20, windowMinutes: 60, lockMinutes: 60 },
  invitationToken: { bucket: 'invitation:token', max: 5, windowMinutes: 60, lockMinutes: 60 },
  invitationAddress: { bucket: 'invitation:address', max: 30, windowMinutes: 60, lockMinutes: 60 },
  passwordChangeAccount: { bucket: 'password-change:account', max: 5, windowMinutes: 15, lockMinutes: 15 },
  /** Wrong passwords when signing a review (return, sign off, reviewed), per account: NIST SP 800-63B §5.2.2. */
  signingAccount: { bucket: 'signing:account', max: 5, windowMinutes: 15, lockMinutes: 15 },
} as const satisfies Record<string, ThrottleRule>;

/** "Wait 14 minutes" / "Wait 40 seconds": how long, in words, for a refusal. */
export function waitWords(seconds: number): string {
  if (seconds < 60) return `${seconds} second${seconds === 1 ? '' : 's'}`;
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? '' : 's'}`;
}
