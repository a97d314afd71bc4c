import 'server-only';
// The engine's long computations (curve fits, large CSV parsing, chain and feedback solves) run in a worker thread,
// so a fit of many thousand points or a 20-stage chain never stalls other requests. One small pool per process,
// a bounded queue in front of it, and a time budget per job; the same pattern as the report drawing threads.
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { bundleWorkerFromSource, runningFromSource } from '@/lib/worker-threads/source-bundle';
import { ApiError } from '@/lib/api/errors';
import { CalcError } from '@/lib/calc/errors';
import { CurveFitError } from '@/lib/calc/fit';
import type { CalcAnswer, CalcJob, CalcValue } from './jobs';

// Read per job, so an operator (or a test) can change the budget without a restart of the pool.
const budgetMs = () => Math.max(50, Number(process.env.CALC_TIME_BUDGET_MS ?? 30_000));
const WORKERS = Math.max(1, Number(process.env.CALC_WORKERS ?? 1));
const MAX_QUEUE = Math.max(1, Number(process.env.CALC_QUEUE ?? 16));

type Pending = { id: number; job: CalcJob; resolve: (v: unknown) => void; reject: (e: Error) => void; budget: number; timer?: NodeJS.Timeout };
type Slot = { worker: Worker; busy: Pending | null };

const fromSource = runningFromSource;
const bundleFromSource = () => bundleWorkerFromSource('lib/calc-worker/worker.ts', 'calc-worker');

const WHAT: Record<CalcJob['kind'], string> = {
  fit: 'The fit',
  'parse-csv': 'Reading the file',
  chain: 'The chain solve',
  feedback: 'The feedback solve',
  spin: 'The computation',
};

/** An error thrown in the thread, rebuilt as the class the routes know (engine errors stay 422s). */
function rebuild(a: Extract<CalcAnswer, { ok: false }>): Error {
  if (a.name === 'CalcError' && a.code) return new CalcError(a.code as never, a.message);
  if (a.name === 'CurveFitError') return new CurveFitError(a.message);
  const e = new Error(a.message);
  e.name = a.name;
  return e;
}

class CalcPool {
  private slots: Slot[] = [];
  private queue: Pending[] = [];
  private nextId = 1;

  run<J extends CalcJob>(job: J): Promise<CalcValue<J>> {
    if (this.queue.length >= MAX_QUEUE) {
      return Promise.reject(new ApiError('service_unavailable', 'The calculation engine is busy right now. Try again in a minute.'));
    }
    return new Promise<CalcValue<J>>((resolve, reject) => {
      const budget = budgetMs();
      const p: Pending = { id: this.nextId++, job, resolve: resolve as (v: unknown) => void, reject, budget };
      p.timer = setTimeout(() => this.expire(p), budget);
      p.timer.unref();
      this.queue.push(p);
      void this.pump();
    });
  }

  private expire(p: Pending) {
    const queued = this.queue.indexOf(p);
    if (queued >= 0) this.queue.splice(queued, 1);
    const slot = this.slots.find((s) => s.busy === p);
    if (slot) {
      // A computation cannot be interrupted inside the thread: end it and start a fresh one for the queue.
      this.slots.splice(this.slots.indexOf(slot), 1);
      void slot.worker.terminate();
    }
    p.reject(new ApiError('service_unavailable', `${WHAT[p.job.kind]} took longer than ${Math.round(p.budget / 100) / 10} s and was stopped. Try again later, or with fewer points or stages.`));
    void this.pump();
  }

  private async pump() {
    while (this.queue.length) {
      let slot = this.slots.find((s) => !s.busy);
      if (!slot) {
        if (this.slots.length >= WORKERS) return;
        slot = { worker: await this.spawn(), busy: null };
        this.slots.push(slot);
        continue;
      }
      const p = this.queue.shift();
      if (!p) return;
      slot.busy = p;
      slot.worker.postMessage({ id: p.id, job: p.job });
    }
  }

  private async spawn(): Promise<Worker> {
    const worker = fromSource
      ? new Worker(pathToFileURL(await bundleFromSource()))
      : new Worker(new URL('./worker.ts', import.meta.url));
    worker.unref();
    worker.on('message', (answer: CalcAnswer) => {
      const slot = this.slots.find((s) => s.worker === worker);
      const p = slot?.busy;
      if (!slot || !p || p.id !== answer.id) return;
      slot.busy = null;
      clearTimeout(p.timer);
      if (answer.ok) p.resolve(answer.value);
      else p.reject(rebuild(answer));
      void this.pump();
    });
    const fail = (err: Error) => {
      const i = this.slots.findIndex((s) => s.worker === worker);
      if (i < 0) return;
      const [slot] = this.slots.splice(i, 1);
      if (slot?.busy) {
        clearTimeout(slot.busy.timer);
        slot.busy.reject(new Error(`the calculation thread stopped: ${err.message}`));
      }
      void this.pump();
    };
    worker.on('error', fail);
    worker.on('exit', (code) => fail(new Error(`exit ${code}`)));
    return worker;
  }
}

const g = globalThis as unknown as { anodyneCalcPool?: CalcPool };

/** Runs one engine job in the calc thread. Over the time budget (CALC_TIME_BUDGET_MS, default 30 s) it is a 503. */
export function runInCalcThread<J extends CalcJob>(job: J): Promise<CalcValue<J>> {
  g.anodyneCalcPool ??= new CalcPool();
  return g.anodyneCalcPool.run(job);
}
