/**
 * Grain physics against the check values of physics.md sections 2 and 3
 * (facts of the trade: common practice) and HHL92's formulas.
 */
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { accretionRate, thermalSpeed } from '../../src/chem/grain-accretion.ts';
import { crDesorptionRate, photodesorptionFlux, photodesorptionRate, thermalDesorptionRate, vibrationFrequency } from '../../src/chem/grain-desorption.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';
import {
  competingProbability,
  diffusionRate,
  hoppingRate,
  reactionProbability,
  reducedMass,
  surfaceReactionCoefficient,
  tunnellingProbability,
} from '../../src/chem/grain-surface.ts';
import { ATOMIC_WEIGHTS } from '../../src/chem/elements.ts';

const defaults = grainProperties(defaultConditions());
const CO_MASS = ATOMIC_WEIGHTS.C + ATOMIC_WEIGHTS.O;

describe('grain properties (physics.md section 2, derived from common-practice defaults)', () => {
  it('has about 1.9e-12 grains per H nucleus for a = 0.1 um, rho = 3 g cm^-3, dust-to-gas 0.01', () => {
    expect(defaults.abundance).toBeGreaterThan(1.8e-12);
    expect(defaults.abundance).toBeLessThan(2.0e-12);
  });
  it('has about 1.9e6 sites per grain with N_s = 1.5e15 cm^-2 (HHL92)', () => {
    expect(defaults.sitesPerGrain).toBeCloseTo(4 * Math.PI * 1e-10 * 1.5e15, -2);
    expect(defaults.sitesPerGrain).toBeGreaterThan(1.8e6);
    expect(defaults.sitesPerGrain).toBeLessThan(2.0e6);
  });
  it('scales the grain number as a^-3', () => {
    const big = grainProperties({ ...defaultConditions(), grain_radius: 0.2 });
    expect(big.abundance / defaults.abundance).toBeCloseTo(1 / 8, 10);
  });
});

describe('desorption (physics.md section 3 check values: common practice)', () => {
  it('gives a residence time of 2.35e5 s at 10 K for E_D = 400 K and nu_0 = 1e12 s^-1', () => {
    const tres = 1 / thermalDesorptionRate(1e12, 400, 10);
    expect(tres).toBeCloseTo(Math.exp(40) / 1e12, -1);
    expect(tres / 2.35e5).toBeGreaterThan(0.99);
    expect(tres / 2.35e5).toBeLessThan(1.01);
  });
  it('gives a residence time of 2.2e-8 s at 40 K for E_D = 400 K', () => {
    const tres = 1 / thermalDesorptionRate(1e12, 400, 40);
    expect(tres / 2.2e-8).toBeGreaterThan(0.99);
    expect(tres / 2.2e-8).toBeLessThan(1.01);
  });
  it('gives nu_0 of order 1e12 s^-1 for a physisorbed H atom (HHL92 formula; E_D = 450 K is memory)', () => {
    const nu0 = vibrationFrequency(1.5e15, 450, ATOMIC_WEIGHTS.H);
    expect(nu0).toBeGreaterThan(1e12);
    expect(nu0).toBeLessThan(1e13);
  });
  it('scales nu_0 as sqrt(E_D / m)', () => {
    const a = vibrationFrequency(1.5e15, 1150, CO_MASS);
    const b = vibrationFrequency(1.5e15, 4 * 1150, 4 * CO_MASS);
    expect(b / a).toBeCloseTo(1, 12);
  });
  it('cosmic-ray desorption is f k_evap(70 K) zeta/zeta_0 with f = 3.16e-19 (Hasegawa & Herbst 1993)', () => {
    const nu0 = 1e12;
    expect(crDesorptionRate(nu0, 1150, 1.3e-17) / (3.16e-19 * nu0 * Math.exp(-1150 / 70))).toBeCloseTo(1, 12);
    expect(crDesorptionRate(nu0, 1150, 2.6e-17) / crDesorptionRate(nu0, 1150, 1.3e-17)).toBeCloseTo(2, 12);
  });
  it('photon flux is G0 1e8 exp(-2 A_V) plus 1e4 zeta/zeta_0 (physics.md section 3)', () => {
    expect(photodesorptionFlux(1, 0, 1.3e-17)).toBeCloseTo(1e8 + 1e4, 0);
    expect(photodesorptionFlux(1, 10, 1.3e-17)).toBeCloseTo(1e8 * Math.exp(-20) + 1e4, 6);
    // Below a monolayer each ice particle leaves at Y F pi a^2 / N_sites = Y F / (4 N_s).
    expect(photodesorptionRate(1e-3, 1e8, defaults.crossSection, defaults.sitesPerGrain) / ((1e-3 * 1e8) / (4 * 1.5e15))).toBeCloseTo(1, 12);
  });
});

describe('accretion (physics.md section 3)', () => {
  it('has a grain collision rate per H nucleus within a factor 3 of 3e-17 cm^3 s^-1 at 100 K (Jura 1975), 8.5e-17 derived', () => {
    const perH = defaults.crossSection * thermalSpeed(100, ATOMIC_WEIGHTS.H) * defaults.abundance;
    expect(perH / 8.5e-17).toBeGreaterThan(0.98);
    expect(perH / 8.5e-17).toBeLessThan(1.02);
    expect(perH / 3e-17).toBeLessThan(3);
    expect(perH / 3e-17).toBeGreaterThan(1 / 3);
  });
  it('freezes CO out at 10 K in about 5e9/n_H yr (common practice, factor 2; 6e9/n_H derived)', () => {
    const nH = 1e4;
    const k = accretionRate(1, defaults.crossSection, 10, CO_MASS, defaults.abundance * nH);
    const tYr = 1 / k / YEAR_SECONDS;
    expect(tYr * nH).toBeGreaterThan(2.5e9);
    expect(tYr * nH).toBeLessThan(1e10);
    expect(tYr * nH / 6e9).toBeGreaterThan(0.95);
    expect(tYr * nH / 6e9).toBeLessThan(1.05);
  });
});

describe('surface diffusion and reaction (HHL92)', () => {
  it('sweeps a grain in about 1e-3 s with one hop per 1e-9 s and about 1e6 sites (common practice)', () => {
    const sweep = 1 / diffusionRate(1e9, defaults.sitesPerGrain);
    expect(sweep).toBeGreaterThan(1e-3 / 3);
    expect(sweep).toBeLessThan(3e-3);
  });
  it('hops thermally at nu_0 exp(-chi E_D / T) and tunnels faster for H only when asked', () => {
    const nu0 = 3e12;
    const thermal = hoppingRate(nu0, 225, 10);
    expect(thermal).toBeCloseTo(nu0 * Math.exp(-22.5), 5);
    const tunnel = hoppingRate(nu0, 225, 10, ATOMIC_WEIGHTS.H);
    expect(tunnel).toBeGreaterThan(thermal * 1e3);
    expect(tunnel).toBeCloseTo(nu0 * tunnellingProbability(225, ATOMIC_WEIGHTS.H), 0);
  });
  it('is barrierless with kappa = 1 and takes the larger of thermal and tunnelling probability with a barrier', () => {
    expect(reactionProbability(0, 10, 0.5)).toBe(1);
    const mu = reducedMass(ATOMIC_WEIGHTS.H, CO_MASS);
    const kappa = reactionProbability(2500, 10, mu);
    expect(kappa).toBe(Math.max(Math.exp(-250), tunnellingProbability(2500, mu)));
    expect(kappa).toBe(tunnellingProbability(2500, mu));
    // At high dust temperature and a low barrier, thermal crossing wins.
    expect(reactionProbability(100, 100, 14)).toBeCloseTo(Math.exp(-1), 12);
  });
  it('counts pairs of identical reactants once', () => {
    const d = 5;
    expect(surfaceReactionCoefficient(1, d, d, true, 2)).toBe(2.5);
    expect(surfaceReactionCoefficient(1, d, d, false, 2)).toBe(5);
  });
  it('reaction-diffusion competition tends to kappa when reaction is fast and to nu kappa / hops when slow', () => {
    expect(competingProbability(1, 1e12, 1e3, 1e3)).toBeCloseTo(1, 8);
    const slow = competingProbability(1e-12, 1e12, 1e3, 1e3);
    expect(slow).toBeCloseTo(1 / 2001, 8);
  });
  it('gives no reaction, not NaN, for a pair that neither crosses nor hops (kappa and both hops underflowed on cold dust)', () => {
    const kappa = reactionProbability(3e5, 3, 14);
    const hop = hoppingRate(1e12, 0.5 * 7000, 3);
    expect(kappa).toBe(0);
    expect(hop).toBe(0);
    expect(competingProbability(kappa, 1e12, hop, hop)).toBe(0);
  });
});
