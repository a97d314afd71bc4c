// The jobs the calc thread runs and the answers it sends back (plain data: structured-clone safe).
import type { ChainOptions, ChainResult, ChainStage, ChainSupply } from '@/lib/calc/chain';
import type { LoopQuery, LoopStage, ProjectLoop } from '@/lib/calc/feedback/project-loop';
import type { FitModel, FitOptions, FitResult } from '@/lib/calc/fit';
import type { CurvePoint, ParseCurveCsvOptions, ParseCurveCsvResult } from '@/lib/curves/types';

export type CalcJob =
  | { kind: 'fit'; model: FitModel; points: CurvePoint[]; options?: Pick<FitOptions, 'currentFloor' | 'maxIterations' | 'maxFitPoints'> }
  | { kind: 'parse-csv'; text: string; options: ParseCurveCsvOptions }
  | { kind: 'chain'; stages: ChainStage[]; supply: ChainSupply; options?: ChainOptions }
  | { kind: 'feedback'; stages: LoopStage[]; links: Array<{ from: string | number; to: string | number }> | null | undefined; options: LoopQuery }
  | { kind: 'spin'; ms: number };

export type CalcValue<J extends CalcJob> = J extends { kind: 'fit' }
  ? FitResult
  : J extends { kind: 'parse-csv' }
    ? ParseCurveCsvResult
    : J extends { kind: 'chain' }
      ? ChainResult
      : J extends { kind: 'feedback' }
        ? ProjectLoop | null
        : number;

export type CalcAnswer = { id: number; ok: true; value: unknown } | { id: number; ok: false; name: string; message: string; code?: string };
