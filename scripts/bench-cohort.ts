/**
 * `npm run bench:cohort` (on DATABASE_URL when set, else on a private cluster it starts and stops itself): the Cohort
 * screen's first paint for 200 subjects × 6 bands × 4 windows × 64 channels × 2 conditions (issue 12, "Numbers":
 * ≤ 1 s, server query plus render). Writes a bench-only team and study with 200 sessions and summaries, times
 * getCohortOverview (the page's query) and React's server render of the Cohort island, five times each, prints
 * the wall times (the first run reads summaries without a digest and stores the digests; later runs read only those),
 * then deletes the team. Not a test.
 */
import { performance } from 'node:perf_hooks';
import { loadavg } from 'node:os';
import { eq } from 'drizzle-orm';
import { migrate, startCluster } from './lib/bootstrap.mjs';

// Without DATABASE_URL, a private cluster of its own (127.0.0.1 only), a fresh database, migrated; stopped at the end.
let cluster: Awaited<ReturnType<typeof startCluster>> | null = null;
if (!process.env.DATABASE_URL) {
  const port = Number(process.env.TIDEMARK_BENCH_PG_PORT ?? 54431);
  cluster = await startCluster({ name: 'pg-bench-cohort', port });
  cluster.ensureDatabase('tidemark_bench_cohort', { fresh: true });
  migrate(cluster.url('tidemark_bench_cohort'));
  process.env.DATABASE_URL = cluster.url('tidemark_bench_cohort');
}
const { db, pool } = await import('../src/db/client');
const { analysisSessions, recipeVersions, studies, subjects, summaries, teams, users } = await import('../src/db/schema');
const { getCohortOverview } = await import('../src/db/queries/cohort');
const { jsonHash } = await import('../src/lib/crypto/review-hash');
const { newUserId } = await import('../src/lib/crypto/ids');

// React's production build, as the served app uses it (the development build adds checks that cost several times more).
process.env.NODE_ENV = 'production';
const { createElement } = await import('react');
const { renderToString } = await import('react-dom/server');
const { default: CohortScreen } = await import('../src/components/cohort/CohortScreen');

const SUBJECTS = 200;
const BANDS = ['delta', 'theta', 'alpha', 'beta-low', 'beta-high', 'gamma'];
const WINDOWS = ['pre', 'early', 'mid', 'late'];
const CHANNELS = Array.from({ length: 64 }, (_, i) => `E${i + 1}`);
const CONDITIONS = ['gull', 'reed'];

async function main() {
  const stamp = Date.now().toString(36);
  const [user] = await db.insert(users).values({ id: newUserId(), email: `bench-${stamp}@bench.example`, displayName: 'Bench', passwordHash: 'x' }).returning();
  const [team] = await db.insert(teams).values({ name: `Bench ${stamp}`, slug: `bench-${stamp}` }).returning();
  const [study] = await db.insert(studies).values({ teamId: team.id, name: 'Bench cohort' }).returning();
  try {
    const recipe = { format: 2, epochs: { events: ['gull', 'reed'], start: -1, end: 2 }, frequencies: { min: 2, max: 60, count: 40, spacing: 'log' }, cycles: { min: 3, max: 10 }, baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' }, spectrum: { segment: 2, overlap: 0.5, range: [1, 60], source: 'recording' }, aperiodic: { range: [2, 40], model: 'power-law' } };
    let seed = 7;
    const next = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    const t0 = performance.now();
    for (let s = 0; s < SUBJECTS; s++) {
      const code = `B${String(s + 1).padStart(3, '0')}`;
      const [subject] = await db.insert(subjects).values({ studyId: study.id, code }).returning();
      const [session] = await db.insert(analysisSessions).values({ studyId: study.id, ownerId: user.id, subjectId: subject.id, subjectCode: code, status: 'signed off', currentVersion: 1 }).returning();
      const [version] = await db.insert(recipeVersions).values({ analysisSessionId: session.id, number: 1, recipe, recipeHash: jsonHash(recipe), createdBy: user.id }).returning();
      const bandValues = [];
      for (const condition of CONDITIONS) for (const band of BANDS) for (const window of WINDOWS) for (const channel of CHANNELS) {
        const v = Number((next() * 4 - 2).toFixed(4));
        bandValues.push({ band, window, channel, condition, raw: Number((40 * 10 ** (v / 10)).toFixed(4)), normalized: v });
      }
      const summary = {
        format: 'tidemark-summary-1', normalizedUnit: 'decibel',
        bands: BANDS.map((label, i) => ({ label, lowHz: 2 + i * 8, highHz: 10 + i * 8 })), windows: WINDOWS.map((label, i) => ({ label, startS: -0.4 + i * 0.5, endS: 0 + i * 0.5 })),
        conditions: CONDITIONS, channels: CHANNELS, channelGroups: [{ label: 'all', channels: CHANNELS }], bandValues, trialValues: [], aperiodic: [], maps: [],
      };
      const text = JSON.stringify(summary);
      await db.insert(summaries).values({ recipeVersionId: version.id, summary, summaryHash: jsonHash(summary), bytes: text.length, uploadedBy: user.id });
    }
    console.log(`bench:cohort: wrote ${SUBJECTS} sessions × ${BANDS.length * WINDOWS.length * CHANNELS.length * CONDITIONS.length} band values in ${((performance.now() - t0) / 1000).toFixed(1)} s; load average ${loadavg()[0].toFixed(1)}`);
    for (let run = 1; run <= 5; run++) {
      const a = performance.now();
      const cpuA = process.cpuUsage();
      const overview = await getCohortOverview(study.id);
      const b = performance.now();
      const cpuB = process.cpuUsage();
      const html = renderToString(createElement(CohortScreen, { study: { id: study.id, name: study.name }, team: { id: team.id }, overview, may: { covariates: true, design: true, includeUnsigned: true } }));
      const c = performance.now();
      const cpuC = process.cpuUsage();
      const cpu = (x: NodeJS.CpuUsage, y: NodeJS.CpuUsage) => ((y.user - x.user + y.system - x.system) / 1000).toFixed(0);
      // Wall time includes PostgreSQL's work; the CPU time is this process's (the query's Node side, and the render).
      console.log(`run ${run}: query ${(b - a).toFixed(0)} ms (Node CPU ${cpu(cpuA, cpuB)} ms) + render ${(c - b).toFixed(0)} ms (CPU ${cpu(cpuB, cpuC)} ms) = ${(c - a).toFixed(0)} ms wall; ${overview.sessions.length} rows, ${(html.length / 1024).toFixed(0)} KiB of HTML; load average ${loadavg()[0].toFixed(1)}`);
    }
  } finally {
    await db.delete(teams).where(eq(teams.id, team.id));
    await db.delete(users).where(eq(users.id, user.id));
    await pool.end();
    cluster?.stop();
  }
}

main().catch((e) => {
  console.error(`bench:cohort: ${e instanceof Error ? e.message : e}`);
  process.exit(1);
});
