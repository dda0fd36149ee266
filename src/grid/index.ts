/** The grid room's public face, for the pipeline stage and the CLI. */
export { expandGrid, gridSpecFromPipeline, needsSightlines, pointId, type ExpandedGrid, type GridPoint } from './expand.ts';
export { sightlineModelAv, binSightlineAv, DEFAULT_SIGHTLINE_AV_STEP } from './sightlines.ts';
export { planGrid, mainStoreFile, shardStoreFile, shardPoints, type GridPlan, type PlannedPoint } from './plan.ts';
export { runGrid, type RunGridOptions, type GridRunResult, type GridProgress } from './run.ts';
export { loadCandidates } from './candidates.ts';
export { gridStatus, failureReason, type GridStatus } from './status.ts';
export { storeContentHash } from './store.ts';
export { mergeShards, findShardStores, type MergeReport } from './merge.ts';
export { parseShard, shardLabel, type Shard } from './shard.ts';
export { slurmScript, type SlurmScriptOptions } from './slurm.ts';
export { ProgressPrinter, progressLine } from './progress.ts';
