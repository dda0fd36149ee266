/**
 * With the three-phase ice the compiled system keeps the other terms' rhs at
 * the last state it was asked at and reuses it (src/chem/system.ts, othersAt):
 * every answer must be the one a fresh system gives at the same state, bit for
 * bit, whatever state came before and whether the caller's array was changed
 * in place.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import { compile, type CompiledSystem } from '../../src/chem/system.ts';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { ROOT } from '../support/cli.ts';

const network = loadNetwork(join(ROOT, 'config/networks/dark-cloud.yaml'));
const grain = { ...DEFAULT_GRAIN_OPTIONS, mantle: true, threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true };
const conditions = { ...defaultConditions(), density: 2e4, visual_extinction: 10, gas_temperature: 10, dust_temperature: 10 };

const rhsOf = (system: CompiledSystem, y: Float64Array): Float64Array => {
  const out = new Float64Array(system.n);
  system.rhs(0, y, out);
  return out;
};
const jacobianOf = (system: CompiledSystem, y: Float64Array): Float64Array => {
  const out = new Float64Array(system.pattern.rowPtr[system.n]);
  system.jacobian(0, y, out);
  return out;
};
const sameBits = (a: Float64Array, b: Float64Array): boolean => a.every((v, i) => Object.is(v, b[i]));

describe('the reused rhs of the other terms (three-phase ice, every switch on)', () => {
  const reused = compile(network, conditions, grain);
  const n = reused.n;
  const y = Float64Array.from({ length: n }, (_, i) => 1e-8 * (1 + ((i * 7919) % 13)));
  const ice = reused.species.indexOf('CO(s)');

  it('gives a fresh system rhs after a state changed in place, in one species, and in the sign of a zero', () => {
    expect(ice).toBeGreaterThanOrEqual(0);
    expect(sameBits(rhsOf(reused, y), rhsOf(compile(network, conditions, grain), y))).toBe(true);
    // The same array, one surface abundance changed: F, and with it the transfer, changes.
    const before = rhsOf(reused, y);
    y[ice] *= 3;
    const after = rhsOf(reused, y);
    expect(sameBits(after, before)).toBe(false);
    expect(sameBits(after, rhsOf(compile(network, conditions, grain), y))).toBe(true);
    // +0 and -0 compare equal but are not the same state.
    y[ice] = 0;
    rhsOf(reused, y);
    y[ice] = -0;
    expect(sameBits(rhsOf(reused, y), rhsOf(compile(network, conditions, grain), y))).toBe(true);
  });

  it('gives a fresh system Jacobian at the state beginStep was called at, and after another state', () => {
    const fresh = compile(network, conditions, grain);
    const z = Float64Array.from(y, (v, i) => v * (1 + 1e-3 * (i % 5)));
    reused.beginStep(0, z);
    fresh.beginStep(0, z);
    expect(sameBits(jacobianOf(reused, z), jacobianOf(fresh, z))).toBe(true);
    expect(sameBits(rhsOf(reused, z), rhsOf(fresh, z))).toBe(true);
    reused.rhs(0, y, new Float64Array(n));
    expect(sameBits(jacobianOf(reused, z), jacobianOf(fresh, z))).toBe(true);
  });
});
