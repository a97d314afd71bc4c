// The exploration worker: takes runs from the queue, claims each in explore_runs (attempt + heartbeat), computes on
// the worker-thread pool, and stores the result. Any number of workers, on any machine, may share one database.
// A worker whose heartbeat goes stale (killed, machine lost) is noticed by the others, which fail its pg-boss job
// so that pg-boss hands it out again; the claim's attempt number keeps a late finisher from overwriting the retry.
import { setMaxListeners } from 'node:events';
import os from 'node:os';
import { QueryTypes, type Sequelize } from 'sequelize';
import { CalcError } from '../calc/errors';
import { createSequelize } from '../db/sequelize';
import { queue, stopQueue } from '../jobs/queue';
import { executeSetup, type ExploreSetup } from './execute';
import { EXPLORE_QUEUE, EXPLORE_QUEUES } from './queue-names';
import { ExploreCancelled, ExplorePool } from './threads';

export type WorkerOptions = {
  databaseUrl: string;
  threads?: number;
  name?: string;
  /** heartbeat period, ms */
  heartbeatMs?: number;
  /** a running run whose heartbeat is older than this is taken as lost, s */
  staleSeconds?: number;
  log?: (line: string) => void;
};

type Claimed = { id: number; attempt: number; kind: string; scope: string; setup: ExploreSetup };

export async function startExploreWorker(options: WorkerOptions) {
  const name = options.name ?? `${os.hostname()}:${process.pid}`;
  const heartbeatMs = options.heartbeatMs ?? 1000;
  const staleSeconds = options.staleSeconds ?? 20;
  const log = options.log ?? ((l: string) => console.log(`[explore-worker ${name}] ${l}`));
  const sequelize: Sequelize = createSequelize(options.databaseUrl);
  const pool = new ExplorePool(options.threads);
  await pool.warm();
  const boss = await queue(options.databaseUrl, 'worker', EXPLORE_QUEUES);
  const q = <T extends object>(sql: string, replacements: Record<string, unknown>) => sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });

  const claim = async (runId: number): Promise<Claimed | null> => {
    const rows = await q<Claimed>(
      `UPDATE explore_runs SET status = 'running', attempt = attempt + 1, worker = :name, heartbeat_at = now(),
         started_at = COALESCE(started_at, now()), updated_at = now()
       WHERE id = :id AND status IN ('queued', 'running') AND NOT cancel_requested
       RETURNING id, attempt, kind, scope, setup`,
      { id: runId, name },
    );
    if (rows[0]) return rows[0];
    await sequelize.query(`UPDATE explore_runs SET status = 'cancelled', finished_at = now(), updated_at = now() WHERE id = :id AND cancel_requested AND status IN ('queued', 'running')`, { replacements: { id: runId } });
    return null;
  };

  const handle = async (runId: number) => {
    const run = await claim(runId);
    if (!run) return;
    log(`run ${run.id} (${run.kind}, attempt ${run.attempt}) started`);
    const t0 = Date.now();
    const ctl = new AbortController();
    // one abort listener per queued thread task
    setMaxListeners(0, ctl.signal);
    let progress = { done: 0, total: 0 };
    let lost = false;
    const beat = async () => {
      const rows = await q<{ cancel_requested: boolean }>(
        `UPDATE explore_runs SET heartbeat_at = now(), progress_done = :done, progress_total = :total, updated_at = now()
         WHERE id = :id AND attempt = :attempt AND status = 'running' RETURNING cancel_requested`,
        { id: run.id, attempt: run.attempt, done: progress.done, total: progress.total },
      ).catch(() => null);
      if (rows && rows.length === 0) lost = true;
      if (rows?.[0]?.cancel_requested || lost) ctl.abort();
    };
    const timer = setInterval(() => void beat(), heartbeatMs);
    const finish = (status: string, result: unknown, error: unknown) =>
      sequelize.query(
        `UPDATE explore_runs SET status = :status, result = CAST(:result AS jsonb), error = CAST(:error AS jsonb), finished_at = now(),
           elapsed_ms = :elapsed, progress_done = CASE WHEN :status = 'completed' THEN progress_total ELSE progress_done END, updated_at = now()
         WHERE id = :id AND attempt = :attempt`,
        { replacements: { id: run.id, attempt: run.attempt, status, result: result === null ? null : JSON.stringify(result), error: error === null ? null : JSON.stringify(error), elapsed: Date.now() - t0 } },
      );
    try {
      const result = await executeSetup(pool, run.setup, { signal: ctl.signal, onProgress: (p) => (progress = p) });
      await beat();
      await finish('completed', result, null);
      log(`run ${run.id} completed in ${Date.now() - t0} ms`);
    } catch (err) {
      if (err instanceof ExploreCancelled) {
        if (!lost) await finish('cancelled', null, null);
        log(`run ${run.id} ${lost ? 'handed to another worker' : 'cancelled'}`);
      } else {
        const e = err instanceof CalcError ? { code: `calc_${err.code}`, message: err.message } : { code: 'failed', message: err instanceof Error ? err.message : 'The run failed.' };
        await finish('failed', null, e);
        log(`run ${run.id} failed: ${e.message}`);
      }
    } finally {
      clearInterval(timer);
    }
  };

  // lost workers: a running run without a heartbeat is re-queued and its job failed, so pg-boss retries it
  const reap = async () => {
    const stale = await q<{ id: number; job_id: string | null }>(
      `UPDATE explore_runs SET status = 'queued', worker = NULL, updated_at = now()
       WHERE status = 'running' AND heartbeat_at < now() - make_interval(secs => :stale) RETURNING id, job_id`,
      { stale: staleSeconds },
    ).catch(() => []);
    for (const r of stale) {
      log(`run ${r.id} lost its worker; queued again`);
      if (r.job_id) await boss.fail(EXPLORE_QUEUE, r.job_id, { message: 'worker lost' }).catch(() => undefined);
    }
  };
  const reaper = setInterval(() => void reap(), Math.max(1000, (staleSeconds * 1000) / 2));

  await boss.work<{ runId: number }>(EXPLORE_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (job) await handle(job.data.runId);
  });
  log(`ready (${pool.threads} threads)`);

  return {
    name,
    async stop() {
      clearInterval(reaper);
      await boss.offWork(EXPLORE_QUEUE).catch(() => undefined);
      await stopQueue(options.databaseUrl, 'worker');
      await pool.destroy();
      await sequelize.close();
    },
  };
}
