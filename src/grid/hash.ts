/**
 * Content hashes (sha256) of everything that changes a model's result: the
 * tool version, the network file's contents, every option of the model
 * setup, and the point's conditions. A stored model whose hash differs from
 * the current one is stale.
 *
 * The options enter through one canonical text of the whole record (keys
 * sorted, numbers through String(), the shortest text that reads back to the
 * same double, typed arrays as lists), so the hash changes exactly when a
 * value does, and an option added to the record is hashed with no edit here.
 * Tag v2: the v1 hash listed the same inputs field by field; stores made with
 * v1 recompute their models once.
 */
import { createHash } from 'node:crypto';
import { CONDITION_NAMES, type PhysicalConditions } from '../config/conditions.ts';
import type { ModelOptions } from '../model/types.ts';

const MODEL_HASH_TAG = 'hoarfrost-model-v2';
const GRID_HASH_TAG = 'hoarfrost-grid-v1';

/** What every model of a grid shares: the setup's options, the network's content hash and the tool version. */
export interface SharedModelInputs {
  networkHash: string;
  options: ModelOptions;
  toolVersion: string;
}

/**
 * Canonical text of a value built of plain objects, arrays, typed arrays,
 * numbers, strings and booleans. Anything else is a fault of the caller (a
 * Map or a function would otherwise hash as an empty object).
 */
export function canonicalText(value: unknown): string {
  if (typeof value === 'number' || typeof value === 'boolean') return String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === null) return 'null';
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return `[${Array.from(value as unknown as ArrayLike<number>, String).join(',')}]`;
  if (Array.isArray(value)) return `[${value.map(canonicalText).join(',')}]`;
  if (typeof value === 'object' && [Object.prototype, null].includes(Object.getPrototypeOf(value))) {
    const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
    entries.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalText(v)}`).join(',')}}`;
  }
  throw new Error(`the model hash cannot take a ${Object.prototype.toString.call(value)}; give the option as plain data`);
}

/** Hash of the inputs all points share; combined with each point's conditions by `modelHash`. */
export function sharedInputsHash(s: SharedModelInputs): string {
  return createHash('sha256').update(MODEL_HASH_TAG).update(`\ntool=${s.toolVersion}\nnetwork=${s.networkHash}\noptions=${canonicalText(s.options)}`).digest('hex');
}

export function modelHash(sharedHash: string, conditions: PhysicalConditions): string {
  const h = createHash('sha256').update(sharedHash);
  for (const name of CONDITION_NAMES) h.update(`\n${name}=${String(conditions[name])}`);
  return h.digest('hex');
}

/** Hash of a whole grid: its points' ids and model hashes in grid order. Shards of one grid share it. */
export function gridHash(points: readonly { id: string; hash: string }[]): string {
  const h = createHash('sha256').update(GRID_HASH_TAG);
  for (const p of points) h.update(`\n${p.id} ${p.hash}`);
  return h.digest('hex');
}
