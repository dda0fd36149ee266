/**
 * `network check` evaluates every two-body gas coefficient over the
 * reaction's own temperature range and refuses values that are not finite or
 * that lie beyond the capture limit; a model meeting a non-finite coefficient
 * names the reaction instead of failing in the solver.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { checkNetwork, type NetworkReport } from '../../src/chem/network-check.ts';
import { ELECTRON_RATE_BOUND, HEAVY_RATE_BOUND } from '../../src/chem/rate-bounds.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { makeNetwork } from '../model/fixtures.ts';
import { catchUserError } from '../support/errors.ts';

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-rate-bounds-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SPECIES = '  - {name: CO, binding_energy: 1150}';

function check(reactions: string[]): NetworkReport {
  const file = join(dir, `n${Math.random().toString(36).slice(2)}.yaml`);
  writeFileSync(file, `format: hoarfrost-network 1\nname: t\nspecies:\n${SPECIES}\nreactions:\n${reactions.map((r) => `  - ${r}`).join('\n')}\n`);
  return checkNetwork(loadNetwork(file));
}

const rateProblems = (r: NetworkReport) => r.problems.filter((p) => p.kind === 'rate-not-finite' || p.kind === 'rate-above-bound');

describe('rate coefficients over the temperature range', () => {
  it('alpha = 1e300 is beyond the capture limit of two heavy particles: an error naming the reaction, its line and the bound', () => {
    const r = check(['{reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.0e300, temperature: [10, 300]}']);
    const [p] = rateProblems(r);
    expect(p.severity).toBe('error');
    expect(p.kind).toBe('rate-above-bound');
    expect(p.source?.line).toBe(6);
    expect(p.message).toMatch(/H3\+ \+ CO -> HCO\+ \+ H2 \(arrhenius\): k = 1e\+300 cm\^3 s\^-1 at 10 K exceeds 1e-6 cm\^3 s\^-1/);
    expect(p.message).toMatch(/Langevin/);
  });

  it('beta = -1000 and gamma = -50000 overflow inside the range: an error naming the temperature', () => {
    const r = check(['{reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.0e-9, beta: -1000, gamma: -50000, temperature: [10, 300]}']);
    const [p] = rateProblems(r);
    expect(p.kind).toBe('rate-not-finite');
    expect(p.message).toMatch(/k is not finite \(Infinity\) at 10 K/);
  });

  it('a rate that is harmless within its range but would overflow outside it is not flagged (the model clamps T to the range)', () => {
    // Within [250, 300] K: at most 1e-30 (250/300)^-200 = 7e-15; at 10 K it would be 1e-30 30^200 = 1e265.
    const r = check(['{reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.0e-30, beta: -200, temperature: [250, 300]}']);
    expect(rateProblems(r)).toEqual([]);
  });

  it('an electron recombination at its measured size passes, and the electron bound is the larger one', () => {
    // HCO+ + e-: alpha 2.8e-7, beta -0.69 (the CLOSED network of network-check.test.ts); 1.8e-6 at 10 K.
    expect(rateProblems(check(['{reactants: [HCO+, e-], products: [CO, H], law: arrhenius, alpha: 2.8e-7, beta: -0.69, temperature: [10, 300]}']))).toEqual([]);
    expect(ELECTRON_RATE_BOUND).toBeGreaterThan(HEAVY_RATE_BOUND);
    const r = check(['{reactants: [HCO+, e-], products: [CO, H], law: arrhenius, alpha: 1.0, temperature: [10, 300]}']);
    expect(rateProblems(r)[0].message).toMatch(/exceeds 1e-4 cm\^3 s\^-1/);
  });

  it('the default network has no coefficient beyond the bounds over its ranges', () => {
    expect(rateProblems(checkNetwork(loadNetwork('config/networks/dark-cloud.yaml')))).toEqual([]);
  });
});

describe('a non-finite coefficient during a model', () => {
  it('names the reaction and the conditions instead of failing in the solver', () => {
    const net = makeNetwork([{ reactants: ['H3+', 'CO'], products: ['HCO+', 'H2'], law: 'arrhenius', params: { alpha: 1e-9, beta: -1000, gamma: 0 }, tmin: 1, tmax: 300 }]);
    const e = catchUserError(() => computeRates(net, { ...defaultConditions(), gas_temperature: 10 }, DEFAULT_GRAIN_OPTIONS));
    expect(e.message).toMatch(/reaction 1 \(H3\+ \+ CO -> HCO\+ \+ H2, arrhenius\): the rate coefficient is Infinity at these conditions \(gas temperature 10 K/);
  });

  it('a one-body law overflows only through the conditions (the loader refuses infinite parameters): named the same way', () => {
    const net = makeNetwork([{ reactants: ['CO'], products: ['C', 'O'], law: 'cosmic-ray', params: { alpha: 1e308 } }]);
    const e = catchUserError(() => computeRates(net, { ...defaultConditions(), cr_ionisation_rate: 1e-15 }, DEFAULT_GRAIN_OPTIONS));
    expect(e.message).toMatch(/reaction 1 \(CO -> C \+ O, cosmic-ray\): the rate coefficient is Infinity at these conditions/);
  });
});
