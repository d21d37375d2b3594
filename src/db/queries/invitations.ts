import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import { db } from '../client';
import { invitations, memberships, teams, users, type Invitation } from '../schema';
import type { Role } from '../../lib/permissions';
import { hashToken, newToken } from '../../lib/crypto/tokens';
import { hashPassword, verifyPassword } from '../../lib/crypto/password';
import { TransactionRollbackError } from 'drizzle-orm';
import { newUserId } from '../../lib/crypto/ids';
import { recordAudit } from './audit';

export const INVITATION_LIFETIME_DAYS = 7;

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/**
 * Creates an invitation and returns the token to mail (only its hash is stored). `mail` queues the invitation's
 * message in the same transaction (src/lib/server/mail.ts): both are stored, or neither.
 */
export async function createInvitation(
  teamId: string,
  invitedBy: string,
  input: { email: string; role: Role },
  mail?: (tx: Tx, token: string) => Promise<void>,
): Promise<{ invitation: Invitation; token: string }> {
  return db.transaction(async (tx) => {
    const made = await insertInvitation(tx, teamId, invitedBy, input);
    await mail?.(tx, made.token);
    return made;
  });
}

/** The invitation and its audit event inside the caller's transaction (a lead's invite, or a new team's first lead). */
export async function insertInvitation(
  tx: Tx,
  teamId: string,
  invitedBy: string,
  input: { email: string; role: Role },
): Promise<{ invitation: Invitation; token: string }> {
  const { token, tokenHash } = newToken();
  const expiresAt = new Date(Date.now() + INVITATION_LIFETIME_DAYS * 86_400_000);
  const [invitation] = await tx
    .insert(invitations)
    .values({ teamId, email: input.email, role: input.role, tokenHash, invitedBy, expiresAt })
    .returning();
  await recordAudit(tx, {
    actorId: invitedBy, action: 'invitation.create', targetTable: 'invitations', targetId: invitation.id, teamId,
    detail: { email: input.email, role: input.role },
  });
  return { invitation, token };
}

export type InvitationLookup =
  | { state: 'valid'; invitation: Invitation; teamName: string; existingUser: boolean }
  | { state: 'expired' | 'used' | 'unknown' };

export async function lookupInvitation(token: string): Promise<InvitationLookup> {
  const rows = await db
    .select({ invitation: invitations, teamName: teams.name })
    .from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId))
    .where(eq(invitations.tokenHash, hashToken(token)))
    .limit(1);
  const row = rows[0];
  if (!row) return { state: 'unknown' };
  if (row.invitation.acceptedAt) return { state: 'used' };
  if (row.invitation.expiresAt.getTime() <= Date.now()) return { state: 'expired' };
  const existing = await db.select({ id: users.id, hasPassword: users.passwordHash }).from(users)
    .where(sql`lower(${users.email}) = lower(${row.invitation.email})`).limit(1);
  return { state: 'valid', invitation: row.invitation, teamName: row.teamName, existingUser: Boolean(existing[0]?.hasPassword) };
}

/**
 * Accepts an invitation: creates the user (or sets the password of one that never had it; an existing account
 * must give its current password), adds the
 * membership, marks the invitation used. The token is claimed with a conditional update, so two concurrent
 * accepts cannot both succeed. Returns the user id, or null when the token is not (or no longer) valid.
 */
export async function acceptInvitation(
  token: string,
  input: { displayName: string; password: string },
): Promise<{ userId: string; keptRole: Role | null } | { refused: 'invalid' | 'wrong-password' | 'suspended' }> {
  const passwordHash = await hashPassword(input.password);
  return db.transaction(async (tx) => {
    const [invitation] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, new Date())))
      .returning();
    if (!invitation) return { refused: 'invalid' as const };
    const existing = await tx.select().from(users).where(sql`lower(${users.email}) = lower(${invitation.email})`).limit(1);
    let userId: string;
    if (existing[0]) {
      userId = existing[0].id;
      if (existing[0].passwordHash === null) {
        await tx.update(users).set({ passwordHash, displayName: input.displayName }).where(eq(users.id, userId));
      } else if (!(await verifyPassword(existing[0].passwordHash, input.password))) {
        // Holding the link is not enough to enter an existing account: its own password must match.
        tx.rollback();
      }
      // A suspended account joins nothing (and the token stays unused): an invitation is no way around suspension.
      if (existing[0].disabledAt) throw new AccountSuspended();
    } else {
      userId = newUserId();
      await tx.insert(users).values({ id: userId, email: invitation.email, displayName: input.displayName, passwordHash });
    }
    // An invitation never changes an existing member's role: only a lead does, on the Members page.
    const [current] = await tx.select({ role: memberships.role }).from(memberships)
      .where(and(eq(memberships.userId, userId), eq(memberships.teamId, invitation.teamId))).limit(1);
    if (!current) await tx.insert(memberships).values({ userId, teamId: invitation.teamId, role: invitation.role });
    await recordAudit(tx, {
      actorId: userId, action: 'invitation.accept', targetTable: 'invitations', targetId: invitation.id, teamId: invitation.teamId,
      detail: current ? { role: current.role, invitedAs: invitation.role, keptRole: true } : { role: invitation.role },
    });
    return { userId, keptRole: current ? current.role : null };
  }).catch((error: unknown) => {
    if (error instanceof TransactionRollbackError) return { refused: 'wrong-password' as const };
    if (error instanceof AccountSuspended) return { refused: 'suspended' as const };
    throw error;
  });
}

class AccountSuspended extends Error {}
