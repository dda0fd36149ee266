/**
 * Monte Carlo realizations of the rate coefficients (docs/uncertainty.md):
 * for each chosen model (a grid point, or a sightline's best fit), N copies
 * with every reaction's coefficient drawn once from its log-normal factor.
 *
 * A realization is a model like any other: its draw is part of the model
 * options, so its content hash covers it; it runs on the worker pool
 * (and in Slurm shards, by the same `index % N` rule as grid points), is
 * written to a store of its own (OUT/store/realizations.sqlite, or a shard's
 * file beside it) and is skipped on rerun when its hash is unchanged. The
 * draw of reaction i in realization r depends on (seed, r, i) alone
 * (src/chem/uncertainty.ts), never on the worker or shard that runs it.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import type { PhysicalConditions } from '../config/conditions.ts';
import { UserError } from '../config/errors.ts';
import type { Pipeline } from '../config/pipeline.ts';
import type { RateDraw } from '../chem/uncertainty.ts';
import { gridHash, modelHash, sharedInputsHash } from './hash.ts';
import type { PhysicalTrack } from '../model/physical-track.ts';
import type { TrackParameters } from './expand.ts';
import type { ModelBatchPlan, PlannedPoint } from './plan.ts';
import { runGrid, type GridRunResult, type RunGridOptions } from './run.ts';
import type { Shard } from './shard.ts';
import { decodeAbundances, ModelStore } from './store.ts';

/** The models whose realizations are wanted: an id of our choosing and the conditions. */
export interface RealizationBase {
  id: string;
  conditions: PhysicalConditions;
  /** The base model's own track and its values, when track parameters are grid axes (src/grid/plan.ts). */
  track?: PhysicalTrack;
  trackParameters?: TrackParameters;
}

export interface RealizationSettings {
  count: number;
  seed: number;
}

/** Id of realization r of a base model. */
export function realizationId(baseId: string, realization: number): string {
  return `${baseId}~r${realization}`;
}

/**
 * The plan of the realizations: a grid plan whose points are (base model,
 * realization) pairs, base-major, each with its draw and its own hash.
 */
export function planRealizations(plan: ModelBatchPlan, bases: readonly RealizationBase[], settings: RealizationSettings): ModelBatchPlan {
  checkSettings(settings);
  const points: PlannedPoint[] = [];
  for (const base of bases) {
    for (let r = 0; r < settings.count; r++) {
      const rateDraw: RateDraw = { seed: settings.seed, realization: r };
      const own = base.track ? { track: base.track, trackParameters: base.trackParameters } : {};
      const hash = modelHash(sharedInputsHash({ ...plan.shared, options: { ...plan.shared.options, rateDraw, ...(base.track ? { track: base.track } : {}) } }), base.conditions);
      points.push({ index: points.length, id: realizationId(base.id, r), conditions: base.conditions, hash, rateDraw, ...own });
    }
  }
  return { ...plan, points, gridHash: gridHash(points) };
}

function checkSettings(s: RealizationSettings): void {
  if (!(Number.isInteger(s.count) && s.count >= 2)) {
    throw new UserError(`the number of realizations must be a whole number of at least 2 (a spread needs two); found ${s.count}.`, { field: 'realizations' });
  }
  if (!(Number.isInteger(s.seed) && s.seed >= 0 && s.seed <= Number.MAX_SAFE_INTEGER)) {
    throw new UserError(`the seed must be a non-negative whole number; found ${s.seed}.`, { field: 'seed' });
  }
}

/** The realizations' store of a plan's output: OUT/store/realizations.sqlite, or one per shard. */
export function realizationStoreFile(plan: Pick<ModelBatchPlan, 'storeDir'>, shard?: Shard): string {
  return join(plan.storeDir, shard ? `realizations-shard-${shard.index}-of-${shard.count}.sqlite` : 'realizations.sqlite');
}

const SHARD_STORE_PATTERN = /^realizations-shard-(\d+)-of-(\d+)\.sqlite$/;

/** The realizations' shard stores in the plan's store folder, ordered by shard count then index. */
export function realizationShardStores(plan: Pick<ModelBatchPlan, 'storeDir'>): string[] {
  let names: string[];
  try {
    names = readdirSync(plan.storeDir);
  } catch {
    return [];
  }
  return names
    .map((n) => ({ n, m: SHARD_STORE_PATTERN.exec(n) }))
    .filter((x): x is { n: string; m: RegExpExecArray } => x.m !== null)
    .sort((a, b) => Number(a.m[2]) - Number(b.m[2]) || Number(a.m[1]) - Number(b.m[1]))
    .map((x) => join(plan.storeDir, x.n));
}

/** Run (or resume) the realizations on the worker pool; a shard runs its share into its own store. */
export async function runRealizations(
  pipeline: Pipeline,
  plan: ModelBatchPlan,
  bases: readonly RealizationBase[],
  settings: RealizationSettings,
  options: Omit<RunGridOptions, 'plan' | 'storeFile' | 'sightlineAv'> & { storeFile?: string } = {},
): Promise<GridRunResult & { plan: ModelBatchPlan }> {
  const realizations = planRealizations(plan, bases, settings);
  const storeFile = options.storeFile ?? realizationStoreFile(plan, options.shard);
  const result = await runGrid(pipeline, { ...options, plan: realizations, storeFile });
  return { ...result, plan: realizations };
}

/**
 * The finished realizations of each base model, read from a store:
 * abundances [realization][time x species] (row-major), in realization
 * order, and the draws they came from. A base with a realization missing or
 * failed lists it in `missing`.
 */
export interface RealizationSet {
  baseId: string;
  species: string[];
  timesYr: Float64Array;
  realizations: number[];
  abundances: Float64Array[];
  missing: number[];
}

export function readRealizations(storeFile: string, plan: ModelBatchPlan, bases: readonly RealizationBase[], settings: RealizationSettings): RealizationSet[] {
  const store = ModelStore.open(storeFile, { readonly: true });
  try {
    const meta = store.meta();
    if (!meta) throw new UserError('the realizations store holds no grid yet; run the realizations first.', { file: storeFile });
    if (meta.shard !== '') {
      throw new UserError(`this is the store of shard ${meta.shard}; merge the shards' realizations first.`, { file: storeFile });
    }
    const wanted = new Map<string, string>();
    for (const p of planRealizations(plan, bases, settings).points) wanted.set(p.id, p.hash);
    const found = new Map<string, Float64Array>();
    for (const row of store.finishedRows()) {
      const id = row[0] as string;
      if (!wanted.has(id)) continue;
      found.set(id, decodeAbundances(row[3] as Buffer));
    }
    const current = store.existing();
    return bases.map((base) => {
      const realizations: number[] = [];
      const abundances: Float64Array[] = [];
      const missing: number[] = [];
      for (let r = 0; r < settings.count; r++) {
        const id = realizationId(base.id, r);
        const a = found.get(id);
        if (a && current.get(id)?.hash === wanted.get(id)) {
          realizations.push(r);
          abundances.push(a);
        } else missing.push(r);
      }
      return { baseId: base.id, species: meta.species, timesYr: meta.timesYr, realizations, abundances, missing };
    });
  } finally {
    store.close();
  }
}
