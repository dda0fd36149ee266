/** The pool and runGrid with a fake model in real worker threads: failures, crashes, stopping, resuming. */
import { spawnSync } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { availableParallelism, hostname } from 'node:os';
import Database from 'better-sqlite3';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { mainStoreFile, planGrid } from '../../src/grid/plan.ts';
import { runGrid } from '../../src/grid/run.ts';
import { gridStatus } from '../../src/grid/status.ts';
import { ModelStore } from '../../src/grid/store.ts';
import { FAKE_WORKER, scratch, writePipeline } from './helpers.ts';

const GRID = 'conditions:\n  density: { from: 1.0e2, to: 1.0e6, count: 9 }\n  gas_temperature: [10, 20]\n';

function rows(file: string): Map<string, { run: string; status: string; failure: string | null }> {
  const s = ModelStore.open(file, { readonly: true });
  try {
    const all = s.db.prepare('SELECT id, run, status, failure FROM models').all() as { id: string; run: string; status: string; failure: string | null }[];
    return new Map(all.map((r) => [r.id, r]));
  } finally {
    s.close();
  }
}

afterEach(() => {
  for (const k of ['FAKE_MODEL_DELAY_MS', 'FAKE_MODEL_FAIL_ABOVE', 'FAKE_MODEL_THROW_ABOVE', 'FAKE_MODEL_EXIT_ABOVE']) delete process.env[k];
});

describe('grid runs on a worker pool (fake model)', () => {
  it('records failures, errors and dead workers with their reasons, and goes on', async () => {
    process.env.FAKE_MODEL_FAIL_ABOVE = '5e4'; // densities 1e5, 3.16e5 fail
    process.env.FAKE_MODEL_THROW_ABOVE = '5e5'; // 1e6 throws
    process.env.FAKE_MODEL_EXIT_ABOVE = '2e5'; // 3.16e5 and 1e6 end the worker first
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const r = await runGrid(pipeline, { workers: 2, workerUrl: FAKE_WORKER });
    expect(r).toMatchObject({ share: 18, computed: 18, ok: 12, failed: 6, remaining: 0, interrupted: false });
    expect(r.failureReasons).toEqual({
      'step size underflow at t = # yr': 2,
      'the model worker stopped unexpectedly (exit code #)': 4,
    });
    const stored = rows(r.storeFile);
    expect(stored.size).toBe(18);
    expect([...stored.values()].filter((x) => x.status === 'failed').map((x) => x.failure).sort()[0]).toMatch(/^step size underflow at t = 1\.234e\+5 yr$/);
  });

  it('records an exception of the model as a failure', async () => {
    process.env.FAKE_MODEL_THROW_ABOVE = '5e5';
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const r = await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    expect(r.failureReasons).toEqual({ 'the model raised an error: fake model refuses density #': 2 });
    expect(r.ok).toBe(16);
  });

  it('drains on request, keeps what finished, and a rerun computes only the rest', async () => {
    process.env.FAKE_MODEL_DELAY_MS = '20';
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const drain = new AbortController();
    let seen = 0;
    const first = await runGrid(pipeline, {
      workers: 2,
      workerUrl: FAKE_WORKER,
      drainSignal: drain.signal,
      onProgress: (p) => {
        seen = p.done;
        if (p.done === 5) drain.abort();
      },
    });
    expect(first.interrupted).toBe(true);
    // The 5th model triggered the stop; at most the other worker's model was still in flight.
    expect(first.computed).toBeGreaterThanOrEqual(5);
    expect(first.computed).toBeLessThanOrEqual(6);
    expect(seen).toBe(first.computed);
    expect(first.remaining).toBe(18 - first.computed);
    const before = rows(first.storeFile);
    expect(before.size).toBe(first.computed);

    const second = await runGrid(pipeline, { workers: 2, workerUrl: FAKE_WORKER });
    expect(second).toMatchObject({ upToDate: first.computed, computed: 18 - first.computed, remaining: 0, interrupted: false });
    const after = rows(second.storeFile);
    expect(after.size).toBe(18);
    for (const [id, r] of before) expect(after.get(id)!.run).toBe(r.run);
  });

  it('keeps failed models unless asked to retry them', async () => {
    process.env.FAKE_MODEL_FAIL_ABOVE = '5e5';
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    delete process.env.FAKE_MODEL_FAIL_ABOVE;
    const again = await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    expect(again.computed).toBe(0);
    const retried = await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER, retryFailed: true });
    expect(retried).toMatchObject({ computed: 2, ok: 2 });
    const plan = planGrid(pipeline);
    expect(gridStatus(mainStoreFile(plan), plan.points)).toMatchObject({ done: 18, failed: 0, missing: 0, stale: 0 });
  });

  it('a full disk at a batch flush is a clear error naming the store; the lock is released and a rerun finishes the grid', async () => {
    // 40 ms a model: 18 models span several 250 ms batches.
    process.env.FAKE_MODEL_DELAY_MS = '40';
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const storeFile = mainStoreFile(planGrid(pipeline));
    const realWrite = ModelStore.prototype.write;
    let writes = 0;
    // The first batch is committed; the disk is full from the second on (better-sqlite3 raises SQLITE_FULL).
    const spy = vi.spyOn(ModelStore.prototype, 'write').mockImplementation(function (this: ModelStore, ...args: Parameters<ModelStore['write']>) {
      if (writes++ === 0) return realWrite.apply(this, args);
      throw new Database.SqliteError('database or disk is full', 'SQLITE_FULL');
    });
    let caught: unknown;
    try {
      await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    } catch (e) {
      caught = e;
    } finally {
      spy.mockRestore();
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as UserError).message).toBe(`${storeFile}: cannot write: the disk is full. Free some space, or choose an output folder on another disk. The models written before this are kept; run the grid again to compute the rest.`);
    expect(existsSync(`${storeFile}.running`)).toBe(false);
    const kept = gridStatus(storeFile, planGrid(pipeline).points).done;
    expect(kept).toBeGreaterThan(0);
    expect(kept).toBeLessThan(18);
    const rerun = await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    expect(rerun).toMatchObject({ upToDate: kept, computed: 18 - kept, remaining: 0 });
  });

  it('--workers beyond the cores is capped at the cores, with a note saying so', async () => {
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const starts: { workers: number; note?: string }[] = [];
    const r = await runGrid(pipeline, { workers: 1000, workerUrl: FAKE_WORKER, onStart: (i) => starts.push(i) });
    expect(r.computed).toBe(18);
    const cores = availableParallelism();
    expect(starts[0].workers).toBe(Math.min(cores, 18));
    expect(starts[0].note).toBe(`--workers 1000 is more than the ${cores} cores this process may use; running ${cores} at most`);
  });

  it('refuses a second run on the same store, and takes over a lock left by a dead process', async () => {
    process.env.FAKE_MODEL_DELAY_MS = '10';
    const pipeline = loadPipeline(writePipeline(scratch(), GRID));
    const lockFile = `${mainStoreFile(planGrid(pipeline))}.running`;
    const first = runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER });
    await expect(runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER })).rejects.toThrow(
      new RegExp(`another hoarfrost grid \\(process ${process.pid}, started .*\\) is computing into this store`),
    );
    expect((await first).computed).toBe(18);
    expect(existsSync(lockFile)).toBe(false);

    const dead = spawnSync(process.execPath, ['-e', '']).pid!;
    writeFileSync(lockFile, JSON.stringify({ pid: dead, host: hostname(), started: '2026-01-01T00:00:00Z' }));
    expect((await runGrid(pipeline, { workers: 1, workerUrl: FAKE_WORKER, retryFailed: true })).upToDate).toBe(18);
    expect(existsSync(lockFile)).toBe(false);
  });
});
