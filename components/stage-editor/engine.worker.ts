// The calculation engine in a Web Worker: the stage editor redraws from here while the designer types; the server
// recomputes on save and stays the authority. Same module as the server (lib/calc), nothing implemented twice.
import { analyzeStage, CalcError } from '@/lib/calc';
import { stageInputSchema } from '@/lib/calc/input';
import { ZodError } from 'zod';

export type EngineRequest = { seq: number; input: unknown };
export type EngineReply =
  | { seq: number; ok: true; analysis: ReturnType<typeof analyzeStage>; ms: number }
  | { seq: number; ok: false; error: { code: string; message: string; fieldErrors?: Record<string, string[]> } };

const post = (reply: EngineReply) => (self as unknown as { postMessage(m: EngineReply): void }).postMessage(reply);

self.addEventListener('message', (event: MessageEvent<EngineRequest>) => {
  const { seq, input } = event.data;
  const t0 = performance.now();
  try {
    const analysis = analyzeStage(stageInputSchema.parse(input));
    post({ seq, ok: true, analysis, ms: performance.now() - t0 });
  } catch (err) {
    if (err instanceof ZodError) {
      const fieldErrors: Record<string, string[]> = {};
      for (const issue of err.issues) (fieldErrors[issue.path.map(String).join('.') || '_'] ??= []).push(issue.message);
      post({ seq, ok: false, error: { code: 'unprocessable_entity', message: err.issues[0]?.message ?? 'Invalid input.', fieldErrors } });
    } else if (err instanceof CalcError) {
      post({ seq, ok: false, error: { code: `calc_${err.code}`, message: err.message } });
    } else {
      post({ seq, ok: false, error: { code: 'error', message: err instanceof Error ? err.message : 'The calculation failed.' } });
    }
  }
});
