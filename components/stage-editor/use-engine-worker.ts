'use client';

// One engine worker per editor: `analyze` posts an input and resolves with the reply; null until the worker runs
// (or where workers are unavailable, so the caller falls back to the server).
import { useEffect, useRef, useState } from 'react';
import type { EngineReply } from './engine.worker';

export type EngineWorker = { analyze(input: unknown): Promise<EngineReply> };

export function useEngineWorker(): EngineWorker | null {
  const [engine, setEngine] = useState<EngineWorker | null>(null);
  const seq = useRef(0);
  useEffect(() => {
    if (typeof Worker === 'undefined') return;
    let worker: Worker;
    try {
      worker = new Worker(new URL('./engine.worker.ts', import.meta.url), { type: 'module', name: 'anodyne-engine' });
    } catch {
      return;
    }
    const waiting = new Map<number, (r: EngineReply) => void>();
    worker.addEventListener('message', (e: MessageEvent<EngineReply>) => {
      waiting.get(e.data.seq)?.(e.data);
      waiting.delete(e.data.seq);
    });
    worker.addEventListener('error', () => setEngine(null));
    setEngine({
      analyze(input) {
        const id = ++seq.current;
        return new Promise<EngineReply>((resolve) => {
          waiting.set(id, resolve);
          worker.postMessage({ seq: id, input });
        });
      },
    });
    return () => worker.terminate();
  }, []);
  return engine;
}
