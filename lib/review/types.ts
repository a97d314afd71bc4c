// The frozen content of a revision: the project detail (per the shared API contract) at submit time, stages with
// their inputs and the engine's results, so the review page and the PDF report need no database access.
import type { StageAnalysis } from '@/lib/calc';
import type { ProjectSupplyCircuitRecord, ProjectSupplyRecord } from '@/models/types';

export type SnapshotStage = {
  id: number;
  projectId: number;
  position: number;
  name: string;
  topology: string;
  tubeTypeId: number;
  tubeModelId: number | null;
  tubeDesignation: string;
  supplyNode: string | null;
  inputs: Record<string, unknown>;
  version: number;
  analysis: StageAnalysis | null;
  analysisError: { code: string; message: string } | null;
  updatedAt: string;
};

export type RevisionSnapshot = {
  id: number;
  name: string;
  description: string;
  status: 'draft' | 'in-review' | 'approved' | 'changes-requested';
  archived: boolean;
  version: number;
  owner: { id: number; displayName: string } | null;
  supply: ProjectSupplyRecord;
  /** the supply as a circuit (absent in snapshots taken before projects had one) */
  supplyCircuit?: ProjectSupplyCircuitRecord | null;
  benchTolerances: Record<string, number>;
  updatedAt: string;
  stages: SnapshotStage[];
};
