// Exploration worker process: npm run worker (or `tsx scripts/worker.ts`). Runs tolerance runs, tube swaps and part
// searches from the queue in PostgreSQL. Start as many as you like, on this or other machines, with DATABASE_URL
// pointing at the app's database. EXPLORE_THREADS sets the worker threads (default: one per core).
import { DEFAULT_DATABASE_URL } from '../lib/db/sequelize';
import { startExploreWorker } from '../lib/explore/worker';

async function main() {
  const worker = await startExploreWorker({
    databaseUrl: process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL,
    name: process.env.EXPLORE_WORKER_NAME || undefined,
    heartbeatMs: process.env.EXPLORE_HEARTBEAT_MS ? Number(process.env.EXPLORE_HEARTBEAT_MS) : undefined,
    staleSeconds: process.env.EXPLORE_STALE_SECONDS ? Number(process.env.EXPLORE_STALE_SECONDS) : undefined,
  });
  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    await worker.stop().catch(() => undefined);
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop());
  process.on('SIGINT', () => void stop());
  // started beside the app by npm start: end with it (EXPLORE_PARENT_PID is the shell that became the app's server)
  const parent = Number(process.env.EXPLORE_PARENT_PID);
  if (Number.isInteger(parent) && parent > 1) {
    const check = () => {
      try {
        process.kill(parent, 0);
      } catch {
        void stop();
      }
    };
    check();
    setInterval(check, 2000).unref();
  }
}

main().catch((err) => {
  console.error('[explore-worker] could not start:', err instanceof Error ? err.message : err);
  process.exit(1);
});
