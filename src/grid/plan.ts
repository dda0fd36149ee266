/**
 * A grid plan: the expanded points of a pipeline with the model inputs they
 * share, every point's content hash, the grid hash, and where its stores
 * live. Everything `grid`, `--status`, `merge` and `slurm` agree on.
 */
import { join } from 'node:path';
import { outputSpeciesNames } from '../chem/mantle.ts';
import type { Network } from '../chem/network-types.ts';
import type { RateDraw } from '../chem/uncertainty.ts';
import type { Pipeline } from '../config/pipeline.ts';
import { UserError } from '../config/errors.ts';
import { TOOL_VERSION } from '../config/version.ts';
import type { PhysicalTrack } from '../model/physical-track.ts';
import { buildModelSetup, physicalTrackOf, type ModelSetup } from '../model/setup.ts';
import { expandGrid, gridSpecFromPipeline, type ExpandedGrid, type GridPoint } from './expand.ts';
import { gridHash, modelHash, sharedInputsHash, type SharedModelInputs } from './hash.ts';
import { inShard, type Shard } from './shard.ts';
import type { WorkerInit } from './worker-protocol.ts';

export interface PlannedPoint extends GridPoint {
  hash: string;
  /** A Monte Carlo realization of the rate coefficients (src/grid/realizations.ts). */
  rateDraw?: RateDraw;
  /** The point's own physical track, when track parameters are grid axes: hashed and run in place of the setup's. */
  track?: PhysicalTrack;
}

export interface GridPlan {
  pipeline: Pipeline;
  grid: ExpandedGrid;
  points: PlannedPoint[];
  gridHash: string;
  setup: ModelSetup;
  network: Network;
  species: string[];
  shared: SharedModelInputs;
  workerInit: WorkerInit;
  storeDir: string;
}

/** What running and merging a batch of models needs of a plan: the grid's, or the realizations' (src/grid/realizations.ts). */
export type ModelBatchPlan = Pick<GridPlan, 'points' | 'gridHash' | 'species' | 'shared' | 'workerInit' | 'storeDir'>;

/** The batch plan of a model setup with no points yet: what the grid's plan holds besides its grid. */
export function setupBatchPlan(pipeline: Pipeline, setup: ModelSetup): ModelBatchPlan {
  const { network, options } = setup;
  return {
    points: [],
    gridHash: gridHash([]),
    species: outputSpeciesNames(network, options.grain),
    shared: { networkHash: network.contentHash, options, toolVersion: TOOL_VERSION },
    workerInit: { networkFile: setup.networkFile, networkHash: network.contentHash, options },
    storeDir: join(pipeline.resolvePath(pipeline.config.output), 'store'),
  };
}

export function planGrid(pipeline: Pipeline, sightlineAv?: readonly number[]): GridPlan {
  const grid = expandGrid(gridSpecFromPipeline(pipeline, sightlineAv));
  const setup = buildModelSetup(pipeline);
  const { network, options } = setup;
  const shared: SharedModelInputs = { networkHash: network.contentHash, options, toolVersion: TOOL_VERSION };
  const sharedHash = sharedInputsHash(shared);
  checkTrack(pipeline, setup, grid);
  const points = grid.points.map((p): PlannedPoint => {
    if (!p.trackParameters) return { ...p, hash: modelHash(sharedHash, p.conditions) };
    // A track parameter on a grid axis: the point's own track enters its hash as the options' track, as a rate draw does.
    const track = physicalTrackOf(pipeline.config.physical_track, p.trackParameters)!;
    return { ...p, track, hash: modelHash(sharedInputsHash({ ...shared, options: { ...options, track } }), p.conditions) };
  });
  return {
    pipeline,
    grid,
    points,
    gridHash: gridHash(points),
    setup,
    network,
    species: outputSpeciesNames(network, options.grain),
    shared,
    workerInit: { networkFile: setup.networkFile, networkHash: network.contentHash, options },
    storeDir: join(pipeline.resolvePath(pipeline.config.output), 'store'),
  };
}

/** A collapse must end above where it starts: every grid point's density (its start density) below the final density. */
function checkTrack(pipeline: Pipeline, setup: ModelSetup, grid: ExpandedGrid): void {
  const section = pipeline.config.physical_track;
  if (section?.kind !== 'free-fall') return;
  const fixedFinal = (setup.options.track as { finalDensity: number }).finalDensity;
  // Each point's collapse starts at its density and ends at its own final density (an axis, or the one value).
  const bad = grid.points.find((p) => p.conditions.density >= (p.trackParameters?.final_density ?? fixedFinal));
  if (bad) {
    const final = bad.trackParameters?.final_density ?? fixedFinal;
    throw new UserError(
      `the collapse ends at final_density ${final} cm^-3, but the grid starts a model at density ${bad.conditions.density} cm^-3: the density of a grid point is where its collapse starts. Raise final_density above every start density, or narrow the density axis.`,
      { file: pipeline.file, line: pipeline.yaml.lineOf(['physical_track', 'final_density']), field: 'physical_track.final_density' },
    );
  }
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
