'use client';

// Live analysis for the stage editor. The first analysis of a tube goes to the server (POST /api/analyze), which
// answers with the engine tube it used; from then on every edit runs at once in the browser's engine worker (the
// same lib/calc module), so the plots follow typing without a debounce or a round trip. Without a worker the
// server path is used throughout (debounced). The last good result stays on screen, marked stale, while the
// input is invalid or a calculation fails; `state` says which.
import { useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useRef, useState } from 'react';
import type { StageAnalysis, Tube } from '@/lib/calc';
import { ApiRequestError } from '@/lib/hooks/fetch-json';
import { analyzeQueryOptions, type AnalyzeBody, type LiveAnalysisState } from '@/lib/hooks/stages';
import { useEngineWorker } from './use-engine-worker';

function useDebounced<T>(value: T, key: string, ms: number): { value: T; key: string } {
  const [state, setState] = useState({ value, key });
  useEffect(() => {
    if (key === state.key) return;
    const t = setTimeout(() => setState({ value, key }), ms);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, ms]);
  return state;
}

const tubeKeyOf = (b: AnalyzeBody | null) => (b ? `${b.tubeId}:${b.tubeModelId ?? ''}` : '');

type Local = { key: string; analysis: StageAnalysis | null; error: ApiRequestError | null };

export function useLiveAnalysis(body: AnalyzeBody | null, initial: StageAnalysis | null = null, debounceMs = 250) {
  const key = useMemo(() => (body ? JSON.stringify(body) : ''), [body]);
  const engine = useEngineWorker();
  const tubes = useRef(new Map<string, Tube>());
  const [tubesSeen, setTubesSeen] = useState(0);
  const tubeKey = tubeKeyOf(body);
  const localTube = engine && body ? tubes.current.get(tubeKey) : undefined;
  void tubesSeen;

  // server path: the first analysis of each tube (and everything when no worker runs)
  const debounced = useDebounced(localTube ? null : body, localTube ? '' : key, debounceMs);
  const query = useQuery(analyzeQueryOptions(localTube || debounced.key === '' ? null : debounced.value));
  const serverAnswer = query.isSuccess ? query.data : undefined;
  useEffect(() => {
    if (!serverAnswer?.tube || !debounced.value) return;
    const k = tubeKeyOf(debounced.value);
    if (!tubes.current.has(k)) {
      tubes.current.set(k, serverAnswer.tube);
      setTubesSeen((n) => n + 1);
    }
  }, [serverAnswer, debounced.value]);

  // browser path: every edit at once; only the newest edit's answer is drawn
  const [local, setLocal] = useState<Local | null>(null);
  const latest = useRef('');
  useEffect(() => {
    if (!engine || !body || !localTube) return;
    latest.current = key;
    const { tubeId: _id, tubeModelId: _m, ...rest } = body as AnalyzeBody & { tubeId?: unknown };
    void engine.analyze({ ...rest, tube: localTube }).then((reply) => {
      if (latest.current !== key) return;
      setLocal(
        reply.ok
          ? { key, analysis: reply.analysis, error: null }
          : { key, analysis: null, error: new ApiRequestError(reply.error.message, 422, reply.error.code, reply.error.fieldErrors) },
      );
    });
  }, [engine, key, localTube, body]);

  const [lastGood, setLastGood] = useState<StageAnalysis | null>(initial);
  const fresh = localTube ? (local?.key === key ? (local.analysis ?? undefined) : undefined) : serverAnswer?.analysis;
  useEffect(() => {
    if (fresh) setLastGood(fresh);
  }, [fresh]);
  const analysis = fresh ?? lastGood;
  const pending = localTube ? local?.key !== key : key !== debounced.key || query.isFetching;
  const rawError = localTube ? (local?.key === key ? local.error : null) : !pending && query.isError ? query.error : null;
  const state: LiveAnalysisState = body === null ? 'invalid' : pending ? 'updating' : rawError ? 'failed' : fresh ? 'current' : analysis ? 'updating' : 'none';
  return {
    analysis,
    state,
    stale: state !== 'current',
    /** where the drawn result was computed: in the browser's worker or by the server */
    source: localTube ? ('browser' as const) : ('server' as const),
    /** the edit (input key) the drawn result belongs to */
    drawnKey: fresh ? key : null,
    error: rawError instanceof ApiRequestError ? rawError : rawError ? new ApiRequestError(String((rawError as Error).message), 0, 'error') : null,
  };
}
