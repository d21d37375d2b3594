// Site administration (operators only; pages check canSite before calling): every account, every team, the site
// audit. Nothing here reads a team's studies or analysis sessions: an operator sees those only as a team member.
import { and, asc, desc, eq, inArray, isNull, lt, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { db } from '../client';
import { auditEvents, memberships, teams, users, type Team } from '../schema';
import type { Role } from '../../lib/permissions';
import { insertInvitation } from './invitations';
import { recordAudit } from './audit';

export type AccountState = 'active' | 'invited' | 'suspended';

export interface Person {
  /** null for someone invited by e-mail who has no account yet. */
  id: string | null;
  email: string;
  displayName: string;
  state: AccountState;
  isOperator: boolean;
  createdAt: Date;
  memberships: { teamId: string; teamName: string; role: Role }[];
}

/** A suspension wins over everything; an account without a password has been invited and never joined. */
export function accountState(row: { passwordHash: string | null; disabledAt: Date | null }): AccountState {
  if (row.disabledAt) return 'suspended';
  return row.passwordHash === null ? 'invited' : 'active';
}

/** Every account with its teams and roles, operators first, then by name. */
export async function listPeople(): Promise<Person[]> {
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      displayName: users.displayName,
      passwordHash: users.passwordHash,
      disabledAt: users.disabledAt,
      isOperator: users.isOperator,
      createdAt: users.createdAt,
      teamId: memberships.teamId,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(users)
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(teams, eq(teams.id, memberships.teamId))
    .orderBy(desc(users.isOperator), asc(users.displayName), asc(users.email), asc(teams.name));
  const byId = new Map<string, Person>();
  for (const r of rows) {
    let p = byId.get(r.id);
    if (!p) {
      p = { id: r.id, email: r.email, displayName: r.displayName, state: accountState(r), isOperator: r.isOperator, createdAt: r.createdAt, memberships: [] };
      byId.set(r.id, p);
    }
    if (r.teamId && r.teamName && r.role) p.memberships.push({ teamId: r.teamId, teamName: r.teamName, role: r.role });
  }
  // Invitations still open to an address with no account: these people exist for the site only as "invited".
  const open = await db.execute<{ email: string; team_id: string; team_name: string; role: Role; created_at: Date }>(sql`
    SELECT i.email, i.team_id, t.name AS team_name, i.role, i.created_at
    FROM invitations i JOIN teams t ON t.id = i.team_id
    WHERE i.accepted_at IS NULL AND i.expires_at > now()
      AND NOT EXISTS (SELECT 1 FROM users u WHERE lower(u.email) = lower(i.email))
    ORDER BY lower(i.email), t.name`);
  const invited = new Map<string, Person>();
  for (const r of open.rows) {
    const key = r.email.toLowerCase();
    let p = invited.get(key);
    if (!p) {
      p = { id: null, email: r.email, displayName: '', state: 'invited', isOperator: false, createdAt: new Date(r.created_at), memberships: [] };
      invited.set(key, p);
    }
    if (!p.memberships.some((m) => m.teamId === r.team_id)) p.memberships.push({ teamId: r.team_id, teamName: r.team_name, role: r.role });
  }
  return [...byId.values(), ...invited.values()];
}

export type AccountChange = 'grantOperator' | 'revokeOperator' | 'suspend' | 'reactivate';

export type AccountChangeResult =
  | { ok: true; person: { id: string; displayName: string; email: string } }
  | { ok: false; status: 400 | 403 | 404 | 409; problem: string };

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/**
 * Applies one change to an account on behalf of operator `actorId`, with its audit event, in one transaction.
 * The active operators' rows are locked first (SELECT … FOR UPDATE), so two operators who act on each other at the
 * same moment are serialized: the second sees the first's change, and the site never ends up with no active
 * operator. Never acts on the actor's own account. Session handling (ending or rotating) is the caller's, after commit.
 */
export async function changeAccount(actorId: string, targetId: string, change: AccountChange): Promise<AccountChangeResult> {
  if (actorId === targetId) {
    return { ok: false, status: 400, problem: 'You cannot change your own account here; ask another operator.' };
  }
  return db.transaction(async (tx: Tx) => {
    const active = await tx
      .select({ id: users.id })
      .from(users)
      .where(and(eq(users.isOperator, true), isNull(users.disabledAt)))
      .orderBy(asc(users.id))
      .for('update');
    const activeIds = new Set(active.map((r) => r.id));
    // Checked again under the lock: an operator whose flag was revoked a moment ago acts no more.
    if (!activeIds.has(actorId)) return { ok: false as const, status: 403 as const, problem: 'You are no longer an operator. Nothing was changed.' };
    const [target] = await tx.select().from(users).where(eq(users.id, targetId)).limit(1).for('update');
    if (!target) return { ok: false as const, status: 404 as const, problem: 'No such account. Nothing was changed.' };
    const person = { id: target.id, displayName: target.displayName, email: target.email };
    const leavesNoOperator = () => activeIds.has(target.id) && activeIds.size <= 1;

    switch (change) {
      case 'grantOperator':
        if (target.isOperator) return { ok: false as const, status: 409 as const, problem: `${target.displayName} is already an operator. Nothing was changed.` };
        if (target.disabledAt) return { ok: false as const, status: 409 as const, problem: `${target.displayName} is suspended: reactivate the account first. Nothing was changed.` };
        await tx.update(users).set({ isOperator: true }).where(eq(users.id, target.id));
        break;
      case 'revokeOperator':
        if (!target.isOperator) return { ok: false as const, status: 409 as const, problem: `${target.displayName} is not an operator. Nothing was changed.` };
        if (leavesNoOperator()) return { ok: false as const, status: 409 as const, problem: 'That is the last active operator; the site needs at least one. Nothing was changed.' };
        await tx.update(users).set({ isOperator: false }).where(eq(users.id, target.id));
        break;
      case 'suspend':
        if (target.disabledAt) return { ok: false as const, status: 409 as const, problem: `${target.displayName} is already suspended. Nothing was changed.` };
        if (leavesNoOperator()) return { ok: false as const, status: 409 as const, problem: 'That is the last active operator; the site needs at least one. Nothing was changed.' };
        await tx.update(users).set({ disabledAt: sql`now()` }).where(eq(users.id, target.id));
        break;
      case 'reactivate':
        if (!target.disabledAt) return { ok: false as const, status: 409 as const, problem: `${target.displayName} is not suspended. Nothing was changed.` };
        await tx.update(users).set({ disabledAt: null }).where(eq(users.id, target.id));
        break;
    }
    await recordAudit(tx, {
      actorId,
      action: `site.${change}`,
      targetTable: 'users',
      targetId: target.id,
      detail: { email: target.email },
    });
    return { ok: true as const, person };
  });
}

export interface SiteTeam {
  team: Team;
  members: number;
  leads: { displayName: string; email: string }[];
  pendingInvitations: number;
}

/** Every team with its head count, its leads and its pending invitations. No studies: those stay with the team. */
export async function listSiteTeams(): Promise<SiteTeam[]> {
  const all = await db.select().from(teams).orderBy(asc(teams.name));
  if (all.length === 0) return [];
  const ids = all.map((t) => t.id);
  const counts = await db
    .select({ teamId: memberships.teamId, n: sql<number>`count(*)::int` })
    .from(memberships)
    .where(inArray(memberships.teamId, ids))
    .groupBy(memberships.teamId);
  const leads = await db
    .select({ teamId: memberships.teamId, displayName: users.displayName, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(inArray(memberships.teamId, ids), eq(memberships.role, 'lead')))
    .orderBy(asc(users.displayName));
  const pending = await db.execute<{ team_id: string; n: number }>(
    sql`SELECT team_id, count(*)::int AS n FROM invitations WHERE accepted_at IS NULL AND expires_at > now() GROUP BY team_id`,
  );
  const pendingBy = new Map(pending.rows.map((r) => [r.team_id, Number(r.n)]));
  const countBy = new Map(counts.map((c) => [c.teamId, c.n]));
  return all.map((team) => ({
    team,
    members: countBy.get(team.id) ?? 0,
    leads: leads.filter((l) => l.teamId === team.id).map(({ displayName, email }) => ({ displayName, email })),
    pendingInvitations: pendingBy.get(team.id) ?? 0,
  }));
}

/** A URL-safe slug from a team name: lower-case ASCII letters and digits joined by single hyphens. */
export function slugOf(name: string): string {
  const base = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 40)
    .replace(/-+$/g, '');
  return base || 'team';
}

/**
 * Creates a team and invites its first lead, in one transaction with both audit events. The invitation is the
 * same kind a lead sends from the Members page (only its hash stored); `mail` queues its message in the same transaction.
 */
export async function createTeamWithLead(
  actorId: string,
  input: { name: string; leadEmail: string },
  mail?: (tx: Tx, team: Team, token: string) => Promise<void>,
): Promise<{ ok: true; team: Team; token: string } | { ok: false; problem: string }> {
  return db.transaction(async (tx: Tx) => {
    const [sameName] = await tx.select({ id: teams.id }).from(teams).where(sql`lower(${teams.name}) = lower(${input.name})`).limit(1);
    if (sameName) return { ok: false as const, problem: `A team called "${input.name}" already exists. Nothing was changed.` };
    const base = slugOf(input.name);
    const taken = new Set(
      (await tx.select({ slug: teams.slug }).from(teams).where(sql`${teams.slug} = ${base} OR ${teams.slug} LIKE ${`${base}-%`}`)).map((r) => r.slug),
    );
    let slug = base;
    for (let n = 2; taken.has(slug); n++) slug = `${base}-${n}`;
    const [team] = await tx.insert(teams).values({ name: input.name, slug }).returning();
    await recordAudit(tx, { actorId, action: 'site.createTeam', targetTable: 'teams', targetId: team.id, teamId: team.id, detail: { name: team.name, slug } });
    const { token } = await insertInvitation(tx, team.id, actorId, { email: input.leadEmail, role: 'lead' });
    await mail?.(tx, team, token);
    return { ok: true as const, team, token };
  });
}

export interface SiteAuditRow {
  id: number;
  at: Date;
  action: string;
  actorName: string | null;
  actorEmail: string | null;
  targetTable: string;
  targetId: string;
  /** The account's e-mail when the target is an account. */
  targetEmail: string | null;
  teamName: string | null;
  /** null when the event is a team's own work (studies, analysis sessions, notes): its details stay with the team. */
  detail: Record<string, unknown> | null;
}

/** Tables whose audit details are the site's business. Events about any other table belong to a team's work. */
const SITE_TABLES = new Set(['users', 'teams', 'memberships', 'invitations', 'sessions']);

export const AUDIT_PAGE_SIZE = 50;

/**
 * The site audit, newest first, `AUDIT_PAGE_SIZE` rows before event id `before` (keyset paging: a page stays the same
 * while new events arrive), optionally only actions starting with `actionPrefix`. Returns one extra row's worth of
 * knowledge: whether older rows exist.
 */
export async function listSiteAudit(opts: { before?: number; actionPrefix?: string }): Promise<{ rows: SiteAuditRow[]; older: number | null }> {
  const where = [];
  if (opts.before !== undefined) where.push(lt(auditEvents.id, opts.before));
  if (opts.actionPrefix) {
    // LIKE with the prefix's own wildcards escaped, so "site._" matches only itself.
    const escaped = opts.actionPrefix.replace(/[\\%_]/g, (c) => `\\${c}`);
    where.push(sql`${auditEvents.action} LIKE ${`${escaped}%`}`);
  }
  const target = alias(users, 'target_user');
  const rows = await db
    .select({
      id: auditEvents.id,
      at: auditEvents.at,
      action: auditEvents.action,
      actorName: users.displayName,
      actorEmail: users.email,
      targetTable: auditEvents.targetTable,
      targetId: auditEvents.targetId,
      targetEmail: target.email,
      teamName: teams.name,
      detail: auditEvents.detail,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .leftJoin(teams, eq(teams.id, auditEvents.teamId))
    .leftJoin(target, and(eq(auditEvents.targetTable, 'users'), eq(target.id, auditEvents.targetId)))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(auditEvents.id))
    .limit(AUDIT_PAGE_SIZE + 1);
  const page = rows.slice(0, AUDIT_PAGE_SIZE).map((r) => ({ ...r, detail: SITE_TABLES.has(r.targetTable) ? r.detail : null }));
  return { rows: page, older: rows.length > AUDIT_PAGE_SIZE ? page[page.length - 1].id : null };
}
