// `npm start`: install what is missing, start PostgreSQL and the mail fake on loopback, migrate, seed the demo,
// build when stale and serve the app on http://127.0.0.1:4321. Ctrl-C stops everything cleanly.
import {
  assertPortFree, claimRunLock, ensureNodeModules, log, migrate, onSignals, runMain, seed, serveApp, startCluster, stopAll,
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
  const ownerUrl = cluster.url('tidemark');
  migrate(ownerUrl);
  const databaseUrl = cluster.appUrl('tidemark');
  const seedReport = seed(ownerUrl);
  await serveApp({ databaseUrl, appPort: APP_PORT, smtpPort: SMTP_PORT });
  process.stdout.write(`
  Tidemark is running: http://127.0.0.1:${APP_PORT}
  PostgreSQL 127.0.0.1:${PG_PORT} · mail fake 127.0.0.1:${SMTP_PORT} (read it at http://127.0.0.1:${APP_PORT}/dev/mailbox)
  ${seedReport.trim().split('\n').join('\n  ')}

  Research tool, not a medical device: clinical use follows local governance and licensed practice.
  Press Ctrl-C to stop.
`);
});
