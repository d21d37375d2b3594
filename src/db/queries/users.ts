import { asc, eq, sql } from 'drizzle-orm';
import { db } from '../client';
import { memberships, teams, users, type User } from '../schema';
import type { Role } from '../../lib/permissions';

export async function getUserByEmail(email: string): Promise<User | null> {
  const rows = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`).limit(1);
  return rows[0] ?? null;
}

export async function getUserById(id: string): Promise<User | null> {
  const rows = await db.select().from(users).where(eq(users.id, id)).limit(1);
  return rows[0] ?? null;
}

export interface UserWithMemberships {
  id: string;
  email: string;
  displayName: string;
  active: boolean;
  createdAt: Date;
  memberships: { teamId: string; teamName: string; role: Role }[];
}

/** Every user with their memberships, for site administration. */
export async function listUsersWithMemberships(): Promise<UserWithMemberships[]> {
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      displayName: users.displayName,
      passwordHash: users.passwordHash,
      createdAt: users.createdAt,
      teamId: memberships.teamId,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(users)
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(teams, eq(teams.id, memberships.teamId))
    .orderBy(asc(users.displayName), asc(teams.name));
  const byId = new Map<string, UserWithMemberships>();
  for (const r of rows) {
    let u = byId.get(r.id);
    if (!u) {
      u = { id: r.id, email: r.email, displayName: r.displayName, active: r.passwordHash !== null, createdAt: r.createdAt, memberships: [] };
      byId.set(r.id, u);
    }
    if (r.teamId && r.teamName && r.role) u.memberships.push({ teamId: r.teamId, teamName: r.teamName, role: r.role });
  }
  return [...byId.values()];
}
