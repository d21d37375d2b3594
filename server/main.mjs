// The app's entry, used by `npm start`, `npm test` and `npm run serve`. One process serves (server/app-process.mjs)
// unless TIDEMARK_WORKERS asks for more: then this process only supervises that many app processes under
// node:cluster, which share the listening socket (connections are dealt round-robin). Each app process has its own
// database pool (TIDEMARK_DB_POOL_SIZE, split between them) and mail sender; nothing the app keeps in memory is shared
// state (sessions, limits and mail are in PostgreSQL). A worker that dies after it served is replaced after a
// second; one that dies before it ever listened (a taken port, a bad setting) stops the whole app with its code.
// SIGTERM/SIGINT is passed on, and this process exits once every worker has finished its requests in flight.
import cluster from 'node:cluster';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const raw = process.env.TIDEMARK_WORKERS ?? '1';
if (!/^([1-9]|[1-5][0-9]|6[0-4])$/.test(raw)) {
  process.stderr.write(`tidemark: TIDEMARK_WORKERS must be a whole number from 1 to 64 (app processes), not "${raw}"\n`);
  process.exit(2);
}
const workers = Number(raw);

if (workers === 1) {
  await import('./app-process.mjs');
} else {
  // PostgreSQL's connections are shared out: 10 for the app in all (at least 3 each), as one process would use.
  const poolSize = String(Math.max(3, Math.ceil(Number(process.env.TIDEMARK_DB_POOL_SIZE ?? 10) / workers)));
  cluster.setupPrimary({ exec: path.join(path.dirname(fileURLToPath(import.meta.url)), 'app-process.mjs') });
  let stopping = false;
  const listened = new Set();
  const fork = () => cluster.fork({ TIDEMARK_DB_POOL_SIZE: poolSize });
  for (let i = 0; i < workers; i++) fork();
  process.stdout.write(`tidemark: ${workers} app processes under one supervisor (TIDEMARK_WORKERS), ${poolSize} database connections each\n`);
  cluster.on('listening', (worker) => listened.add(worker.id));
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    if (!listened.has(worker.id)) {
      process.stderr.write(`tidemark: an app process exited (${signal ?? `code ${code}`}) before it served; stopping\n`);
      stopping = true;
      for (const other of Object.values(cluster.workers ?? {})) other?.process.kill('SIGTERM');
      setTimeout(() => process.exit(code || 1), 12_000).unref();
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(code || 1);
      return;
    }
    process.stderr.write(`tidemark: app process ${worker.process.pid} exited (${signal ?? `code ${code}`}); starting another\n`);
    setTimeout(() => {
      if (!stopping) fork();
    }, 1000);
  });
  const stop = (signal) => {
    if (stopping) return;
    stopping = true;
    for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill(signal);
    // The workers finish their requests within 10 s; this is the last resort.
    setTimeout(() => process.exit(0), 15_000).unref();
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
}
