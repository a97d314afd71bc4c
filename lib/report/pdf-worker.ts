// Worker-thread entry that draws report PDFs, so a long report never holds the server's request thread.
// Started by lib/report/pdf.ts with `new Worker(new URL('./pdf-worker.ts', import.meta.url))`, which the
// production build bundles as its own entry.
import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';
import { parentPort } from 'node:worker_threads';
import { solveChain, type ChainOptions, type ChainStage, type ChainSupply } from '@/lib/calc/chain';
import { projectLoop } from '@/lib/calc/feedback/project-loop';
import type { ProjectDetail } from '@/lib/projects/service';
import { renderProjectReportPdf, type ReportOptions } from './project-report';

/** What the chain section needs; the chain is solved here, in the thread, as it can take seconds for many stages. */
export type ChainInput = { stages: ChainStage[]; supply: ChainSupply; options: ChainOptions };
export type PdfJob = { id: number; project: ProjectDetail; opts: ReportOptions; chainInput?: ChainInput };
export type PdfAnswer = { id: number; ok: true; pdf: Uint8Array } | { id: number; ok: false; message: string };

const port = parentPort;
if (!port) throw new Error('pdf-worker.ts runs only as a worker thread');

// Draw at a lower CPU priority than the request thread: on a busy machine the scheduler then serves requests first
// and the report takes the idle time. Linux applies a "process" priority to a single thread when given its id,
// which /proc/thread-self names; elsewhere this is skipped.
try {
  const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
  if (Number.isInteger(tid) && tid > 0) setPriority(tid, 5);
} catch {
  // no per-thread priority on this system: draw at normal priority
}

port.on('message', async (job: PdfJob) => {
  let answer: PdfAnswer;
  try {
    let opts = job.opts;
    if (job.chainInput) {
      const { stages, supply, options } = job.chainInput;
      let chain: ReportOptions['chain'] = null;
      try {
        chain = solveChain(stages, supply, options);
      } catch {
        // a chain the engine cannot solve is left out of the report; the stage pages still carry each stage's result
      }
      // the project's global feedback loop, when an output stage carries one (one that cannot be solved is left out)
      let feedback: ReportOptions['feedback'] = null;
      try {
        feedback = projectLoop(stages, options?.links, { input: options?.inputRms ?? 0.1 });
      } catch {
        feedback = null;
      }
      opts = { ...opts, chain, feedback };
    }
    const pdf = await renderProjectReportPdf(job.project, opts);
    answer = { id: job.id, ok: true, pdf: new Uint8Array(pdf.buffer, pdf.byteOffset, pdf.byteLength) };
  } catch (err) {
    answer = { id: job.id, ok: false, message: err instanceof Error ? err.message : String(err) };
  }
  port.postMessage(answer);
});
