import 'server-only';
// Report PDFs are drawn in worker threads: a 20-stage report takes seconds of CPU, and on the request thread it
// would stall every other user. One pool per process, a queue in front of it, and a time budget per report.
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { bundleWorkerFromSource, runningFromSource } from '@/lib/worker-threads/source-bundle';
import { errorResponse } from '@/lib/api/errors';
import type { ProjectDetail } from '@/lib/projects/service';
import { MAX_REPORT_STAGES } from './limits';
import type { ChainInput, PdfAnswer, PdfJob } from './pdf-worker';
import type { ReportOptions } from './project-report';

/** Why a report could not be drawn; routes answer it in the one error shape (see `reportErrorStatus`). */
export class ReportError extends Error {
  constructor(
    readonly code: 'report_too_large' | 'report_timeout' | 'report_busy' | 'report_failed',
    message: string,
  ) {
    super(message);
  }
}

/** A ReportError in the one error shape: too large 422, over budget or queue full 503 with Retry-After, else 500. */
export function reportErrorResponse(err: ReportError) {
  const status = err.code === 'report_too_large' ? 422 : err.code === 'report_failed' ? 500 : 503;
  if (status === 500) console.error('[report]', err.message);
  const res = errorResponse(err.code, err.message, status);
  if (status === 503) res.headers.set('retry-after', '60');
  return res;
}

// Read per report, so an operator (or a test) can change the budget without a restart of the pool.
const budgetMs = () => Math.max(100, Number(process.env.REPORT_TIME_BUDGET_MS ?? 60_000));
const WORKERS = Math.max(1, Number(process.env.REPORT_WORKERS ?? 1));
const MAX_QUEUE = Math.max(1, Number(process.env.REPORT_QUEUE ?? 8));

type Pending = { job: PdfJob; resolve: (b: Buffer) => void; reject: (e: Error) => void; budget: number; timer?: NodeJS.Timeout };
type Slot = { worker: Worker; busy: Pending | null };

const fromSource = runningFromSource;
const bundleFromSource = () => bundleWorkerFromSource('lib/report/pdf-worker.ts', 'pdf-worker');

class PdfPool {
  private slots: Slot[] = [];
  private queue: Pending[] = [];
  private nextId = 1;

  async render(project: ProjectDetail, opts: ReportOptions, chainInput?: ChainInput): Promise<Buffer> {
    if (project.stages.length > MAX_REPORT_STAGES) {
      throw new ReportError('report_too_large', `A report covers at most ${MAX_REPORT_STAGES} stages; this project has ${project.stages.length}.`);
    }
    if (this.queue.length >= MAX_QUEUE) {
      throw new ReportError('report_busy', 'Too many reports are being drawn right now. Try again in a minute.');
    }
    return new Promise<Buffer>((resolve, reject) => {
      const budget = budgetMs();
      const p: Pending = { job: { id: this.nextId++, project, opts, chainInput }, resolve, reject, budget };
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
      // The render cannot be interrupted inside the worker: end the thread and start a fresh one for the queue.
      this.slots.splice(this.slots.indexOf(slot), 1);
      void slot.worker.terminate();
    }
    p.reject(new ReportError('report_timeout', `The report took longer than ${Math.round(p.budget / 100) / 10} s to draw and was stopped. Try again later, or split the project.`));
    void this.pump();
  }

  private async pump() {
    while (this.queue.length) {
      let slot = this.slots.find((s) => !s.busy);
      if (!slot) {
        if (this.slots.length >= WORKERS) return;
        slot = { worker: await this.spawn(), busy: null };
        this.slots.push(slot);
      }
      const p = this.queue.shift();
      if (!p) return;
      slot.busy = p;
      slot.worker.postMessage(p.job);
    }
  }

  private async spawn(): Promise<Worker> {
    const worker = fromSource
      ? new Worker(pathToFileURL(await bundleFromSource()))
      : new Worker(new URL('./pdf-worker.ts', import.meta.url));
    worker.unref();
    worker.on('message', (answer: PdfAnswer) => {
      const slot = this.slots.find((s) => s.worker === worker);
      const p = slot?.busy;
      if (!slot || !p || p.job.id !== answer.id) return;
      slot.busy = null;
      clearTimeout(p.timer);
      if (answer.ok) p.resolve(Buffer.from(answer.pdf.buffer, answer.pdf.byteOffset, answer.pdf.byteLength));
      else p.reject(new ReportError('report_failed', `The report could not be drawn: ${answer.message}`));
      void this.pump();
    });
    const fail = (err: Error) => {
      const i = this.slots.findIndex((s) => s.worker === worker);
      if (i < 0) return;
      const [slot] = this.slots.splice(i, 1);
      if (slot?.busy) {
        clearTimeout(slot.busy.timer);
        slot.busy.reject(new ReportError('report_failed', `The report could not be drawn: ${err.message}`));
      }
      void this.pump();
    };
    worker.on('error', fail);
    worker.on('exit', (code) => fail(new Error(`the drawing thread stopped (exit ${code})`)));
    return worker;
  }
}

const g = globalThis as unknown as { anodynePdfPool?: PdfPool };

/**
 * Draws the design report (or, with `opts.revision`, a revision's summary) off the request thread. Pass `chainInput`
 * rather than a solved `opts.chain`: the chain is then solved in the drawing thread too.
 */
export function renderReportPdf(project: ProjectDetail, opts: ReportOptions = {}, chainInput?: ChainInput): Promise<Buffer> {
  g.anodynePdfPool ??= new PdfPool();
  return g.anodynePdfPool.render(project, opts, chainInput);
}
