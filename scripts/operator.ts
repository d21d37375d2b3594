// `npm run --silent operator -- --email <address> --name "<display name>"`: creates the site's first operator, once.
// Prints a one-time link (valid 24 hours) where that person chooses a password; no password ever passes through the
// command line or the shell history. Refuses when an operator already exists: further operators are granted by an
// operator on the Site pages. Needs DATABASE_URL and TIDEMARK_ORIGIN (as for `npm run serve`). Exit 2 on bad input.
import { parseArgs } from 'node:util';
import { eq, sql } from 'drizzle-orm';
import { db, pool } from '../src/db/client';
import { passwordResetTokens, users } from '../src/db/schema';
import { recordAudit } from '../src/db/queries/audit';
import { newToken } from '../src/lib/crypto/tokens';
import { newUserId } from '../src/lib/crypto/ids';

const FIRST_LINK_HOURS = 24;

function fail(message: string): never {
  process.stderr.write(`tidemark operator: ${message}\n`);
  process.exit(2);
}

let values: { email?: string; name?: string };
try {
  ({ values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } }, strict: true }));
} catch (error) {
  fail(`${(error as Error).message}; usage: npm run --silent operator -- --email <address> --name "<display name>"`);
}
const email = (values.email ?? '').trim().toLowerCase();
const name = (values.name ?? '').trim();
if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email) || email.length > 254) fail(`--email "${values.email ?? ''}" is not an e-mail address`);
if (!name || name.length > 120) fail('--name is required (at most 120 characters)');
const origin = process.env.TIDEMARK_ORIGIN;
if (!origin) fail('TIDEMARK_ORIGIN is not set: the link printed must point at the public origin');

try {
  const token = await db.transaction(async (tx) => {
    // One statement-level lock, so two runs at once cannot both create a "first" operator.
    await tx.execute(sql`LOCK TABLE ${users} IN SHARE ROW EXCLUSIVE MODE`);
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.isOperator, true)).limit(1);
    if (existing) return null;
    const [taken] = await tx.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${email}`).limit(1);
    const id = taken?.id ?? newUserId();
    if (taken) await tx.update(users).set({ isOperator: true }).where(eq(users.id, id));
    else await tx.insert(users).values({ id, email, displayName: name, isOperator: true });
    const { token, tokenHash } = newToken();
    await tx.insert(passwordResetTokens).values({ tokenHash, userId: id, expiresAt: new Date(Date.now() + FIRST_LINK_HOURS * 3_600_000) });
    await recordAudit(tx, { actorId: null, action: 'operator.firstCreated', targetTable: 'users', targetId: id, detail: { by: 'npm run operator', existingAccount: Boolean(taken) } });
    return token;
  });
  if (!token) fail('an operator already exists; further operators are granted by an operator on the Site pages');
  process.stdout.write(`Operator ${email} created. Open this link within ${FIRST_LINK_HOURS} hours to choose the password (it works once):\n${origin.replace(/\/$/, '')}/reset-password/${token}\n`);
} finally {
  await pool.end();
}
