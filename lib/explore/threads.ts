// A pool of worker threads for tolerance runs and part searches (piscina). Blocks are small (a few hundred
// trials), so progress is reported often and a cancel takes effect within one block per thread.
import os from 'node:os';
import path from 'node:path';
import { existsSync } from 'node:fs';
import { Piscina } from 'piscina';
import {
  runSearch,
  summarizeChainTolerance,
  summarizeTolerance,
  type ChainToleranceSetup,
  type ChainTrialBlock,
  type Candidate,
  type SearchDigest,
  type SearchResult,
  type SearchSetup,
  type SwapCandidate,
  type SwapRow,
  type ToleranceSetup,
  type ToleranceSummary,
  type TrialBlock,
} from '../calc/explore';
import type { StageInput } from '../calc/input';
import type { ThreadTask } from './thread-entry';

export type Progress = { done: number; total: number };
export type RunControl = { onProgress?: (p: Progress) => void; signal?: AbortSignal };

export class ExploreCancelled extends Error {
  constructor() {
    super('The run was cancelled.');
    this.name = 'ExploreCancelled';
  }
}

function entryFile(): { filename: string; execArgv: string[] } {
  // from sources (tsx, vitest): the .ts entry with tsx's loader in the thread; from compiled output: the .js file
  const here = typeof __dirname === 'string' ? __dirname : path.resolve('lib/explore');
  const js = path.join(here, 'thread-entry.js');
  if (existsSync(js)) return { filename: js, execArgv: [] };
  const ts = existsSync(path.join(here, 'thread-entry.ts')) ? path.join(here, 'thread-entry.ts') : path.resolve(process.cwd(), 'lib/explore/thread-entry.ts');
  return { filename: ts, execArgv: ['--import', 'tsx'] };
}

export function defaultThreads(): number {
  const env = Number(process.env.EXPLORE_THREADS);
  if (Number.isInteger(env) && env > 0) return env;
  return Math.max(1, typeof os.availableParallelism === 'function' ? os.availableParallelism() : os.cpus().length);
}

export class ExplorePool {
  private readonly pool: Piscina;
  readonly threads: number;

  constructor(threads = defaultThreads()) {
    const { filename, execArgv } = entryFile();
    this.threads = threads;
    this.pool = new Piscina({ filename, execArgv, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 });
  }

  private run<T>(task: ThreadTask, signal?: AbortSignal): Promise<T> {
    if (signal?.aborted) return Promise.reject(new ExploreCancelled());
    return this.pool.run(task, signal ? { signal } : {}).catch((e: unknown) => {
      if (signal?.aborted) throw new ExploreCancelled();
      throw e;
    }) as Promise<T>;
  }

  /** Splits [0, trials) into blocks across the threads; the summary is the same for any split. */
  async tolerance(setup: ToleranceSetup, control: RunControl = {}, block = 250): Promise<ToleranceSummary> {
    const ranges: [number, number][] = [];
    for (let a = 0; a < setup.trials; a += block) ranges.push([a, Math.min(setup.trials, a + block)]);
    let done = 0;
    const blocks = await Promise.all(
      ranges.map(([from, to]) =>
        this.run<TrialBlock>({ kind: 'tolerance', setup, from, to }, control.signal).then((b) => {
          done += to - from;
          control.onProgress?.({ done, total: setup.trials });
          return b;
        }),
      ),
    );
    if (control.signal?.aborted) throw new ExploreCancelled();
    return summarizeTolerance(setup, blocks);
  }

  async chainTolerance(setup: ChainToleranceSetup, control: RunControl = {}, block = 50): Promise<ToleranceSummary> {
    const ranges: [number, number][] = [];
    for (let a = 0; a < setup.trials; a += block) ranges.push([a, Math.min(setup.trials, a + block)]);
    let done = 0;
    const blocks = await Promise.all(
      ranges.map(([from, to]) =>
        this.run<ChainTrialBlock>({ kind: 'chain-tolerance', setup, from, to }, control.signal).then((b) => {
          done += to - from;
          control.onProgress?.({ done, total: setup.trials });
          return b;
        }),
      ),
    );
    if (control.signal?.aborted) throw new ExploreCancelled();
    return summarizeChainTolerance(setup, blocks);
  }

  async search(setup: SearchSetup, control: RunControl = {}): Promise<SearchResult> {
    let done = 0;
    const total = Math.min(setup.size, setup.spec.maxEvaluations);
    const result = await runSearch(setup, {
      ranges: (ranges, sampleEvery) =>
        Promise.all(
          ranges.map(([from, to]) =>
            this.run<SearchDigest>({ kind: 'search-range', setup, from, to, sampleEvery }, control.signal).then((d) => {
              done += to - from;
              control.onProgress?.({ done, total });
              return d;
            }),
          ),
        ),
      batch: async (batch) => {
        // one slice per thread
        const per = Math.ceil(batch.length / this.threads);
        const slices: number[][][] = [];
        for (let a = 0; a < batch.length; a += per) slices.push(batch.slice(a, a + per));
        const parts = await Promise.all(slices.map((b) => this.run<Candidate[]>({ kind: 'search-batch', setup, batch: b }, control.signal)));
        return parts.flat();
      },
      progress: (p) => control.onProgress?.({ done: p.evaluations, total: p.total }),
      isCancelled: () => control.signal?.aborted === true,
    });
    if (control.signal?.aborted) throw new ExploreCancelled();
    return result;
  }

  /** One candidate per task, in the given order. */
  async swap(input: StageInput, candidates: SwapCandidate[], currentTubeId: number | undefined, control: RunControl = {}): Promise<SwapRow[]> {
    let done = 0;
    const rows = await Promise.all(
      candidates.map((c) =>
        this.run<SwapRow[]>({ kind: 'swap', input, candidates: [c], currentTubeId }, control.signal).then((r) => {
          control.onProgress?.({ done: ++done, total: candidates.length });
          return r;
        }),
      ),
    );
    if (control.signal?.aborted) throw new ExploreCancelled();
    return rows.flat();
  }

  /** Starts the threads and loads the engine in each, so the first run is not timed with start-up. */
  async warm(): Promise<void> {
    await Promise.all(Array.from({ length: this.threads }, () => this.pool.run({ kind: 'search-batch', setup: null, batch: [] } as unknown as ThreadTask).catch(() => undefined)));
  }

  async destroy(): Promise<void> {
    await this.pool.destroy();
  }
}
