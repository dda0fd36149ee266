/**
 * A model's content hash covers everything that changes its result (issue 6:
 * network contents, conditions, grain options, initial composition, times,
 * solver tolerances, tool version, and the photochemistry switches), and
 * nothing else: the same inputs give the same hash.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { rmSync } from 'node:fs';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { modelHash, sharedInputsHash, type SharedModelInputs } from '../../src/grid/hash.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { scratch, writePipeline } from './helpers.ts';

function shared(): SharedModelInputs {
  return {
    networkHash: 'a'.repeat(64),
    grain: { ...DEFAULT_GRAIN_OPTIONS },
    initial: { H2: 0.5, He: 0.09, 'C+': 7.3e-5 },
    timesYr: Float64Array.from([1e3, 1e4, 1e5]),
    solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    massActionOnly: false,
    selfShielding: true,
    toolVersion: '0.1.0',
  };
}

const hashOf = (s: SharedModelInputs, conditions = defaultConditions()) => modelHash(sharedInputsHash(s), conditions);

describe('model content hash', () => {
  const base = hashOf(shared());

  it('is the same for the same inputs, whatever the key order of the initial composition', () => {
    const s = shared();
    expect(hashOf(s)).toBe(base);
    expect(hashOf({ ...s, initial: { 'C+': 7.3e-5, He: 0.09, H2: 0.5 } })).toBe(base);
  });

  const changes: [string, (s: SharedModelInputs) => SharedModelInputs][] = [
    ['network contents', (s) => ({ ...s, networkHash: 'b'.repeat(64) })],
    ['tunnelling', (s) => ({ ...s, grain: { ...s.grain, tunnelling: true } })],
    ['reaction-diffusion competition', (s) => ({ ...s, grain: { ...s.grain, diffusionCompetition: true } })],
    ['H2 formation route', (s) => ({ ...s, grain: { ...s.grain, h2Formation: 'parametric' } })],
    ['three-body reactions', (s) => ({ ...s, grain: { ...s.grain, threeBody: true } })],
    ['Eley-Rideal reactions', (s) => ({ ...s, grain: { ...s.grain, eleyRideal: true } })],
    ['photodissociation-induced reactions', (s) => ({ ...s, grain: { ...s.grain, photodissociationInduced: true } })],
    ['ice photolysis', (s) => ({ ...s, grain: { ...s.grain, icePhotolysis: true } })],
    ['ice photolysis factor', (s) => ({ ...s, grain: { ...s.grain, icePhotolysisFactor: 0.5 } })],
    ['three-phase ice', (s) => ({ ...s, grain: { ...s.grain, mantle: true } })],
    ['initial abundance', (s) => ({ ...s, initial: { ...s.initial, 'C+': 7.4e-5 } })],
    ['output times', (s) => ({ ...s, timesYr: Float64Array.from([1e3, 1e4, 2e5]) })],
    ['rtol', (s) => ({ ...s, solver: { ...s.solver, rtol: 1e-7 } })],
    ['atol', (s) => ({ ...s, solver: { ...s.solver, atol: 1e-26 } })],
    ['mass-action only', (s) => ({ ...s, massActionOnly: true })],
    ['H2 self-shielding', (s) => ({ ...s, selfShielding: false })],
    ['tool version', (s) => ({ ...s, toolVersion: '0.2.0' })],
  ];
  for (const [what, change] of changes) {
    it(`changes with ${what}`, () => {
      expect(hashOf(change(shared()))).not.toBe(base);
    });
  }

  it('changes with the surface layers of a three-phase ice, and not while the mantle is off', () => {
    const s = shared();
    const mantle = (layers: number) => hashOf({ ...s, grain: { ...s.grain, mantle: true, surfaceLayers: layers } });
    expect(mantle(2)).not.toBe(mantle(1));
    expect(hashOf({ ...s, grain: { ...s.grain, surfaceLayers: 2 } })).toBe(base);
  });

  it('changes with any condition', () => {
    const c = defaultConditions();
    for (const name of Object.keys(c) as (keyof typeof c)[]) {
      expect(hashOf(shared(), { ...c, [name]: c[name] * 1.001 + 1e-30 }), name).not.toBe(base);
    }
  });
});

describe('photochemistry switch of the pipeline file', () => {
  it('reaches the workers and the model hashes', () => {
    const dir = scratch();
    const on = planGrid(loadPipeline(writePipeline(dir, 'conditions: { density: 1.0e4 }\n', 'on.yaml')));
    const off = planGrid(loadPipeline(writePipeline(dir, 'conditions: { density: 1.0e4 }\nphotochemistry: { h2_self_shielding: false }\n', 'off.yaml')));
    expect(on.workerInit.selfShielding).toBe(true);
    expect(off.workerInit.selfShielding).toBe(false);
    expect(off.points[0].hash).not.toBe(on.points[0].hash);
    rmSync(dir, { recursive: true, force: true });
  });
});
