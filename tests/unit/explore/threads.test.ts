// The worker-thread pool gives the same results as the engine in-process, reports progress and can be cancelled.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { prepareSearch, prepareTolerance, runToleranceTrials, summarizeTolerance, localRunner, runSearch } from '@/lib/calc/explore';
import { ExploreCancelled, ExplorePool } from '@/lib/explore/threads';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', `${name}.json`), 'utf8')));

describe('explore worker pool', () => {
  const pool = new ExplorePool(2);
  afterAll(() => pool.destroy());
  const input = fixture('cc-12ax7-bypassed');

  it('runs a tolerance run across threads with the in-process result, with progress', async () => {
    const setup = prepareTolerance(input, { trials: 600, seed: 11 });
    const seen: number[] = [];
    const pooled = await pool.tolerance(setup, { onProgress: (p) => seen.push(p.done) }, 100);
    expect(pooled).toEqual(summarizeTolerance(setup, [runToleranceTrials(setup, 0, 600)]));
    expect(seen.at(-1)).toBe(600);
    expect(seen.length).toBe(6);
  });

  it('runs a part search across threads with the in-process result', async () => {
    const setup = prepareSearch({
      input,
      free: [{ path: 'plateResistor', min: 47e3, max: 470e3, series: 'E24' }],
      constraints: [{ metric: 'gain', op: 'atLeast', value: 50 }],
      objective: { metric: 'headroom', direction: 'maximize' },
      maxEvaluations: 1000,
      seed: 1,
    });
    const pooled = await pool.search(setup);
    const local = await runSearch(setup, localRunner(setup));
    expect(pooled.best[0]!.parts).toEqual(local.best[0]!.parts);
    expect(pooled.evaluations).toBe(local.evaluations);
  });

  it('stops on cancel', async () => {
    const setup = prepareTolerance(input, { trials: 20_000, seed: 1 });
    const ctl = new AbortController();
    const run = pool.tolerance(setup, { signal: ctl.signal, onProgress: (p) => p.done >= 500 && ctl.abort() }, 250);
    await expect(run).rejects.toBeInstanceOf(ExploreCancelled);
  });
});
