// Exploration of a stage: tolerance runs, tube swaps, part searches (pure; the worker pool and the jobs live in lib/explore).
export * from './random';
export * from './series';
export * from './parts';
export * from './metrics';
export * from './stats';
export * from './tolerance';
export * from './swap';
export * from './search';
export * from './chain-tolerance';
