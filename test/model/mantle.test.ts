/**
 * The three-phase ice in whole model runs, against analytic solutions of the
 * transfer of Garrod & Pauly (2011) (docs/ice-mantle.md):
 *
 * - accretion alone, F = dD/dt > 0 with D the ice per H: dS/dD = 1 - S/Lambda,
 *   so the surface S = Lambda (1 - exp(-D/Lambda)) and the mantle D - S
 *   (Lambda = L x_ML, L monolayers);
 * - desorption alone of a first-order species at rate k, F = -k x_s < 0: while
 *   the mantle holds at least the surface, the mantle refills the surface as
 *   fast as it empties, so the surface stays at its size and the mantle is
 *   exposed in its place; after that the mantle empties as k x_mant.
 *
 * And the default network with the mantle on: every element and the charge
 * conserved over 1e7 yr.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { compile } from '../../src/chem/system.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { loadInitialComposition, runModel } from '../../src/model/run.ts';
import type { ModelResult } from '../../src/model/types.ts';
import { RECOMMENDED_GRAIN } from '../../scripts/ice-targets.ts';
import { makeNetwork } from './fixtures.ts';

// Binding energies E_D/k_B, K: physics.md section 4 (memory).
const data = { CO: { bindingEnergy: 1150 }, H2O: { bindingEnergy: 5700 } };
const TIGHT = { rtol: 1e-10, atol: 1e-30, maxSteps: 100000 };

const column = (r: ModelResult, name: string, k: number): number => {
  const i = r.species.indexOf(name);
  expect(i, name).toBeGreaterThanOrEqual(0);
  return r.abundances[k * r.species.length + i];
};

describe('a grain growing by accretion alone', () => {
  const accreting = makeNetwork([{ reactants: ['CO'], products: ['CO(s)'], law: 'accretion' }], data);
  const c = defaultConditions();
  const mono = grainProperties(c).monolayerAbundance;
  // Up to about 25 monolayers of ice: 1e-4 CO per H, freeze-out time about 3e5 yr at n_H = 2e4 (physics.md section 3).
  const timesYr = Float64Array.from({ length: 25 }, (_, i) => 1e3 * 10 ** (i / 8));

  for (const layers of [1, 3]) {
    it(`keeps its surface at ${layers} monolayer${layers > 1 ? 's' : ''} and the mantle holds the rest (S = Lambda (1 - exp(-D/Lambda)))`, () => {
      const grain: GrainOptions = { ...DEFAULT_GRAIN_OPTIONS, mantle: true, surfaceLayers: layers };
      const r = runModel({ network: accreting, conditions: c, grain, initial: { CO: 1e-4 }, timesYr, solver: TIGHT });
      expect(r.status).toBe('ok');
      const lambda = layers * mono;
      for (let k = 0; k < timesYr.length; k++) {
        const ice = column(r, 'CO(s)', k);
        const surface = column(r, 'CO(surface)', k);
        const expected = lambda * -Math.expm1(-ice / lambda);
        expect(Math.abs(surface - expected) / lambda, `t = ${timesYr[k]} yr`).toBeLessThan(1e-6);
        expect(column(r, 'CO(mantle)', k) + surface).toBeCloseTo(ice, 18);
      }
      const last = timesYr.length - 1;
      // By the end the ice is over 8 surfaces thick (27 monolayers) and the surface is full to 1e-3.
      expect(column(r, 'CO(s)', last) / lambda).toBeGreaterThan(8);
      expect(column(r, 'CO(surface)', last) / lambda).toBeGreaterThan(0.999);
    });
  }
});

describe('an eroding grain (desorption alone, 22 K dust)', () => {
  const c = { ...defaultConditions(), dust_temperature: 22 };
  const mono = grainProperties(c).monolayerAbundance;
  const grain: GrainOptions = { ...DEFAULT_GRAIN_OPTIONS, mantle: true };
  const desorbing = makeNetwork([{ reactants: ['CO(s)'], products: ['CO'], law: 'thermal-desorption' }], data, ['H2O(s)']);
  const k = compile(desorbing, c, grain).rateSet.rates[0].k;
  const timesYr = Float64Array.from({ length: 30 }, (_, i) => ((0.05 + (i * 6) / 29) / k) / YEAR_SECONDS);

  it('loses its surface first and exposes its mantle in its place', () => {
    // One monolayer of CO over five of water; water does not desorb at 22 K here.
    const r = runModel({ network: desorbing, conditions: c, grain, initial: { 'CO(s)': mono, 'H2O(mantle)': 5 * mono }, timesYr, solver: TIGHT });
    expect(r.status).toBe('ok');
    timesYr.forEach((t, q) => {
      const left = Math.exp(-k * t * YEAR_SECONDS);
      expect(column(r, 'CO(surface)', q) / mono).toBeCloseTo(left, 6);
      expect(column(r, 'H2O(surface)', q) / mono).toBeCloseTo(1 - left, 6);
      expect(column(r, 'H2O(mantle)', q) / mono).toBeCloseTo(4 + left, 6);
    });
  });

  it('keeps its surface while the mantle lasts, then shrinks as the mantle runs out', () => {
    // One monolayer of CO over two more: the mantle equals the surface at t = 1/k.
    const r = runModel({ network: desorbing, conditions: c, grain, initial: { 'CO(s)': mono, 'CO(mantle)': 2 * mono }, timesYr, solver: TIGHT });
    expect(r.status).toBe('ok');
    timesYr.forEach((t, q) => {
      const kt = k * t * YEAR_SECONDS;
      const tau = kt - 1;
      const surface = kt <= 1 ? 1 : (1 + tau) * Math.exp(-tau);
      const mantle = kt <= 1 ? 2 - kt : Math.exp(-tau);
      expect(column(r, 'CO(surface)', q) / mono, `k t = ${kt}`).toBeCloseTo(surface, 5);
      expect(column(r, 'CO(mantle)', q) / mono, `k t = ${kt}`).toBeCloseTo(mantle, 5);
    });
  });
});

describe('the default network with the mantle on', () => {
  it('runs to 1e7 yr conserving every element and the charge to 1e-12 (physics.md section 7)', () => {
    const network = loadNetwork(join(import.meta.dirname, '../../config/networks/dark-cloud.yaml'));
    const conditions = { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 };
    const timesYr = Float64Array.from([1e3, 1e4, 1e5, 1e6, 1e7]);
    const r = runModel({
      network,
      conditions,
      grain: { ...DEFAULT_GRAIN_OPTIONS, mantle: true },
      initial: loadInitialComposition('low-metal', '.', network),
      timesYr,
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
    expect(r.status, r.failure).toBe('ok');
    expect(r.conservation.maxRelativeDrift).toBeLessThan(1e-12);
    expect(Object.keys(r.conservation.perElement).sort()).toEqual(['C', 'Fe', 'H', 'He', 'Mg', 'N', 'Na', 'O', 'S', 'Si']);
    // Most of the water ice is buried by 1e6 yr: tens of monolayers of ice against one of surface.
    expect(column(r, 'H2O(mantle)', 3)).toBeGreaterThan(10 * column(r, 'H2O(surface)', 3));
  });
});

describe('the default network with every grain switch on', () => {
  it('runs to 1e7 yr conserving every element and the charge to 1e-12 relative (physics.md section 7; issue 17)', () => {
    const network = loadNetwork(join(import.meta.dirname, '../../config/networks/dark-cloud.yaml'));
    const conditions = { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 };
    // The recommended ice switches (mantle, three-body, Eley-Rideal, photodissociation-induced, ice photolysis) and the other two.
    const grain: GrainOptions = { ...RECOMMENDED_GRAIN, tunnelling: true, diffusionCompetition: true };
    // Every boolean switch of the grain section is on (a switch added later must be added here too).
    for (const [name, value] of Object.entries(DEFAULT_GRAIN_OPTIONS)) if (typeof value === 'boolean') expect(grain[name as keyof GrainOptions], name).toBe(true);
    const r = runModel({
      network,
      conditions,
      grain,
      initial: loadInitialComposition('low-metal', '.', network),
      timesYr: Float64Array.from([1e3, 1e5, 1e7]),
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
    expect(r.status, r.failure).toBe('ok');
    expect(r.timesYr.at(-1)).toBe(1e7);
    expect(r.conservation.maxRelativeDrift).toBeLessThan(1e-12);
    expect(Object.keys(r.conservation.perElement).sort()).toEqual(['C', 'Fe', 'H', 'He', 'Mg', 'N', 'Na', 'O', 'S', 'Si']);
  });
});
