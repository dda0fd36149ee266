/**
 * Running a grid: the points of the plan (or of one shard) whose model is
 * missing from the store or stale are computed on the worker pool, and the
 * results are written in batched transactions as they arrive. A failed model
 * is stored with its reason and the grid goes on. Stopping (drain or abort)
 * keeps every model already written.
 */
import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import type { Pipeline } from '../config/pipeline.ts';
import { UserError } from '../config/errors.ts';
import { writeRefusal } from '../config/write.ts';
import type { ModelResult } from '../model/types.ts';
import { mainStoreFile, planGrid, shardPoints, shardStoreFile, type ModelBatchPlan, type PlannedPoint } from './plan.ts';
import { defaultWorkerCount, ModelPool, type PoolOutcome } from './pool.ts';
import { shardLabel, type Shard } from './shard.ts';
import { ModelStore, trackAxesOf, type StoredModel } from './store.ts';
import { failureReason } from './status.ts';
import { acquireRunLock } from './run-lock.ts';

/** Results are committed when this many are waiting... */
const BATCH_MAX_MODELS = 64;
/** ...or when the oldest has waited this long, ms: a kill loses at most this much finished work beyond the models in flight. */
const BATCH_MAX_WAIT_MS = 250;

export interface GridProgress {
  /** Models of this run's share finished so far (including those found done at the start). */
  done: number;
  total: number;
  failed: number;
  /** Computed in this run. */
  computed: number;
  elapsedMs: number;
  /** Models per minute in this run. */
  ratePerMinute: number;
  /** Estimated time to finish, ms (undefined before the first model). */
  remainingMs?: number;
}

export interface RunGridOptions {
  workers?: number;
  shard?: Shard;
  /** Observed A_V of the sightlines, when visual_extinction is tied to them. */
  sightlineAv?: readonly number[];
  /** Recompute models that failed before (by default a failed model with an unchanged hash is kept). */
  retryFailed?: boolean;
  /** Called after every finished model. */
  onProgress?: (p: GridProgress) => void;
  /** Called once the work is known, before the first model. */
  onStart?: (info: { storeFile: string; share: number; upToDate: number; todo: number; stale: number; workers: number; note?: string }) => void;
  /** Aborting it lets the models in flight finish, then stops. */
  drainSignal?: AbortSignal;
  /** Aborting it stops at once; models in flight are lost. */
  abortSignal?: AbortSignal;
  /** The model worker module (tests give one with a fake model). */
  workerUrl?: URL;
  /** A precomputed plan (the CLI shares one between commands). */
  plan?: ModelBatchPlan;
  /** The store to write instead of the grid's own (the Monte Carlo realizations keep theirs, src/grid/realizations.ts). */
  storeFile?: string;
}

export interface GridRunResult {
  storeFile: string;
  gridHash: string;
  /** Points in the whole grid. */
  gridPoints: number;
  /** Points in this run's share (the grid, or one shard). */
  share: number;
  /** Found done (ok or failed with the current hash) at the start. */
  upToDate: number;
  /** Stale models (hash changed) among those computed. */
  staleRecomputed: number;
  computed: number;
  ok: number;
  failed: number;
  /** Points of the share still without a current model. */
  remaining: number;
  interrupted: boolean;
  /** Failures of this run, by reason (numbers replaced so similar failures group). */
  failureReasons: Record<string, number>;
  wallMs: number;
}

export async function runGrid(pipeline: Pipeline, options: RunGridOptions = {}): Promise<GridRunResult> {
  const started = performance.now();
  const plan = options.plan ?? planGrid(pipeline, options.sightlineAv);
  const share = shardPoints(plan.points, options.shard);
  const storeFile = options.storeFile ?? (options.shard ? shardStoreFile(plan, options.shard) : mainStoreFile(plan));
  const release = options.shard ? () => undefined : (mkdirSync(dirname(storeFile), { recursive: true }), acquireRunLock(storeFile));
  let store: ModelStore;
  try {
    store = ModelStore.open(storeFile, { exclusive: options.shard !== undefined });
  } catch (e) {
    release();
    throw e;
  }
  try {
    const previous = store.meta();
    if (options.shard && previous && previous.shard !== shardLabel(options.shard)) {
      throw new UserError(`this store belongs to shard ${previous.shard}, not ${shardLabel(options.shard)}.`, { file: storeFile });
    }
    store.setGrid({
      gridHash: plan.gridHash,
      species: plan.species,
      timesYr: plan.shared.options.timesYr,
      points: share,
      shard: options.shard ? shardLabel(options.shard) : '',
      toolVersion: plan.shared.toolVersion,
      networkHash: plan.shared.networkHash,
      trackAxes: trackAxesOf(share),
    });
    const existing = store.existing();
    const todo: PlannedPoint[] = [];
    const staleIds = new Set<string>();
    for (const p of share) {
      const e = existing.get(p.id);
      if (!e) todo.push(p);
      else if (e.hash !== p.hash) {
        staleIds.add(p.id);
        todo.push(p);
      } else if (e.status === 'failed' && options.retryFailed) todo.push(p);
    }
    const stale = staleIds.size;
    const upToDate = share.length - todo.length;
    // More model threads than cores only share the cores and multiply the memory (each holds a network and a solver).
    const cores = defaultWorkerCount();
    const asked = options.workers ?? cores;
    const workers = Math.min(asked, cores, Math.max(1, todo.length));
    const note = asked > cores ? `--workers ${asked} is more than the ${cores} cores this process may use; running ${cores} at most` : undefined;
    options.onStart?.({ storeFile, share: share.length, upToDate, todo: todo.length, stale, workers, note });

    const run = randomUUID();
    const byId = new Map(todo.map((p) => [p.id, p]));
    const expectedLength = plan.shared.options.timesYr.length * plan.species.length;
    const failureReasons: Record<string, number> = {};
    let ok = 0;
    let failed = 0;
    let staleRecomputed = 0;
    let batch: StoredModel[] = [];
    let batchStarted = 0;
    // A failed write (a full disk) stops the pool; the error is thrown once the workers are down, so the
    // lock is released by the finally below and the store keeps every batch committed before it.
    let writeFailure: unknown;
    const flush = () => {
      if (batch.length === 0 || writeFailure !== undefined) return;
      try {
        store.write(batch, run);
        batch = [];
      } catch (e) {
        writeFailure = e;
        pool.abort();
      }
    };
    const timer = setInterval(() => {
      if (batch.length > 0 && performance.now() - batchStarted >= BATCH_MAX_WAIT_MS) flush();
    }, BATCH_MAX_WAIT_MS);
    const runStarted = performance.now();
    const pool = new ModelPool({ size: workers, init: plan.workerInit, workerUrl: options.workerUrl, species: plan.species });
    const onDrain = () => pool.drain();
    const onAbort = () => pool.abort();
    options.drainSignal?.addEventListener('abort', onDrain);
    options.abortSignal?.addEventListener('abort', onAbort);
    let outcome: { interrupted: boolean };
    try {
      if (options.drainSignal?.aborted) pool.drain();
      if (options.abortSignal?.aborted) pool.abort();
      outcome = await pool.run(
        todo.map((p) => ({ id: p.id, conditions: p.conditions, ...(p.rateDraw ? { rateDraw: p.rateDraw } : {}), ...(p.track ? { track: p.track } : {}) })),
        (o) => {
          const point = byId.get(o.task.id)!;
          const stored = toStored(point, o, plan.species, expectedLength);
          if (staleIds.has(point.id)) staleRecomputed++;
          if (stored.status === 'ok') ok++;
          else {
            failed++;
            const reason = failureReason(stored.failure ?? '');
            failureReasons[reason] = (failureReasons[reason] ?? 0) + 1;
          }
          if (batch.length === 0) batchStarted = performance.now();
          batch.push(stored);
          if (batch.length >= BATCH_MAX_MODELS) flush();
          if (options.onProgress) {
            const computed = ok + failed;
            const elapsedMs = performance.now() - runStarted;
            const ratePerMinute = elapsedMs > 0 ? (computed / elapsedMs) * 60_000 : 0;
            options.onProgress({
              done: upToDate + computed,
              total: share.length,
              failed,
              computed,
              elapsedMs,
              ratePerMinute,
              remainingMs: computed > 0 ? ((todo.length - computed) / computed) * elapsedMs : undefined,
            });
          }
        },
      );
    } finally {
      clearInterval(timer);
      options.drainSignal?.removeEventListener('abort', onDrain);
      options.abortSignal?.removeEventListener('abort', onAbort);
      flush();
    }
    if (writeFailure !== undefined) {
      throw writeRefusal(storeFile, writeFailure, 'The models written before this are kept; run the grid again to compute the rest.') ?? writeFailure;
    }
    const computed = ok + failed;
    return {
      storeFile,
      gridHash: plan.gridHash,
      gridPoints: plan.points.length,
      share: share.length,
      upToDate,
      staleRecomputed,
      computed,
      ok,
      failed,
      remaining: todo.length - computed,
      interrupted: outcome.interrupted,
      failureReasons,
      wallMs: performance.now() - started,
    };
  } finally {
    store.close();
    release();
  }
}

function toStored(point: PlannedPoint, o: PoolOutcome, species: readonly string[], expectedLength: number): StoredModel {
  const base = { id: point.id, hash: point.hash, conditions: point.conditions, ...(point.trackParameters ? { trackParameters: point.trackParameters } : {}) };
  if (o.kind === 'error') return { ...base, status: 'failed', failure: o.message };
  const r: ModelResult = o.result;
  const common = {
    ...base,
    conservationDrift: r.conservation.maxRelativeDrift,
    conservationWorst: r.conservation.worst,
    stats: r.stats,
    wallMs: r.wallMs,
    clampNotes: r.clampNotes,
  };
  if (r.abundances.length !== expectedLength || r.species.length !== species.length) {
    return { ...common, status: 'failed', failure: `the model returned ${r.abundances.length} values for ${r.species.length} species, expected ${expectedLength} for ${species.length}` };
  }
  return { ...common, status: r.status, failure: r.failure, abundances: r.abundances };
}
