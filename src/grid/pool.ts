/**
 * A pool of model worker threads. The worker module is a parameter (the real
 * one runs runModel; tests give one with a fake model), and workers load
 * TypeScript through tsx's loader, given by absolute path so that a grid
 * started from any folder (a Slurm job's) finds it.
 *
 * Each worker holds one model at a time. A model that throws, or a worker
 * that dies, becomes a failed outcome and the grid goes on (a dead worker is
 * replaced). `drain()` lets the models in flight finish and starts no more;
 * `abort()` stops the workers at once.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { PhysicalConditions } from '../config/conditions.ts';
import type { RateDraw } from '../chem/uncertainty.ts';
import type { PhysicalTrack } from '../model/physical-track.ts';
import { UserError } from '../config/errors.ts';
import type { ModelResult } from '../model/types.ts';
import type { FromWorker, ToWorker, WorkerInit } from './worker-protocol.ts';

export const DEFAULT_WORKER_URL = new URL('./worker.ts', import.meta.url);
/** A worker that dies this many times in a row without finishing a model ends the grid (something is wrong beyond one model). */
const MAX_CONSECUTIVE_CRASHES = 5;

const TSX_API = tsxEsmApiUrl();

/** File URL of tsx's ESM register API, read from its package exports (require.resolve would give the CommonJS build). */
function tsxEsmApiUrl(): string {
  const manifestFile = createRequire(import.meta.url).resolve('tsx/package.json');
  const manifest = JSON.parse(readFileSync(manifestFile, 'utf8')) as { exports: Record<string, { import: { default: string } }> };
  return pathToFileURL(join(dirname(manifestFile), manifest.exports['./esm/api'].import.default)).href;
}

/**
 * A worker's entry: registers tsx in the worker's own thread (loader hooks
 * of the parent thread do not reach workers), then imports the TypeScript
 * worker module. A data: URL, so no JavaScript file needs to sit beside it.
 */
function bootstrapUrl(workerUrl: URL): URL {
  const code = `import { register } from ${JSON.stringify(TSX_API)};\nregister();\nawait import(${JSON.stringify(workerUrl.href)});\n`;
  return new URL(`data:text/javascript,${encodeURIComponent(code)}`);
}

export function defaultWorkerCount(): number {
  return availableParallelism();
}

export interface PoolTask {
  id: string;
  conditions: PhysicalConditions;
  /** A Monte Carlo realization of the rate coefficients (src/grid/realizations.ts); absent for a grid model. */
  rateDraw?: RateDraw;
  /** The point's own physical track (track parameters on grid axes). */
  track?: PhysicalTrack;
}

export type PoolOutcome =
  | { kind: 'result'; task: PoolTask; result: ModelResult }
  | { kind: 'error'; task: PoolTask; message: string };

export interface PoolOptions {
  size: number;
  init: WorkerInit;
  workerUrl?: URL;
  /** Species the main thread expects; a worker reporting others ends the grid. */
  species?: readonly string[];
}

interface Slot {
  worker: Worker;
  task?: PoolTask;
  ready: boolean;
}

export class ModelPool {
  private readonly options: PoolOptions;
  private slots: Slot[] = [];
  private queue: PoolTask[] = [];
  private next = 0;
  private draining = false;
  private aborted = false;
  private crashes = 0;
  private onOutcome: (o: PoolOutcome) => void = () => undefined;
  private finish: (v: { interrupted: boolean }) => void = () => undefined;
  private fail: (e: Error) => void = () => undefined;
  private settled = false;
  /** Species list reported by the workers. */
  species: string[] | undefined;

  constructor(options: PoolOptions) {
    if (!Number.isInteger(options.size) || options.size < 1) throw new UserError(`--workers needs a whole number of at least 1, found ${options.size}.`);
    this.options = options;
  }

  /** Run every task; outcomes arrive through onOutcome as models finish, in completion order. */
  run(tasks: PoolTask[], onOutcome: (o: PoolOutcome) => void): Promise<{ interrupted: boolean }> {
    this.queue = tasks;
    this.onOutcome = onOutcome;
    return new Promise((resolve, reject) => {
      this.finish = (v) => {
        if (this.settled) return;
        this.settled = true;
        void this.stopAll().then(() => resolve(v));
      };
      this.fail = (e) => {
        if (this.settled) return;
        this.settled = true;
        void this.stopAll().then(() => reject(e));
      };
      if (tasks.length === 0) {
        this.finish({ interrupted: false });
        return;
      }
      const n = Math.min(this.options.size, tasks.length);
      for (let i = 0; i < n; i++) this.slots.push(this.spawn());
    });
  }

  /** Start no new model; resolve once those in flight are done. */
  drain(): void {
    this.draining = true;
    this.checkFinished();
  }

  /** Stop at once; models in flight are lost. */
  abort(): void {
    this.aborted = true;
    this.finish({ interrupted: true });
  }

  inFlight(): number {
    return this.slots.filter((s) => s.task).length;
  }

  private spawn(): Slot {
    const worker = new Worker(bootstrapUrl(this.options.workerUrl ?? DEFAULT_WORKER_URL), { workerData: this.options.init });
    const slot: Slot = { worker, ready: false };
    worker.on('message', (msg: FromWorker) => this.onMessage(slot, msg));
    worker.on('error', (err) => this.onCrash(slot, `the model worker failed: ${err.message}`));
    worker.on('exit', (code) => {
      if (!this.settled) this.onCrash(slot, `the model worker stopped unexpectedly (exit code ${code})`);
    });
    return slot;
  }

  private onMessage(slot: Slot, msg: FromWorker): void {
    if (this.settled) return;
    switch (msg.type) {
      case 'ready':
        slot.ready = true;
        this.species ??= this.options.species ? [...this.options.species] : msg.species;
        if (msg.species.join('\n') !== this.species.join('\n')) {
          this.fail(new Error(`a model worker reports species ${msg.species.join(', ')}; expected ${this.species.join(', ')}`));
          return;
        }
        this.dispatch(slot);
        return;
      case 'init-failed':
        this.fail(msg.userError ? new UserError(msg.message) : new Error(`a model worker could not start: ${msg.message}`));
        return;
      case 'done':
      case 'threw': {
        const task = slot.task;
        if (!task || task.id !== msg.id) {
          this.fail(new Error(`a model worker answered for ${msg.id}, which it was not running`));
          return;
        }
        slot.task = undefined;
        this.crashes = 0;
        // A user's mistake (a bad network entry, say) fails every model alike: stop and say so once.
        if (msg.type === 'threw' && msg.userError) {
          this.fail(new UserError(msg.message));
          return;
        }
        this.onOutcome(msg.type === 'done' ? { kind: 'result', task, result: msg.result } : { kind: 'error', task, message: `the model raised an error: ${msg.message}` });
        this.dispatch(slot);
        return;
      }
    }
  }

  private onCrash(slot: Slot, message: string): void {
    if (this.settled || !this.slots.includes(slot)) return;
    this.slots = this.slots.filter((s) => s !== slot);
    void slot.worker.terminate();
    const task = slot.task;
    if (!slot.ready && !task) {
      this.fail(new Error(`${message} before it was ready`));
      return;
    }
    if (task) this.onOutcome({ kind: 'error', task, message });
    if (++this.crashes >= MAX_CONSECUTIVE_CRASHES) {
      this.fail(new Error(`${MAX_CONSECUTIVE_CRASHES} model workers died in a row; last: ${message}`));
      return;
    }
    if (!this.draining && this.next < this.queue.length) this.slots.push(this.spawn());
    this.checkFinished();
  }

  private dispatch(slot: Slot): void {
    if (this.draining || this.aborted || this.next >= this.queue.length) {
      this.checkFinished();
      return;
    }
    const task = this.queue[this.next++];
    slot.task = task;
    slot.worker.postMessage({ type: 'run', id: task.id, conditions: task.conditions, rateDraw: task.rateDraw, track: task.track } satisfies ToWorker);
  }

  private checkFinished(): void {
    if (this.settled || this.inFlight() > 0) return;
    if (this.draining) this.finish({ interrupted: this.next < this.queue.length });
    else if (this.next >= this.queue.length) this.finish({ interrupted: false });
  }

  private async stopAll(): Promise<void> {
    const slots = this.slots;
    this.slots = [];
    await Promise.all(slots.map((s) => s.worker.terminate()));
  }
}
