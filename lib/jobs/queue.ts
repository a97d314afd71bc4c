// The job queue (pg-boss 10 in the application's PostgreSQL; its tables live in the `pgboss` schema). Jobs carry
// only an id of the feature's own row; the row holds the work and the result. Used by the app (send, cancel) and
// by worker processes (work, fail), which may run on other machines against the same database.
import PgBoss from 'pg-boss';

export type QueueRole = 'app' | 'worker';

const globalForBoss = globalThis as unknown as { anodyneBoss?: Map<string, Promise<PgBoss>> };

/** How long a job may stay active before pg-boss itself fails it (a backstop; lost workers are found by heartbeat). */
export const JOB_EXPIRE_SECONDS = 4 * 3600;

export type QueueDefinition = { name: string; retryLimit: number };

/**
 * One started pg-boss instance per process, database and role. The app only sends and cancels (no maintenance
 * loop); workers run pg-boss's maintenance as well.
 */
export function queue(databaseUrl: string, role: QueueRole, queues: QueueDefinition[]): Promise<PgBoss> {
  const map = (globalForBoss.anodyneBoss ??= new Map());
  const key = `${role}|${databaseUrl}`;
  let p = map.get(key);
  if (!p) {
    p = (async () => {
      const boss = new PgBoss({
        connectionString: databaseUrl,
        max: role === 'app' ? 3 : 4,
        supervise: role === 'worker',
        schedule: false,
        // the schema and the queues are made by a migration (the owner role); this role may not run DDL
        migrate: false,
      });
      boss.on('error', (err: Error) => console.error(`[jobs] ${err.message}`));
      await boss.start();
      const existing = new Set((await boss.getQueues()).map((q) => q.name));
      const missing = queues.filter((q) => !existing.has(q.name)).map((q) => q.name);
      if (missing.length) throw new Error(`The job queue ${missing.join(', ')} does not exist: run the migrations (npm run db:migrate).`);
      return boss;
    })();
    p.catch(() => map.delete(key));
    map.set(key, p);
  }
  return p;
}

export async function stopQueue(databaseUrl: string, role: QueueRole): Promise<void> {
  const map = globalForBoss.anodyneBoss;
  const p = map?.get(`${role}|${databaseUrl}`);
  if (!p) return;
  map!.delete(`${role}|${databaseUrl}`);
  const boss = await p.catch(() => null);
  await boss?.stop({ graceful: false, wait: true, close: true } as PgBoss.StopOptions).catch(() => undefined);
}
