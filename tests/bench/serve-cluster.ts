// Runs server/main.ts in WORKERS processes sharing one port (node:cluster), as a deployment with several web processes
// would: the rate-limit windows and quotas live in PostgreSQL, so they hold across the processes. SIGTERM stops all
// gracefully (each worker flushes its usage counters). Used by tests/bench/api-load.ts.
import cluster from 'node:cluster';

const workers = Number(process.env.WORKERS ?? 2);

if (cluster.isPrimary) {
  for (let i = 0; i < workers; i++) cluster.fork();
  let stopping = false;
  const stop = () => {
    if (stopping) return;
    stopping = true;
    for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill('SIGTERM');
  };
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
  cluster.on('exit', () => {
    if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
    if (!stopping) console.error('a server worker exited unexpectedly');
  });
} else {
  await import('../../server/main.js');
}
