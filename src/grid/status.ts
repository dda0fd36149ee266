/**
 * Where a grid stands: for the points of the current plan (or one shard),
 * how many models are done, failed (by reason), missing, and stale (stored
 * with a different content hash: an input changed since).
 */
import { existsSync } from 'node:fs';
import { UserError } from '../config/errors.ts';
import type { GridPlan, PlannedPoint } from './plan.ts';
import { runLockHolder } from './run-lock.ts';
import { ModelStore } from './store.ts';

export interface GridStatus {
  storeFile: string;
  storeExists: boolean;
  points: number;
  done: number;
  failed: number;
  failedByReason: Record<string, number>;
  missing: number;
  stale: number;
  /** Rows of the store for points that are not in the grid any more. */
  outsideGrid: number;
}

const NUMBER_PATTERN = /[-+]?\d+(\.\d+)?([eE][-+]?\d+)?/g;

/** A failure sentence with its numbers replaced, so that "at t = 1.2e5 yr" and "at t = 3e6 yr" count as one reason. */
export function failureReason(failure: string): string {
  return failure.replace(NUMBER_PATTERN, '#').trim() || 'no reason given';
}

export function gridStatus(storeFile: string, points: readonly PlannedPoint[]): GridStatus {
  const status: GridStatus = { storeFile, storeExists: existsSync(storeFile), points: points.length, done: 0, failed: 0, failedByReason: {}, missing: 0, stale: 0, outsideGrid: 0 };
  if (!status.storeExists) {
    status.missing = points.length;
    return status;
  }
  const store = ModelStore.open(storeFile, { readonly: true });
  try {
    const existing = store.existing();
    const ids = new Set<string>();
    for (const p of points) {
      ids.add(p.id);
      const e = existing.get(p.id);
      if (!e) status.missing++;
      else if (e.hash !== p.hash) status.stale++;
      else if (e.status === 'ok') status.done++;
      else {
        status.failed++;
        const reason = failureReason(e.failure ?? '');
        status.failedByReason[reason] = (status.failedByReason[reason] ?? 0) + 1;
      }
    }
    for (const id of existing.keys()) if (!ids.has(id)) status.outsideGrid++;
  } finally {
    store.close();
  }
  return status;
}

/**
 * Refuse a store that does not hold exactly the finished grid of the plan:
 * a grid still computing into it, a store of another grid (an input changed
 * since), or models missing or stale. Failed models count as finished (the
 * fit leaves them out and says so). The message says what to run.
 */
export function checkFinishedGrid(storeFile: string, plan: GridPlan): void {
  const run = `Run \`hoarfrost grid ${plan.pipeline.file}\` (or \`hoarfrost run ${plan.pipeline.file}\`) first: it computes only what is missing or stale.`;
  const holder = runLockHolder(storeFile);
  if (holder) {
    throw new UserError(`a grid (process ${holder.pid}, started ${holder.started}${holder.host ? ` on ${holder.host}` : ''}) is computing into the model store, so its grid is not finished. Wait for it to finish, then run again.`, { file: storeFile });
  }
  if (!existsSync(storeFile)) throw new UserError(`no model store here. ${run}`, { file: storeFile });
  const store = ModelStore.open(storeFile, { readonly: true });
  let gridHash: string | undefined;
  try {
    gridHash = store.meta()?.gridHash;
  } finally {
    store.close();
  }
  if (gridHash !== plan.gridHash) {
    throw new UserError(`the model store holds another grid than the pipeline plans (its conditions, network, initial composition, times, solver settings or tool version changed since). ${run}`, { file: storeFile });
  }
  const s = gridStatus(storeFile, plan.points);
  if (s.missing + s.stale > 0) {
    const stale = s.stale > 0 ? ` (${s.stale} of them computed with other inputs)` : '';
    throw new UserError(`the model store lacks ${s.missing + s.stale} of the ${s.points} models the pipeline plans${stale}. ${run}`, { file: storeFile });
  }
}
