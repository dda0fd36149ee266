/**
 * A grid plan: the expanded points of a pipeline with the model inputs they
 * share, every point's content hash, the grid hash, and where its stores
 * live. Everything `grid`, `--status`, `merge` and `slurm` agree on.
 */
import { join } from 'node:path';
import { modelNetwork, outputSpeciesNames } from '../chem/mantle.ts';
import { loadNetwork } from '../chem/network.ts';
import type { Network } from '../chem/network-types.ts';
import type { GrainOptions } from '../config/conditions.ts';
import type { Pipeline } from '../config/pipeline.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { loadInitialComposition, outputTimesYr } from '../model/run.ts';
import type { SolverSettings } from '../model/types.ts';
import { expandGrid, gridSpecFromPipeline, type ExpandedGrid, type GridPoint } from './expand.ts';
import { gridHash, modelHash, sharedInputsHash, type SharedModelInputs } from './hash.ts';
import { inShard, type Shard } from './shard.ts';
import type { WorkerInit } from './worker-protocol.ts';

export interface PlannedPoint extends GridPoint {
  hash: string;
}

export interface GridPlan {
  pipeline: Pipeline;
  grid: ExpandedGrid;
  points: PlannedPoint[];
  gridHash: string;
  network: Network;
  species: string[];
  shared: SharedModelInputs;
  workerInit: WorkerInit;
  storeDir: string;
}

export function grainOptions(pipeline: Pipeline): GrainOptions {
  return grainOptionsOf(pipeline.config.grain);
}

/** The grain section of a pipeline (snake_case, defaults applied) as the model's options. */
export function grainOptionsOf(g: Pipeline['config']['grain']): GrainOptions {
  return {
    tunnelling: g.tunnelling,
    diffusionCompetition: g.diffusion_competition,
    h2Formation: g.h2_formation,
    threeBody: g.three_body,
    eleyRideal: g.eley_rideal,
    photodissociationInduced: g.photodissociation_induced,
    icePhotolysis: g.ice_photolysis,
    icePhotolysisFactor: g.ice_photolysis_factor,
    mantle: g.mantle,
    surfaceLayers: g.surface_layers,
  };
}

export function solverSettings(pipeline: Pipeline): SolverSettings {
  const s = pipeline.config.solver;
  return { rtol: s.rtol, atol: s.atol, maxSteps: s.max_steps };
}

export function planGrid(pipeline: Pipeline, sightlineAv?: readonly number[]): GridPlan {
  const grid = expandGrid(gridSpecFromPipeline(pipeline, sightlineAv));
  const networkFile = pipeline.resolvePath(pipeline.config.network);
  const network = loadNetwork(networkFile);
  const grain = grainOptions(pipeline);
  // With the mantle on, the initial composition may give mantle abundances (X(mantle)).
  const initial = loadInitialComposition(pipeline.config.initial, pipeline.dir, modelNetwork(network, grain), [], { file: pipeline.file, lineOf: pipeline.yaml.lineOf });
  const t = pipeline.config.times;
  const timesYr = outputTimesYr(t.start_yr, t.end_yr, t.count);
  const shared: SharedModelInputs = {
    networkHash: network.contentHash,
    grain,
    initial,
    timesYr,
    solver: solverSettings(pipeline),
    massActionOnly: false,
    selfShielding: pipeline.config.photochemistry.h2_self_shielding,
    toolVersion: TOOL_VERSION,
  };
  const sharedHash = sharedInputsHash(shared);
  const points = grid.points.map((p) => ({ ...p, hash: modelHash(sharedHash, p.conditions) }));
  return {
    pipeline,
    grid,
    points,
    gridHash: gridHash(points),
    network,
    species: outputSpeciesNames(network, shared.grain),
    shared,
    workerInit: { networkFile, networkHash: network.contentHash, initial, timesYr, solver: shared.solver, grain: shared.grain, massActionOnly: false, selfShielding: shared.selfShielding },
    storeDir: join(pipeline.resolvePath(pipeline.config.output), 'store'),
  };
}

/** The store of a whole grid: OUT/store/models.sqlite. */
export function mainStoreFile(plan: Pick<GridPlan, 'storeDir'>): string {
  return join(plan.storeDir, 'models.sqlite');
}

/** The store of one shard: OUT/store/shard-K-of-N.sqlite. */
export function shardStoreFile(plan: Pick<GridPlan, 'storeDir'>, shard: Shard): string {
  return join(plan.storeDir, `shard-${shard.index}-of-${shard.count}.sqlite`);
}

export function shardPoints(points: readonly PlannedPoint[], shard: Shard | undefined): PlannedPoint[] {
  return shard ? points.filter((p) => inShard(p.index, shard)) : [...points];
}
