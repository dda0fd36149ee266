/**
 * A model's content hash covers everything that changes its result (issue 6:
 * network contents, conditions, grain options, initial composition, times,
 * solver tolerances, tool version, and the photochemistry switches), and
 * nothing else: the same inputs give the same hash. The record it hashes is
 * the model setup built from a pipeline (issue 11), walked field by field
 * here, so an option added to the setup is covered without editing this test.
 */
import { rmSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { canonicalText, modelHash, sharedInputsHash, type SharedModelInputs } from '../../src/grid/hash.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { scratch, writePipeline } from './helpers.ts';

/** The shared inputs of a real grid plan, from a pipeline that sets an option of every section. */
function planned() {
  const dir = scratch();
  const file = writePipeline(dir, 'conditions: { density: 1.0e4 }\ngrain: { tunnelling: true }\nsolver: { rtol: 1.0e-7 }\nphysical_track: { kind: free-fall, final_density: 1.0e6, retardation: 0.5 }\n');
  const plan = planGrid(loadPipeline(file));
  rmSync(dir, { recursive: true, force: true });
  return plan;
}

const hashOf = (s: SharedModelInputs, conditions = defaultConditions()) => modelHash(sharedInputsHash(s), conditions);

type Path = (string | number)[];

/** Every leaf of a record (numbers, strings, booleans, typed-array elements), as paths. */
function leaves(value: unknown, path: Path = []): Path[] {
  if (value === undefined || value === null) throw new Error(`the record has no value at ${path.join('.')}`);
  if (typeof value === 'number' || typeof value === 'string' || typeof value === 'boolean') return [path];
  if (ArrayBuffer.isView(value)) return Array.from({ length: (value as Float64Array).length }, (_, i) => [...path, i]);
  if (Array.isArray(value)) return value.flatMap((v, i) => leaves(v, [...path, i]));
  return Object.entries(value as Record<string, unknown>).flatMap(([k, v]) => leaves(v, [...path, k]));
}

/** A copy of the record with the leaf at `path` changed: a flipped switch, another number, another word. */
function changed<T>(record: T, path: Path): T {
  const copy = structuredClone(record);
  let parent = copy as unknown as Record<string | number, unknown>;
  for (const key of path.slice(0, -1)) parent = parent[key] as Record<string | number, unknown>;
  const last = path[path.length - 1];
  const v = parent[last];
  parent[last] = typeof v === 'boolean' ? !v : typeof v === 'number' ? v * 1.5 + 1 : `${String(v)}-changed`;
  return copy;
}

describe('model content hash', () => {
  const plan = planned();
  const base = hashOf(plan.shared);

  it('is the same for the same inputs, whatever the key order of the initial composition', () => {
    expect(hashOf(structuredClone(plan.shared))).toBe(base);
    const reversed = Object.fromEntries(Object.entries(plan.shared.options.initial).reverse());
    expect(Object.keys(reversed)).not.toEqual(Object.keys(plan.shared.options.initial));
    expect(hashOf({ ...plan.shared, options: { ...plan.shared.options, initial: reversed } })).toBe(base);
  });

  it('changes with every field of the model setup, found by walking the record', () => {
    const paths = leaves(plan.shared);
    const names = paths.map((p) => p.filter((k) => typeof k === 'string').join('.'));
    // The walk reaches each section of the setup (a check that the walk itself works).
    for (const section of ['networkHash', 'toolVersion', 'options.grain.tunnelling', 'options.photochemistry.h2SelfShielding', 'options.initial.H2', 'options.timesYr', 'options.solver.rtol', 'options.solver.maxSteps', 'options.massActionOnly', 'options.track.finalDensity']) {
      expect(names).toContain(section);
    }
    for (const path of paths) expect(hashOf(changed(plan.shared, path)), path.join('.')).not.toBe(base);
  });

  it('changes with any condition', () => {
    const c = defaultConditions();
    for (const name of Object.keys(c) as (keyof typeof c)[]) {
      expect(hashOf(plan.shared, { ...c, [name]: c[name] * 1.001 + 1e-30 }), name).not.toBe(base);
    }
  });

  it('refuses a value it cannot write canonically rather than hashing it as empty', () => {
    expect(() => canonicalText({ a: new Map([['x', 1]]) })).toThrow(/Map/);
  });
});

describe('the model setup of a pipeline', () => {
  it('is the one record the workers receive and the hashes cover', () => {
    const plan = planned();
    expect(plan.workerInit.options).toBe(plan.setup.options);
    expect(plan.shared.options).toBe(plan.setup.options);
    // What crosses to a worker thread (a structured clone) hashes as what the main thread hashed.
    expect(canonicalText(structuredClone(plan.workerInit.options))).toBe(canonicalText(plan.setup.options));
    expect(plan.setup.options.grain.tunnelling).toBe(true);
    expect(plan.setup.options.solver).toEqual({ rtol: 1e-7, atol: 1e-25, maxSteps: 50000 });
  });

  it('carries the photochemistry switch of the pipeline file to the workers and the model hashes', () => {
    const dir = scratch();
    const on = planGrid(loadPipeline(writePipeline(dir, 'conditions: { density: 1.0e4 }\n', 'on.yaml')));
    const off = planGrid(loadPipeline(writePipeline(dir, 'conditions: { density: 1.0e4 }\nphotochemistry: { h2_self_shielding: false }\n', 'off.yaml')));
    expect(on.workerInit.options.photochemistry.h2SelfShielding).toBe(true);
    expect(off.workerInit.options.photochemistry.h2SelfShielding).toBe(false);
    expect(off.points[0].hash).not.toBe(on.points[0].hash);
    rmSync(dir, { recursive: true, force: true });
  });
});
