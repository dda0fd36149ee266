/**
 * The default network under dark-cloud conditions: conservation over 1e7 yr
 * and the sanity envelope of physics.md section 4 (common practice / memory)
 * at n_H = 2e4 cm^-3, 10 K, A_V = 10, from the low-metal composition.
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import type { ModelResult } from '../../src/model/types.ts';

const NETWORK = join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml');
/** "Near" a quoted value: within a factor of 3, the spread of rate-coefficient uncertainties (common practice). */
const NEAR_FACTOR = 3;
/** "Present" in the ice: above 1e-8 per H nucleus, about 1e-4 of the water ice (our choice for the test). */
const PRESENT = 1e-8;

/** The default network at n_H = 2e4 cm^-3, 10 K, A_V = 10 from the low-metal start, 13 output times to 1e7 yr. */
function darkCloudModel(grain: GrainOptions): ModelResult {
  const network = loadNetwork(NETWORK);
  const conditions = { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 };
  return runModel({
    network,
    conditions,
    grain,
    initial: loadInitialComposition('low-metal', '.', network),
    timesYr: outputTimesYr(1e3, 1e7, 13),
    solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
  });
}

describe('default network, dark-cloud conditions', () => {
  let result: ModelResult;
  const at = (species: string, tYr: number): number => {
    const k = result.timesYr.findIndex((t) => Math.abs(t / tYr - 1) < 1e-9);
    const i = result.species.indexOf(species);
    if (k < 0 || i < 0) throw new Error(`no ${species} at ${tYr} yr`);
    return result.abundances[k * result.species.length + i];
  };
  beforeAll(() => {
    result = darkCloudModel(DEFAULT_GRAIN_OPTIONS);
  });

  it('runs to 1e7 yr', () => {
    expect(result.status).toBe('ok');
  });
  it('conserves every element and the charge to 1e-6 relative at every output (physics.md section 7)', () => {
    expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-6);
    expect(Object.keys(result.conservation.perElement)).toEqual(expect.arrayContaining(['H', 'He', 'C', 'N', 'O', 'S']));
  });
  it('keeps the electron fraction between 1e-9 and 1e-6 once carbon has recombined (from 1e5 yr; common practice)', () => {
    for (const t of [1e5, 1e6, 1e7]) {
      expect(at('e-', t)).toBeGreaterThan(1e-9);
      expect(at('e-', t)).toBeLessThan(1e-6);
    }
  });
  // The trade quotes gas CO "about 1e-4" relative to H2 (common practice): per H nucleus
  // it cannot reach 1e-4 when all carbon is 7.3e-5 (the low-metal set, memory).
  it('has gas CO near 1e-4 of H2 at 1e5 yr and holding most of the carbon not yet frozen (common practice)', () => {
    const coPerH2 = at('CO', 1e5) / at('H2', 1e5);
    expect(coPerH2).toBeGreaterThan(1e-4 / NEAR_FACTOR);
    expect(coPerH2).toBeLessThan(1e-4 * NEAR_FACTOR);
    expect(at('CO', 1e5) + at('CO(s)', 1e5)).toBeGreaterThan(0.5 * 7.3e-5);
  });
  it('has water ice above 1e-5 by 1e6 yr (common practice)', () => {
    expect(at('H2O(s)', 1e6)).toBeGreaterThan(1e-5);
  });
  it('has CO ice and CO2 ice by 1e6 yr (memory: observed toward background stars, Boogert, Gerakines & Whittet 2015)', () => {
    expect(at('CO(s)', 1e6)).toBeGreaterThan(PRESENT);
    expect(at('CO2(s)', 1e6)).toBeGreaterThan(PRESENT);
  });
});

/**
 * Tunnelling of H and H2 through the diffusion barrier (HHL92) makes H(s)
 * sweep the grain about 1e7 times faster: each H(s) + X(s) coefficient
 * k n_H reaches 2e15 s^-1, and H(s) sits in a quasi-steady state set by all
 * its partners at once, so the Jacobian changes strongly from one state to
 * the next. The model stopped at 1,382 yr with "repeated Newton failure"
 * (issue 17) while CVODE integrated the same emitted system to 1e7 yr.
 */
describe('default network with tunnelling on, dark-cloud conditions', () => {
  let result: ModelResult;
  beforeAll(() => {
    result = darkCloudModel({ ...DEFAULT_GRAIN_OPTIONS, tunnelling: true });
  });

  it('runs to 1e7 yr', () => {
    expect(result.failure).toBeUndefined();
    expect(result.status).toBe('ok');
  });
  it('conserves every element and the charge to 1e-12 relative at every output (issue 17; physics.md section 7)', () => {
    expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-12);
  });
});

/**
 * H2 formation on warmer dust (issue 17): at 20 K dust the physisorbed
 * H(s) + H(s) route lets H evaporate before it meets a partner, and X(H) at
 * 1e7 yr rose from 4.4e-5 (10 K) to 7e-3 with no warning. With the rate of
 * Hollenbach & McKee 1979 (grain.h2_formation: hollenbach-mckee) the gas stays
 * molecular, and the surface route says it has left its range.
 */
describe('H2 formation at 20 K dust, default network', () => {
  const network = loadNetwork(NETWORK);
  const run = (dust: number, h2Formation: 'surface' | 'hollenbach-mckee'): ModelResult =>
    runModel({
      network,
      conditions: { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: dust, visual_extinction: 10 },
      grain: { ...DEFAULT_GRAIN_OPTIONS, h2Formation },
      initial: loadInitialComposition('low-metal', '.', network),
      timesYr: outputTimesYr(1e3, 1e7, 5),
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
  const last = (r: ModelResult, species: string): number => r.abundances[(r.timesYr.length - 1) * r.species.length + r.species.indexOf(species)];
  let cold: ModelResult;
  let warmSurface: ModelResult;
  let warmHM: ModelResult;
  beforeAll(() => {
    cold = run(10, 'surface');
    warmSurface = run(20, 'surface');
    warmHM = run(20, 'hollenbach-mckee');
  });

  it('keeps X(H) at 1e7 yr within a factor of 3 of the 10 K surface-route value (the order of the cold case, issue 17)', () => {
    expect(warmHM.status).toBe('ok');
    expect(last(warmHM, 'H') / last(cold, 'H')).toBeGreaterThan(1 / NEAR_FACTOR);
    expect(last(warmHM, 'H') / last(cold, 'H')).toBeLessThan(NEAR_FACTOR);
    expect(last(warmHM, 'H2')).toBeGreaterThan(0.499);
    expect(warmHM.conservation.maxRelativeDrift).toBeLessThan(1e-12);
  });
  it('warns when the physisorbed route runs on 20 K dust, and not on 10 K dust or with the warm-dust treatment', () => {
    expect(last(warmSurface, 'H') / last(cold, 'H')).toBeGreaterThan(30);
    expect(warmSurface.clampNotes).toEqual(expect.arrayContaining([expect.stringMatching(/physisorbed H\(s\) \+ H\(s\).*at 20 K dust \d+% of the H atoms striking grains evaporate/)]));
    expect(cold.clampNotes.join(' ')).not.toMatch(/physisorbed/);
    expect(warmHM.clampNotes.join(' ')).not.toMatch(/physisorbed|Hollenbach/);
  });
});
