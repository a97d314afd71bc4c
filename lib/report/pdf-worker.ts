// Worker-thread entry that draws report PDFs, so a long report never holds the server's request thread.
// Started by lib/report/pdf.ts with `new Worker(new URL('./pdf-worker.ts', import.meta.url))`, which the
// production build bundles as its own entry.
import { parentPort } from 'node:worker_threads';
import type { ProjectDetail } from '@/lib/projects/service';
import { renderProjectReportPdf, type ReportOptions } from './project-report';

export type PdfJob = { id: number; project: ProjectDetail; opts: ReportOptions };
export type PdfAnswer = { id: number; ok: true; pdf: Uint8Array } | { id: number; ok: false; message: string };

const port = parentPort;
if (!port) throw new Error('pdf-worker.ts runs only as a worker thread');

port.on('message', async (job: PdfJob) => {
  let answer: PdfAnswer;
  try {
    const pdf = await renderProjectReportPdf(job.project, job.opts);
    answer = { id: job.id, ok: true, pdf: new Uint8Array(pdf.buffer, pdf.byteOffset, pdf.byteLength) };
  } catch (err) {
    answer = { id: job.id, ok: false, message: err instanceof Error ? err.message : String(err) };
  }
  port.postMessage(answer);
});
