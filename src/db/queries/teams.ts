import { and, asc, desc, eq } from 'drizzle-orm';
import { db } from '../client';
import { memberships, studies, teams, users, type Study, type Team } from '../schema';
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

/** The study when the user belongs to its team, else null: another team's study is indistinguishable from none. */
export async function getStudyForMember(studyId: string, userId: string): Promise<StudyWithRole | null> {
  if (!isUuid(studyId)) return null;
  const rows = await db
    .select({ study: studies, team: teams, role: memberships.role })
    .from(studies)
    .innerJoin(teams, eq(teams.id, studies.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, studies.teamId), eq(memberships.userId, userId)))
    .where(eq(studies.id, studyId))
    .limit(1);
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
