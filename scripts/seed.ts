// Seeds the demo (idempotent) into DATABASE_URL; called by the lifecycle scripts.
import { db, pool } from '../src/db/client';
import { DEMO_PEOPLE, DEMO_TEAM, seedDemo } from '../src/db/seed';

const { created } = await seedDemo(db);
await pool.end();
process.stdout.write(`demo seed: ${created === 0 ? 'already present' : `${created} rows created`} (team ${DEMO_TEAM.name})\n`);
process.stdout.write('demo sign-ins:\n');
for (const p of DEMO_PEOPLE) process.stdout.write(`  ${p.role.padEnd(9)} ${p.email.padEnd(28)} ${p.password}\n`);
