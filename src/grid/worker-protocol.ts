/**
 * Messages between the grid's main thread and its model workers. A worker
 * receives what every model shares once (workerData), answers `ready` with
 * its species list, then runs one model per `run` message. Abundances travel
 * back as transferred buffers (no copy).
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { PhysicalConditions } from '../config/conditions.ts';
import type { RateDraw } from '../chem/uncertainty.ts';
import type { PhysicalTrack } from '../model/physical-track.ts';
import type { ModelOptions, ModelResult } from '../model/types.ts';

/** The model setup as it crosses to a worker: the network by file (loaded again there) and the options as they are. */
export interface WorkerInit {
  networkFile: string;
  /** Content hash the main thread saw; a worker refuses a network file changed since. */
  networkHash: string;
  options: ModelOptions;
}

/** `track`: the point's own physical track, when track parameters are grid axes (it replaces the shared options' track). */
export type ToWorker = { type: 'run'; id: string; conditions: PhysicalConditions; rateDraw?: RateDraw; track?: PhysicalTrack };

export type FromWorker =
  | { type: 'ready'; species: string[] }
  | { type: 'init-failed'; message: string; userError: boolean }
  | { type: 'done'; id: string; result: ModelResult }
  | { type: 'threw'; id: string; message: string; userError: boolean };

export interface ModelRunner {
  species: string[];
  /** One model; with a draw, one Monte Carlo realization of its rate coefficients. */
  run(conditions: PhysicalConditions, rateDraw?: RateDraw, track?: PhysicalTrack): ModelResult;
}

/** Build the runner from the shared inputs; may throw (a bad network), which ends the grid. */
export type ModelRunnerFactory = (init: WorkerInit) => ModelRunner;

/** Errors lose their class crossing threads; the name tells a user's mistake from a fault. */
function isUserErrorName(e: Error | undefined): boolean {
  return e?.name === 'UserError' || e?.name === 'UserErrors';
}

/** The body of a model worker: answer `run` messages with the results of the runner. */
export function serveModelTasks(factory: ModelRunnerFactory): void {
  const port = parentPort;
  if (!port) throw new Error('serveModelTasks runs inside a worker thread');
  let runner: ModelRunner;
  try {
    runner = factory(workerData as WorkerInit);
  } catch (e) {
    const err = e as Error;
    port.postMessage({ type: 'init-failed', message: err?.message ?? String(e), userError: isUserErrorName(err) } satisfies FromWorker);
    return;
  }
  port.on('message', (msg: ToWorker) => {
    if (msg.type !== 'run') return;
    let result: ModelResult;
    try {
      result = runner.run(msg.conditions, msg.rateDraw, msg.track);
    } catch (e) {
      const err = e as Error;
      port.postMessage({ type: 'threw', id: msg.id, message: err?.message ?? String(e), userError: isUserErrorName(err) } satisfies FromWorker);
      return;
    }
    const transfer = result.abundances.buffer instanceof ArrayBuffer ? [result.abundances.buffer] : [];
    port.postMessage({ type: 'done', id: msg.id, result } satisfies FromWorker, transfer);
  });
  port.postMessage({ type: 'ready', species: runner.species } satisfies FromWorker);
}
