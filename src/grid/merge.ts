/**
 * Merging shard stores into the grid's store. Every shard store must come
 * from the current grid (same grid hash); one from another grid is refused
 * before anything is copied. A point found in more than one shard is copied
 * once and reported; points no shard has are reported as missing.
 */
import { mkdirSync, readdirSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { throwProblems, UserError } from '../config/errors.ts';
import { mainStoreFile, type ModelBatchPlan } from './plan.ts';
import { acquireRunLock } from './run-lock.ts';
import { ModelStore, trackAxesOf } from './store.ts';

const SHARD_FILE_PATTERN = /^shard-(\d+)-of-(\d+)\.sqlite$/;
/** How many ids of duplicates and missing points a report lists by name. */
const REPORT_SAMPLE = 10;

export interface MergeReport {
  storeFile: string;
  shardFiles: string[];
  /** Models copied into the grid's store by this merge. */
  copied: number;
  /** Models the grid's store already held with the current hash. */
  alreadyPresent: number;
  /** Points found (with the current hash) in more than one shard store. */
  duplicates: number;
  duplicateSample: { id: string; files: string[] }[];
  /** Models in shard stores whose hash is not the current one (computed before an input changed). */
  staleInShards: number;
  /** Points of the grid that have no current model after the merge. */
  missing: number;
  missingSample: string[];
  failed: number;
  points: number;
}

/** Shard store files in the plan's store folder, ordered by shard count then index. */
export function findShardStores(storeDir: string): string[] {
  let names: string[];
  try {
    names = readdirSync(storeDir);
  } catch {
    return [];
  }
  return names
    .map((n) => ({ n, m: SHARD_FILE_PATTERN.exec(n) }))
    .filter((x): x is { n: string; m: RegExpExecArray } => x.m !== null)
    .sort((a, b) => Number(a.m[2]) - Number(b.m[2]) || Number(a.m[1]) - Number(b.m[1]))
    .map((x) => join(storeDir, x.n));
}

/** Merge shard stores into the plan's store (the grid's own, or `storeFile`: the realizations keep theirs). */
export function mergeShards(plan: ModelBatchPlan, shardFiles: string[] = findShardStores(plan.storeDir), storeFile: string = mainStoreFile(plan)): MergeReport {
  if (shardFiles.length === 0) {
    throw new UserError(`no shard stores (shard-K-of-N.sqlite) to merge in ${plan.storeDir}. Run \`hoarfrost grid PIPELINE --shard K/N\` (or the Slurm script) first.`);
  }
  const current = new Map(plan.points.map((p) => [p.id, p.hash]));
  const problems: UserError[] = [];
  const chosen = new Map<string, { file: string; status: string }>();
  const seenIn = new Map<string, string[]>();
  let staleInShards = 0;
  for (const file of shardFiles) {
    const shard = ModelStore.open(file, { readonly: true });
    try {
      const meta = shard.meta();
      if (!meta) {
        problems.push(new UserError('this shard store holds no grid (its run stopped before it began?). Rerun the shard or delete the file.', { file }));
        continue;
      }
      if (meta.gridHash !== plan.gridHash) {
        problems.push(
          new UserError(
            `this shard store was made from a different grid (grid hash ${meta.gridHash.slice(0, 12)}, the pipeline's is ${plan.gridHash.slice(0, 12)}): the conditions, network, times, solver settings or tool version changed since. Rerun that shard, or delete the file if it is left over.`,
            { file },
          ),
        );
        continue;
      }
      for (const [id, r] of shard.existing()) {
        if (current.get(id) !== r.hash) {
          staleInShards++;
          continue;
        }
        const files = seenIn.get(id) ?? [];
        files.push(file);
        seenIn.set(id, files);
        const prior = chosen.get(id);
        // Of two copies keep a finished one over a failed one; otherwise the first.
        if (!prior || (prior.status !== 'ok' && r.status === 'ok')) chosen.set(id, { file, status: r.status });
      }
    } finally {
      shard.close();
    }
  }
  throwProblems(problems, `${problems.length} shard stores cannot be merged; nothing was copied:`);

  mkdirSync(dirname(storeFile), { recursive: true });
  const release = acquireRunLock(storeFile);
  let store: ModelStore;
  try {
    store = ModelStore.open(storeFile);
  } catch (e) {
    release();
    throw e;
  }
  try {
    store.setGrid({
      gridHash: plan.gridHash,
      species: plan.species,
      timesYr: plan.shared.options.timesYr,
      points: plan.points,
      shard: '',
      toolVersion: plan.shared.toolVersion,
      networkHash: plan.shared.networkHash,
      trackAxes: trackAxesOf(plan.points),
    });
    const existing = store.existing();
    let alreadyPresent = 0;
    const byFile = new Map<string, string[]>();
    for (const [id, c] of chosen) {
      const e = existing.get(id);
      if (e && e.hash === current.get(id) && (e.status === 'ok' || c.status !== 'ok')) {
        alreadyPresent++;
        continue;
      }
      const list = byFile.get(c.file) ?? [];
      list.push(id);
      byFile.set(c.file, list);
    }
    let copied = 0;
    for (const [file, ids] of byFile) {
      store.copyFrom(file, ids);
      copied += ids.length;
    }
    const after = store.existing();
    const missingIds: string[] = [];
    let failed = 0;
    for (const p of plan.points) {
      const e = after.get(p.id);
      if (!e || e.hash !== p.hash) missingIds.push(p.id);
      else if (e.status !== 'ok') failed++;
    }
    const duplicates = [...seenIn].filter(([, files]) => files.length > 1);
    return {
      storeFile,
      shardFiles,
      copied,
      alreadyPresent,
      duplicates: duplicates.length,
      duplicateSample: duplicates.slice(0, REPORT_SAMPLE).map(([id, files]) => ({ id, files: files.map((f) => basename(f)) })),
      staleInShards,
      missing: missingIds.length,
      missingSample: missingIds.slice(0, REPORT_SAMPLE),
      failed,
      points: plan.points.length,
    };
  } finally {
    store.close();
    release();
  }
}
