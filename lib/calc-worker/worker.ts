// Worker-thread entry for the engine's long computations (curve fits, large CSV parsing, chain solves), so they
// never hold the server's request thread. Started by lib/calc-worker/pool.ts with
// `new Worker(new URL('./worker.ts', import.meta.url))`, which the production build bundles as its own entry.
import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';
import { performance } from 'node:perf_hooks';
import { parentPort } from 'node:worker_threads';
import { solveChain } from '@/lib/calc/chain';
import { projectLoop } from '@/lib/calc/feedback/project-loop';
import { fitCurves } from '@/lib/calc/fit';
import { parseCurveCsv } from '@/lib/curves/parse-csv';
import type { CalcAnswer, CalcJob } from './jobs';

const port = parentPort;
if (!port) throw new Error('calc-worker/worker.ts runs only as a worker thread');

// A lower CPU priority than the request thread, so on a busy machine requests are served first (Linux, per thread).
try {
  const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
  if (Number.isInteger(tid) && tid > 0) setPriority(tid, 5);
} catch {
  // no per-thread priority on this system
}

function run(job: CalcJob): unknown {
  switch (job.kind) {
    case 'fit':
      return fitCurves(job.model, job.points, { ...job.options, now: () => performance.now() });
    case 'parse-csv':
      return parseCurveCsv(job.text, job.options);
    case 'chain':
      return solveChain(job.stages, job.supply, job.options);
    case 'feedback':
      return projectLoop(job.stages, job.links, job.options);
    case 'spin':
      // a fixed busy loop, used by tests of the time budget
      for (const end = Date.now() + job.ms; Date.now() < end; );
      return job.ms;
  }
}

port.on('message', ({ id, job }: { id: number; job: CalcJob }) => {
  let answer: CalcAnswer;
  try {
    answer = { id, ok: true, value: run(job) };
  } catch (err) {
    const e = err instanceof Error ? err : new Error(String(err));
    answer = { id, ok: false, name: e.name, message: e.message, code: (e as { code?: unknown }).code as string | undefined };
  }
  port.postMessage(answer);
});
