// Seeds the demo (idempotent) into DATABASE_URL; called by the lifecycle scripts. The demo study's cohort is seeded
// from the demo files' summaries (computed once by the core and cached in demo-data/summaries.json).
import { db, pool } from '../src/db/client';
import { DEMO_PEOPLE, DEMO_TEAM, seedDemo } from '../src/db/seed';
import { seedDemoCohort } from './seed-cohort';
import { demoSummaries } from '../src/cli/demo-summaries';

const { created } = await seedDemo(db);
const summaries = await demoSummaries('demo-data', process.cwd(), (line) => process.stdout.write(`${line}\n`));
const cohort = summaries === null ? null : await seedDemoCohort(summaries);
await pool.end();
process.stdout.write(`demo seed: ${created === 0 ? 'already present' : `${created} rows created`} (team ${DEMO_TEAM.name})\n`);
process.stdout.write(cohort === null ? 'demo seed: no demo files yet, so no demo cohort (npm run demo:data)\n' : `demo seed: ${cohort.created === 0 ? 'demo cohort already present' : `${cohort.created} demo subjects' sessions signed off`}\n`);
process.stdout.write('demo sign-ins:\n');
for (const p of DEMO_PEOPLE) process.stdout.write(`  ${p.role.padEnd(9)} ${p.email.padEnd(28)} ${p.password}\n`);
