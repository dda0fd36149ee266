/** Rate coefficients of each law (physics.md sections 1 and 3; formulas are the published forms). */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { UserError } from '../../src/config/errors.ts';
import { accretionRate } from '../../src/chem/grain-accretion.ts';
import { thermalDesorptionRate, vibrationFrequency } from '../../src/chem/grain-desorption.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';
import { diffusionRate, hoppingRate, tunnellingProbability } from '../../src/chem/grain-surface.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { makeNetwork } from '../model/fixtures.ts';

const c = defaultConditions();
const props = grainProperties(c);
const nGr = props.abundance * c.density;

const ratio = (a: number, b: number) => a / b;

describe('gas-phase laws', () => {
  const net = makeNetwork([
    { reactants: ['H3+', 'CO'], products: ['HCO+', 'H2'], law: 'arrhenius', params: { alpha: 1.6e-9, beta: -0.5, gamma: 20 }, tmin: 5, tmax: 300 },
    { reactants: ['HCO+', 'e-'], products: ['CO', 'H'], law: 'arrhenius', params: { alpha: 2.4e-7, beta: -0.69 }, tmin: 20, tmax: 300 },
    { reactants: ['H2'], products: ['H2+', 'e-'], law: 'cosmic-ray', params: { alpha: 0.97 } },
    { reactants: ['CO'], products: ['C', 'O'], law: 'cosmic-ray-uv', params: { alpha: 5 } },
    { reactants: ['CO'], products: ['C', 'O'], law: 'interstellar-uv', params: { alpha: 2e-10, gamma: 2.5 } },
  ]);
  const cond = { ...c, gas_temperature: 10, cr_ionisation_rate: 2.6e-17, uv_field: 3, visual_extinction: 2 };
  const set = computeRates(net, cond, DEFAULT_GRAIN_OPTIONS);
  it('evaluates the modified Arrhenius form', () => {
    expect(ratio(set.rates[0].k, 1.6e-9 * (10 / 300) ** -0.5 * Math.exp(-2))).toBeCloseTo(1, 12);
  });
  it('clamps the temperature to the valid range and notes it once (common practice)', () => {
    expect(ratio(set.rates[1].k, 2.4e-7 * (20 / 300) ** -0.69)).toBeCloseTo(1, 12);
    expect(set.clampNotes).toHaveLength(1);
    expect(set.clampNotes[0]).toMatch(/reaction 2 .*HCO\+ \+ e-.*10 K.*20-300 K.*20 K/);
  });
  it('scales cosmic-ray and cosmic-ray induced UV rates with zeta / 1.3e-17', () => {
    expect(set.rates[2].k).toBeCloseTo(1.94, 12);
    expect(set.rates[3].k).toBeCloseTo(10, 12);
  });
  it('attenuates the external UV as G0 exp(-gamma A_V)', () => {
    expect(ratio(set.rates[4].k, 2e-10 * 3 * Math.exp(-5))).toBeCloseTo(1, 12);
  });
});

describe('gas-grain laws', () => {
  // Binding energies E_D/k_B, K: physics.md section 4 (memory).
  const data = { CO: { bindingEnergy: 1150 }, H: { bindingEnergy: 450 }, O: { bindingEnergy: 800 }, He: { bindingEnergy: 100 }, OH: { bindingEnergy: 2850 } };
  const reactions = [
    { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' as const },
    { reactants: ['He'], products: ['He(s)'], law: 'accretion' as const },
    { reactants: ['CO(s)'], products: ['CO'], law: 'thermal-desorption' as const },
    { reactants: ['CO(s)'], products: ['CO'], law: 'cr-desorption' as const },
    { reactants: ['CO(s)'], products: ['CO'], law: 'photodesorption' as const },
    { reactants: ['H(s)', 'O(s)'], products: ['OH(s)'], law: 'surface' as const },
    { reactants: ['H(s)', 'O(s)'], products: ['OH'], law: 'reactive-desorption' as const },
    { reactants: ['H(s)', 'H(s)'], products: ['H2'], law: 'surface' as const },
    { reactants: ['H', 'H'], products: ['H2'], law: 'parametric-h2' as const },
  ];
  const net = makeNetwork(reactions, data);
  const surface = computeRates(net, c, DEFAULT_GRAIN_OPTIONS);
  const byIndex = (set: ReturnType<typeof computeRates>, i: number) => set.rates.find((r) => r.reaction.index === i);

  it('accretes heavy neutrals at S pi a^2 v n_gr and leaves helium out (physics.md section 3)', () => {
    expect(ratio(byIndex(surface, 0)!.k, accretionRate(1, props.crossSection, 10, 28.01, nGr))).toBeCloseTo(1, 12);
    expect(byIndex(surface, 1)).toBeUndefined();
    expect(surface.skipped.find((s) => s.reaction.index === 1)?.reason).toMatch(/He does not stay/);
  });
  it('desorbs thermally at nu_0 exp(-E_D/T_dust) with nu_0 from HHL92', () => {
    const nu0 = vibrationFrequency(c.site_density, 1150, 28.01);
    expect(ratio(byIndex(surface, 2)!.k, thermalDesorptionRate(nu0, 1150, 10))).toBeCloseTo(1, 12);
  });
  it('desorbs by cosmic rays at f k_evap(70 K) zeta/zeta_0, f = 3.16e-19 (Hasegawa & Herbst 1993), from the dust temperature alone', () => {
    const nu0 = vibrationFrequency(c.site_density, 1150, 28.01);
    const expected = 3.16e-19 * nu0 * Math.exp(-1150 / 70) * 3;
    const set = computeRates(net, { ...c, cr_ionisation_rate: 3.9e-17, dust_temperature: 12 }, DEFAULT_GRAIN_OPTIONS);
    expect(ratio(byIndex(set, 3)!.k, expected)).toBeCloseTo(1, 10);
  });
  it('accretes at the reaction\'s sticking probability S', () => {
    const half = makeNetwork([{ reactants: ['CO'], products: ['CO(s)'], law: 'accretion', params: { sticking: 0.5 } }], data);
    expect(ratio(computeRates(half, c, DEFAULT_GRAIN_OPTIONS).rates[0].k, accretionRate(0.5, props.crossSection, 10, 28.01, nGr))).toBeCloseTo(1, 12);
  });
  it('marks photodesorption as the monolayer form with k = Y F / (4 N_s)', () => {
    const r = byIndex(surface, 4)!;
    expect(r.form).toBe('monolayer-photodesorption');
    const flux = 1e8 * Math.exp(-20) + 1e4;
    expect(ratio(r.k, (1e-3 * flux) / (4 * c.site_density))).toBeCloseTo(1, 10);
  });
  it('scales every photodesorption yield with the condition photodesorption_yield (default 1e-3, memory: Oberg et al. 2009 order)', () => {
    const doubled = computeRates(net, { ...c, photodesorption_yield: 2e-3 }, DEFAULT_GRAIN_OPTIONS);
    expect(byIndex(doubled, 4)!.k / byIndex(surface, 4)!.k).toBeCloseTo(2, 12);
  });
  it('splits a surface channel with a reactive-desorption partner into 1 - f and f', () => {
    const hopH = hoppingRate(vibrationFrequency(c.site_density, 450, 1.008), 0.5 * 450, 10);
    const hopO = hoppingRate(vibrationFrequency(c.site_density, 800, 15.999), 0.5 * 800, 10);
    const full = (diffusionRate(hopH, props.sitesPerGrain) + diffusionRate(hopO, props.sitesPerGrain)) / nGr;
    expect(ratio(byIndex(surface, 5)!.k, (1 - c.reactive_desorption) * full)).toBeCloseTo(1, 10);
    expect(ratio(byIndex(surface, 6)!.k, c.reactive_desorption * full)).toBeCloseTo(1, 10);
  });
  it('counts H + H once per pair (HHL92)', () => {
    const hopH = hoppingRate(vibrationFrequency(c.site_density, 450, 1.008), 0.5 * 450, 10);
    expect(ratio(byIndex(surface, 7)!.k, diffusionRate(hopH, props.sitesPerGrain) / nGr)).toBeCloseTo(1, 10);
  });
  it('uses the surface H2 route or the parametric one, never both', () => {
    expect(byIndex(surface, 8)).toBeUndefined();
    const parametric: GrainOptions = { ...DEFAULT_GRAIN_OPTIONS, h2Formation: 'parametric' };
    const set = computeRates(net, c, parametric);
    expect(byIndex(set, 7)).toBeUndefined();
    expect(byIndex(set, 8)).toMatchObject({ form: 'parametric-h2', k: 3e-17 });
  });
  it('tunnels H faster with tunnelling on', () => {
    const on = computeRates(net, c, { ...DEFAULT_GRAIN_OPTIONS, tunnelling: true });
    expect(byIndex(on, 7)!.k / byIndex(surface, 7)!.k).toBeGreaterThan(10);
  });
  it('lets reaction compete with diffusion away when asked (Chang, Cuppen & Herbst 2007)', () => {
    const barrier = makeNetwork([{ reactants: ['H(s)', 'CO(s)'], products: ['HCO(s)'], law: 'surface', params: { activation_energy: 2500 } }], data);
    const plain = computeRates(barrier, c, DEFAULT_GRAIN_OPTIONS).rates[0].k;
    const competing = computeRates(barrier, c, { ...DEFAULT_GRAIN_OPTIONS, diffusionCompetition: true }).rates[0].k;
    const nuH = vibrationFrequency(c.site_density, 450, 1.008);
    const nuCO = vibrationFrequency(c.site_density, 1150, 28.01);
    const hopH = hoppingRate(nuH, 225, 10);
    const hopCO = hoppingRate(nuCO, 575, 10);
    const kappa = tunnellingProbability(2500, (1.008 * 28.01) / (1.008 + 28.01));
    const nu = Math.max(nuH, nuCO);
    expect(plain / ((kappa * (diffusionRate(hopH, props.sitesPerGrain) + diffusionRate(hopCO, props.sitesPerGrain))) / nGr)).toBeCloseTo(1, 10);
    expect(competing / plain / ((nu * kappa) / (nu * kappa + hopH + hopCO) / kappa)).toBeCloseTo(1, 10);
    expect(competing).toBeGreaterThan(plain);
    // Identical reactants: both of the pair may hop away.
    const pair = makeNetwork([{ reactants: ['O(s)', 'O(s)'], products: ['O2(s)'], law: 'surface', params: { activation_energy: 500 } }], data);
    const withPair = computeRates(pair, c, { ...DEFAULT_GRAIN_OPTIONS, diffusionCompetition: true }).rates[0].k;
    const nuO = vibrationFrequency(c.site_density, 800, 15.999);
    const hopO = hoppingRate(nuO, 400, 10);
    const kO = Math.max(Math.exp(-50), tunnellingProbability(500, 15.999 / 2));
    expect(withPair / ((((nuO * kO) / (nuO * kO + 2 * hopO)) * diffusionRate(hopO, props.sitesPerGrain)) / nGr)).toBeCloseTo(1, 10);
  });
  it('needs a binding energy for every desorbing or diffusing species', () => {
    const bad = makeNetwork([{ reactants: ['N(s)'], products: ['N'], law: 'thermal-desorption' }]);
    expect(() => computeRates(bad, c, DEFAULT_GRAIN_OPTIONS)).toThrow(UserError);
    expect(() => computeRates(bad, c, DEFAULT_GRAIN_OPTIONS)).toThrow(/binding energy of N.*fixture\.yaml/);
  });
});
