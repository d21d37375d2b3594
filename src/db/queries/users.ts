import { eq, sql } from 'drizzle-orm';
import { db } from '../client';
import { users, type User } from '../schema';

export async function getUserByEmail(email: string): Promise<User | null> {
  const rows = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`).limit(1);
  return rows[0] ?? null;
}

export async function getUserById(id: string): Promise<User | null> {
  const rows = await db.select().from(users).where(eq(users.id, id)).limit(1);
  return rows[0] ?? null;
}
