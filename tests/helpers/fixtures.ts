// Rows a test needs that the demo seed does not have: a second team, a person with a given role. Written through
// the app's own query modules and real PostgreSQL.
import { db } from '../../src/db/client';
import { memberships, studies, teams, users } from '../../src/db/schema';
import { hashPassword } from '../../src/lib/crypto/password';
import { newUserId } from '../../src/lib/crypto/ids';
import type { Role } from '../../src/lib/permissions';
import { unique } from './app';

export async function createTeam(name = unique('Team')) {
  const [team] = await db.insert(teams).values({ name, slug: unique('t') }).returning();
  const [study] = await db.insert(studies).values({ teamId: team.id, name: `${name} study` }).returning();
  return { team, study };
}

export async function createMember(teamId: string, role: Role, password = 'fixture-password-1') {
  const email = `${unique(role)}@fixture.example`;
  const [user] = await db
    .insert(users)
    .values({ id: newUserId(), email, displayName: `Fixture ${role}`, passwordHash: await hashPassword(password) })
    .returning();
  await db.insert(memberships).values({ userId: user.id, teamId, role });
  return { user, email, password };
}

/** A site operator (the account flag), member of no team. */
export async function createOperator(password = 'fixture-password-1') {
  const email = `${unique('operator')}@fixture.example`;
  const [user] = await db
    .insert(users)
    .values({ id: newUserId(), email, displayName: 'Fixture operator', passwordHash: await hashPassword(password), isOperator: true })
    .returning();
  return { user, email, password };
}
