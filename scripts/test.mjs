// `npm test`: the same bootstrap as `npm start`, on a private test cluster with a fresh database, then Vitest (unit
// and integration, against real PostgreSQL and the built app) and the browser tests (playwright-core driving
// Debian's Chromium). Extra arguments are passed to Vitest as file filters: `npm test -- permissions`.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import {
  assertPortFree, claimRunLock, ensureNodeModules, ensureSlurm, log, migrate, onSignals, requireChromium, root, runMain, seed, serveApp,
  startCluster, stopAll,
} from './lib/bootstrap.mjs';

// TIDEMARK_TEST_SLOT=N (1-9) lets several checkouts' or engineers' runs share a machine: own ports, database and build.
const SLOT = Number(process.env.TIDEMARK_TEST_SLOT ?? 0);
const APP_PORT = 4331 + SLOT;
const PG_PORT = 54339 + SLOT;
const SMTP_PORT = 2535 + SLOT;
const DB_NAME = SLOT ? `tidemark_test_${SLOT}` : 'tidemark_test';
if (SLOT) process.env.TIDEMARK_OUT_DIR = `dist-${SLOT}`;
const filters = process.argv.slice(2);

await runMain(async () => {
  onSignals(async () => {
    await stopAll();
    process.exit(130);
  });
  claimRunLock(SLOT ? `npm-test-${SLOT}` : 'npm-test');
  ensureNodeModules();
  const chromium = requireChromium();
  // The Slurm batch test starts its own cluster; without the binaries it skips and prints why.
  const slurmMissing = ensureSlurm();
  if (slurmMissing !== null) log(`the Slurm batch test will be skipped: ${slurmMissing}`);
  await assertPortFree(APP_PORT, 'the test app');
  await assertPortFree(SMTP_PORT, 'the test mail fake');
  const cluster = await startCluster({ name: SLOT ? `pg-test-${SLOT}` : 'pg-test', port: PG_PORT, fastAndLoose: true });
  cluster.ensureDatabase(DB_NAME, { fresh: true });
  const ownerUrl = cluster.url(DB_NAME);
  migrate(ownerUrl);
  const databaseUrl = cluster.appUrl(DB_NAME);
  seed(ownerUrl);
  const appUrl = `http://127.0.0.1:${APP_PORT}`;
  const env = await serveApp({ databaseUrl, appPort: APP_PORT, smtpPort: SMTP_PORT });
  log(`test app on ${appUrl}`);

  const testEnv = { ...process.env, ...env, TIDEMARK_APP_URL: appUrl, TIDEMARK_CHROMIUM: chromium, TIDEMARK_OWNER_DATABASE_URL: ownerUrl };
  const vitest = path.join(root, 'node_modules', 'vitest', 'vitest.mjs');
  const counts = { passed: 0, failed: 0, skipped: 0 };
  const runVitest = (config, label, name) => {
    log(`running ${label}…`);
    const report = path.join(root, '.tidemark', `vitest-${name}${SLOT ? `-${SLOT}` : ''}.json`);
    fs.rmSync(report, { force: true });
    const args = [vitest, 'run', '--config', config, '--reporter=default', '--reporter=json', `--outputFile.json=${report}`];
    const result = spawnSync(process.execPath, [...args, ...(filters.length ? ['--passWithNoTests', ...filters] : [])], { cwd: root, env: testEnv, stdio: 'inherit' });
    const before = counts.failed;
    try {
      const json = JSON.parse(fs.readFileSync(report, 'utf8'));
      counts.passed += json.numPassedTests;
      // A suite whose hooks failed has no failed test of its own: count it, so the closing line never says 0 falsely.
      counts.failed += json.numFailedTests + json.testResults.filter((r) => r.status === 'failed' && r.assertionResults.every((a) => a.status !== 'failed')).length;
      counts.skipped += json.numPendingTests + json.numTodoTests;
    } catch {
      counts.failed += 1; // the runner died before writing its report
    }
    // Errors outside any test (an unhandled rejection, say) fail the run: count one, so the line never reads 0.
    if (result.status !== 0 && counts.failed === before) counts.failed += 1;
    return result.status ?? 1;
  };
  const pick = (dir) => filters.length === 0 || filters.some((f) => f.includes(dir) || !f.includes('/'));
  let failed = 0;
  if (pick('tests/unit') || pick('tests/integration')) failed += runVitest('tests/vitest.config.ts', 'unit and integration tests', 'node') === 0 ? 0 : 1;
  if (pick('tests/browser')) failed += runVitest('tests/vitest.browser.config.ts', 'browser tests', 'browser') === 0 ? 0 : 1;
  await stopAll();
  log(failed === 0 ? 'all test suites passed' : `${failed} test suite(s) failed`);
  // One plain closing line over both runners, for people and for CI.
  process.stdout.write(`tests: ${counts.passed} passed, ${counts.failed} failed${counts.skipped ? `, ${counts.skipped} skipped` : ''}\n`);
  process.exit(failed === 0 ? 0 : 1);
});
