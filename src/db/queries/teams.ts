import { and, asc, desc, eq, sql } from 'drizzle-orm';
import { db } from '../client';
import { memberships, sessions, studies, teams, users, type Study, type Team } from '../schema';
import type { Role } from '../../lib/permissions';
import { recordAudit } from './audit';

export interface TeamWithRole {
  team: Team;
  role: Role;
}

export async function listTeamsForUser(userId: string): Promise<TeamWithRole[]> {
  const rows = await db
    .select({ team: teams, role: memberships.role })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(teams.name));
  return rows;
}

/** The team and the user's role in it, or null when the user is not a member (callers answer 404). */
export async function getTeamForMember(teamId: string, userId: string): Promise<TeamWithRole | null> {
  if (!isUuid(teamId)) return null;
  const rows = await db
    .select({ team: teams, role: memberships.role })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)))
    .limit(1);
  return rows[0] ?? null;
}

export interface StudyWithRole {
  study: Study;
  team: Team;
  role: Role;
}

// Every study route's first read, prepared once (drizzle `.prepare`: a named statement per connection).
const studyForMember = db
  .select({ study: studies, team: teams, role: memberships.role })
  .from(studies)
  .innerJoin(teams, eq(teams.id, studies.teamId))
  .innerJoin(memberships, and(eq(memberships.teamId, studies.teamId), eq(memberships.userId, sql.placeholder('userId'))))
  .where(eq(studies.id, sql.placeholder('studyId')))
  .limit(1)
  .prepare('tidemark_study_for_member');

/** The study when the user belongs to its team, else null: another team's study is indistinguishable from none. */
export async function getStudyForMember(studyId: string, userId: string): Promise<StudyWithRole | null> {
  if (!isUuid(studyId)) return null;
  const rows = await studyForMember.execute({ studyId, userId });
  return rows[0] ?? null;
}

export async function listStudies(teamId: string): Promise<Study[]> {
  return db.select().from(studies).where(eq(studies.teamId, teamId)).orderBy(asc(studies.name));
}

export async function listMembers(teamId: string) {
  return db
    .select({ userId: users.id, displayName: users.displayName, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId))
    .orderBy(asc(users.displayName));
}

export async function createStudy(teamId: string, actorId: string, input: { name: string; description: string }): Promise<Study> {
  return db.transaction(async (tx) => {
    const [study] = await tx.insert(studies).values({ teamId, name: input.name, description: input.description, createdBy: actorId }).returning();
    await recordAudit(tx, { actorId, action: 'study.create', targetTable: 'studies', targetId: study.id, teamId, detail: { name: input.name } });
    return study;
  });
}

export async function listRecentStudiesForUser(userId: string) {
  return db
    .select({ study: studies, teamName: teams.name })
    .from(studies)
    .innerJoin(teams, eq(teams.id, studies.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, studies.teamId), eq(memberships.userId, userId)))
    .orderBy(desc(studies.createdAt));
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export function isUuid(value: string): boolean {
  return UUID.test(value);
}

/** Sets a member's role in a team (with its audit event); null when the person is not a member. */
export async function changeMemberRole(teamId: string, userId: string, role: Role, actorId: string): Promise<Role | null> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select({ role: memberships.role }).from(memberships).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    if (!before) return null;
    await tx.update(memberships).set({ role }).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
    // A role change rotates the person's session ids (on their next request), so no id outlives the rights it had.
    await tx.update(sessions).set({ rotationDue: true }).where(eq(sessions.userId, userId));
    await recordAudit(tx, { actorId, action: 'membership.role', targetTable: 'memberships', targetId: `${teamId}:${userId}`, teamId, detail: { from: before.role, to: role } });
    return before.role;
  });
}

/** Removes a member from a team (with its audit event); false when the person was not a member. */
export async function removeMember(teamId: string, userId: string, actorId: string): Promise<boolean> {
  return db.transaction(async (tx) => {
    const removed = await tx.delete(memberships).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId))).returning();
    if (removed.length === 0) return false;
    await tx.update(sessions).set({ rotationDue: true }).where(eq(sessions.userId, userId));
    await recordAudit(tx, { actorId, action: 'membership.remove', targetTable: 'memberships', targetId: `${teamId}:${userId}`, teamId, detail: { role: removed[0].role } });
    return true;
  });
}
