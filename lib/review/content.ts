// What a revision's content hash covers: the design itself, not bookkeeping that changes with every save
// (status, version counters, timestamps). Two submissions of the same design hash the same.
import { contentHash } from './hash';
import type { RevisionSnapshot } from './types';

export function revisionContent(snapshot: RevisionSnapshot) {
  return {
    project: {
      id: snapshot.id,
      name: snapshot.name,
      description: snapshot.description,
      supply: snapshot.supply,
      // only when present, so the hashes of snapshots taken before supply circuits stay as they were
      ...(snapshot.supplyCircuit ? { supplyCircuit: snapshot.supplyCircuit } : {}),
      benchTolerances: snapshot.benchTolerances,
    },
    stages: [...snapshot.stages]
      .sort((a, b) => a.position - b.position || a.id - b.id)
      .map((s) => ({
        id: s.id,
        position: s.position,
        name: s.name,
        topology: s.topology,
        tubeTypeId: s.tubeTypeId,
        tubeModelId: s.tubeModelId,
        tubeDesignation: s.tubeDesignation,
        supplyNode: s.supplyNode,
        inputs: s.inputs,
        analysis: s.analysis,
        analysisError: s.analysisError,
      })),
  };
}

export function revisionHash(snapshot: RevisionSnapshot): string {
  return contentHash(revisionContent(snapshot));
}
