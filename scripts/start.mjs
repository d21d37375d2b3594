// `npm start`: install what is missing, start PostgreSQL and the mail fake on loopback, migrate, seed the demo,
// build when stale and serve the app on http://127.0.0.1:4321. Ctrl-C stops everything cleanly.
import fs from 'node:fs';
import path from 'node:path';
import {
  assertPortFree, buildIfStale, claimRunLock, ensureNodeModules, log, migrate, outDir, onSignals, root, runMain, seed, startChild,
  startCluster, stopAll,
} from './lib/bootstrap.mjs';

const APP_PORT = Number(process.env.TIDEMARK_PORT ?? 4321);
const PG_PORT = Number(process.env.TIDEMARK_PG_PORT ?? 54329);
const SMTP_PORT = Number(process.env.TIDEMARK_SMTP_PORT ?? 2525);

await runMain(async () => {
  onSignals(async (signal) => {
    log(`${signal}: stopping the app, the mail fake and PostgreSQL…`);
    await stopAll();
    log('stopped');
    process.exit(0);
  });
  claimRunLock('npm-start');
  ensureNodeModules();
  await assertPortFree(APP_PORT, 'the app');
  await assertPortFree(SMTP_PORT, 'the mail fake');
  const cluster = await startCluster({ name: 'pg-dev', port: PG_PORT });
  cluster.ensureDatabase('tidemark');
  const databaseUrl = cluster.url('tidemark');
  migrate(databaseUrl);
  const seedReport = seed(databaseUrl);
  if (fs.existsSync(path.join(root, 'scripts', 'demo-data.ts'))) {
    const { generateDemoData } = await import('./lib/demo-data.mjs');
    generateDemoData();
  }
  buildIfStale();
  const env = {
    DATABASE_URL: databaseUrl,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(SMTP_PORT),
    TIDEMARK_MAIL_FAKE: '1',
    HOST: '127.0.0.1',
    PORT: String(APP_PORT),
    TIDEMARK_ORIGIN: `http://127.0.0.1:${APP_PORT}`,
  };
  await startChild('mail fake', process.execPath, [path.join(root, 'scripts', 'mail-fake.mjs')], { env, readyLine: 'mail fake listening' });
  await startChild('app', process.execPath, [path.join(root, outDir(), 'server', 'entry.mjs')], { env, readyLine: 'Server listening' });
  process.stdout.write(`
  Tidemark is running: http://127.0.0.1:${APP_PORT}
  PostgreSQL 127.0.0.1:${PG_PORT} · mail fake 127.0.0.1:${SMTP_PORT} (read it at http://127.0.0.1:${APP_PORT}/dev/mailbox)
  ${seedReport.trim().split('\n').join('\n  ')}

  Research tool, not a medical device: clinical use follows local governance and licensed practice.
  Press Ctrl-C to stop.
`);
});
