// The app's entry, used by `npm start`, `npm test` and `npm run serve`. One process serves (server/app-process.mjs)
// unless TIDEMARK_WORKERS asks for more: then this process only supervises that many app processes under
// node:cluster, which share the listening socket (connections are dealt round-robin). Each app process has its own
// database pool and mail sender; nothing the app keeps in memory is shared state (sessions, limits and mail are in
// PostgreSQL). A worker that dies is replaced after a second; SIGTERM/SIGINT is passed on, and this process exits
// once every worker has finished its requests in flight.
import cluster from 'node:cluster';
import path from 'node:path';

const raw = process.env.TIDEMARK_WORKERS ?? '1';
const workers = Number(raw);
if (!Number.isInteger(workers) || workers < 1 || workers > 64) {
  process.stderr.write(`tidemark: TIDEMARK_WORKERS must be a whole number from 1 to 64 (app processes), not "${raw}"\n`);
  process.exit(2);
}

if (workers === 1 || !cluster.isPrimary) {
  await import('./app-process.mjs');
} else {
  cluster.setupPrimary({ exec: path.join(path.dirname(new URL(import.meta.url).pathname), 'app-process.mjs') });
  let stopping = false;
  for (let i = 0; i < workers; i++) cluster.fork();
  process.stdout.write(`tidemark: ${workers} app processes under one supervisor (TIDEMARK_WORKERS)\n`);
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    process.stderr.write(`tidemark: app process ${worker.process.pid} exited (${signal ?? `code ${code}`}); starting another\n`);
    setTimeout(() => cluster.fork(), 1000);
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
