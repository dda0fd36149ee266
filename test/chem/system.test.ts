/** The compiled system: folding with n_H, rhs, analytic Jacobian against finite differences (common practice), pattern, emission. */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { compile } from '../../src/chem/system.ts';
import { join } from 'node:path';
import { loadNetwork } from '../../src/chem/network.ts';
import { makeNetwork } from '../model/fixtures.ts';
import { evaporatedHydrogenShare, h2FormationCoefficientHM79, hydrogenGrainTerms } from '../../src/chem/grain-h2.ts';
import { fdCheck, randomState } from '../support/jacobian.ts';

const c = defaultConditions();
// Binding energies E_D/k_B, K: physics.md section 4 (memory).
const data = { CO: { bindingEnergy: 1150 }, H: { bindingEnergy: 450 }, O: { bindingEnergy: 800 }, OH: { bindingEnergy: 2850 }, H2O: { bindingEnergy: 5700 }, H2: { bindingEnergy: 430 } };
const net = makeNetwork(
  [
    { reactants: ['H3+', 'CO'], products: ['HCO+', 'H2'], law: 'arrhenius', params: { alpha: 1.6e-9 } },
    { reactants: ['HCO+', 'e-'], products: ['CO', 'H'], law: 'arrhenius', params: { alpha: 2.4e-7, beta: -0.69 } },
    { reactants: ['H2'], products: ['H2+', 'e-'], law: 'cosmic-ray', params: { alpha: 1 } },
    { reactants: ['H2+', 'H2'], products: ['H3+', 'H'], law: 'arrhenius', params: { alpha: 2e-9 } },
    { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' },
    { reactants: ['O'], products: ['O(s)'], law: 'accretion' },
    { reactants: ['H'], products: ['H(s)'], law: 'accretion' },
    { reactants: ['CO(s)'], products: ['CO'], law: 'photodesorption' },
    { reactants: ['H2O(s)'], products: ['H2O'], law: 'photodesorption' },
    { reactants: ['H(s)'], products: ['H'], law: 'thermal-desorption' },
    { reactants: ['H(s)', 'O(s)'], products: ['OH(s)'], law: 'surface' },
    { reactants: ['H(s)', 'OH(s)'], products: ['H2O(s)'], law: 'surface' },
    { reactants: ['H(s)', 'H(s)'], products: ['H2'], law: 'surface' },
    { reactants: ['H', 'H'], products: ['H2'], law: 'parametric-h2' },
  ],
  data,
);

describe('compile', () => {
  const sys = compile(net, c, DEFAULT_GRAIN_OPTIONS);
  it('folds two-body coefficients with n_H and keeps one-body ones', () => {
    const rates = sys.rateSet.rates;
    const t0 = Array.from(sys.terms.reaction).indexOf(0);
    expect(sys.terms.k[t0] / (rates[0].k * c.density)).toBeCloseTo(1, 12);
    const t4 = Array.from(sys.terms.reaction).indexOf(4);
    expect(sys.terms.k[t4]).toBe(rates.find((r) => r.reaction.index === 4)!.k);
  });
  it('has sorted CSR columns with every diagonal entry', () => {
    const { rowPtr, colIdx } = sys.pattern;
    for (let i = 0; i < sys.n; i++) {
      const cols = Array.from(colIdx.subarray(rowPtr[i], rowPtr[i + 1]));
      expect(cols).toContain(i);
      expect(cols).toEqual([...cols].sort((a, b) => a - b));
      expect(new Set(cols).size).toBe(cols.length);
    }
  });
  it('has an analytic Jacobian equal to central differences of the rhs, below and above a monolayer', () => {
    const mono = sys.rateSet.grain.monolayerAbundance;
    expect(fdCheck(sys, randomState(sys, 1e-3 * mono, 7))).toBeLessThan(1e-5);
    expect(fdCheck(sys, randomState(sys, 10 * mono, 11))).toBeLessThan(1e-5);
  });
  it('conserves every element and the charge in the rhs', () => {
    const y = randomState(sys, 1e-6, 3);
    const f = new Float64Array(sys.n);
    sys.rhs(0, y, f);
    for (const el of ['H', 'C', 'O']) {
      let total = 0;
      let scale = 0;
      net.species.forEach((s, i) => {
        total += (s.elements[el] ?? 0) * f[i];
        scale += Math.abs((s.elements[el] ?? 0) * f[i]);
      });
      expect(Math.abs(total)).toBeLessThan(1e-12 * scale);
    }
    let q = 0;
    net.species.forEach((s, i) => (q += s.charge * f[i]));
    expect(Math.abs(q)).toBeLessThan(1e-20);
  });
  it('uses two H atoms per H(s) + H(s) event', () => {
    const y = new Float64Array(sys.n);
    const iH = net.speciesIndex.get('H(s)')!;
    y[iH] = 1e-8;
    const f = new Float64Array(sys.n);
    sys.rhs(0, y, f);
    const t = Array.from(sys.terms.reaction).indexOf(12);
    const event = sys.terms.k[t] * 1e-8 * 1e-8;
    expect(f[net.speciesIndex.get('H2')!] / event).toBeCloseTo(1, 12);
    const desorb = sys.rateSet.rates.find((r) => r.reaction.index === 9)!.k * 1e-8;
    expect((f[iH] + desorb) / (-2 * event)).toBeCloseTo(1, 10);
  });
  it('photodesorbs first order below a monolayer and at a fixed rate per grain above it (physics.md section 3)', () => {
    const mono = sys.rateSet.grain.monolayerAbundance;
    const k1 = sys.rateSet.rates.find((r) => r.reaction.index === 7)!.k;
    const iCO = net.speciesIndex.get('CO(s)')!;
    const iW = net.speciesIndex.get('H2O(s)')!;
    const photoOnly = compile(makeNetwork([net.reactions[7], net.reactions[8]].map((r) => ({ reactants: r.reactants, products: r.products, law: r.law })), data), c, DEFAULT_GRAIN_OPTIONS);
    const f = new Float64Array(photoOnly.n);
    const y = new Float64Array(photoOnly.n);
    const jCO = photoOnly.species.indexOf('CO(s)');
    const jW = photoOnly.species.indexOf('H2O(s)');
    y[jCO] = 0.1 * mono;
    photoOnly.rhs(0, y, f);
    expect(-f[jCO] / (k1 * 0.1 * mono)).toBeCloseTo(1, 12);
    y[jCO] = 30 * mono;
    y[jW] = 70 * mono;
    photoOnly.rhs(0, y, f);
    expect(-(f[jCO] + f[jW]) / (k1 * mono)).toBeCloseTo(1, 12);
    expect(f[jCO] / f[jW]).toBeCloseTo(30 / 70, 12);
    expect(fdCheck(photoOnly, y)).toBeLessThan(1e-5);
    expect(iCO).not.toBe(iW);
  });
  it('names the non-mass-action terms, each with why, and leaves them out on request', () => {
    expect(sys.omitted).toHaveLength(2);
    expect(sys.omitted[0]).toMatch(/monolayer-photodesorption .*CO\(s\) -> CO\): above one monolayer the rate per grain saturates/);
    const para = compile(net, c, { ...DEFAULT_GRAIN_OPTIONS, h2Formation: 'hollenbach-mckee' });
    expect(para.omitted).toEqual(expect.arrayContaining([expect.stringMatching(/^parametric-h2 \(reaction 14: H \+ H -> H2\): .*first order in H while each event uses two H atoms/)]));
    expect(sys.nonMassAction).toHaveLength(1);
    expect(sys.nonMassAction[0].name).toMatch(/monolayer treatment \(2 reactions\)/);
    const only = compile(net, c, DEFAULT_GRAIN_OPTIONS, { massActionOnly: true });
    expect(only.nonMassAction).toHaveLength(0);
    expect(only.omitted).toEqual(sys.omitted);
  });
  it('emits every mass-action term with its reactants, products and effective k', () => {
    const json = sys.emitSystem(new Float64Array(sys.n), Float64Array.of(1, 2));
    expect(json.species).toEqual(net.species.map((s) => s.name));
    expect(json.terms).toHaveLength(sys.terms.k.length);
    const hh = json.terms[Array.from(sys.terms.reaction).indexOf(12)];
    const iH = net.speciesIndex.get('H(s)')!;
    expect(hh.reactants).toEqual([iH, iH]);
    expect(hh.products).toEqual([net.speciesIndex.get('H2')]);
    expect(json.times_s).toEqual([1, 2]);
    expect(JSON.parse(JSON.stringify(json))).toEqual(json);
  });
  it('uses the parametric H2 rate R_f n_H x_H with two H atoms per molecule (Jura 1975)', () => {
    const para = compile(net, c, { ...DEFAULT_GRAIN_OPTIONS, h2Formation: 'parametric' }, {});
    expect(Array.from(para.terms.reaction)).not.toContain(12);
    const photo = new Float64Array(para.n);
    const y = new Float64Array(para.n);
    y[net.speciesIndex.get('H')!] = 1e-4;
    para.rhs(0, y, photo);
    const accretion = para.rateSet.rates.find((r) => r.reaction.index === 6)!.k * 1e-4;
    const formation = 3e-17 * c.density * 1e-4;
    expect(photo[net.speciesIndex.get('H2')!] / formation).toBeCloseTo(1, 12);
    expect((photo[net.speciesIndex.get('H')!] + accretion) / (-2 * formation)).toBeCloseTo(1, 10);
    expect(fdCheck(para, randomState(para, 1e-6, 5))).toBeLessThan(1e-5);
  });
  it('takes R_f of Hollenbach & McKee 1979 for the model grain with grain.h2_formation: hollenbach-mckee, and leaves out H(s) + H(s)', () => {
    const warm = { ...c, gas_temperature: 20, dust_temperature: 20 };
    const hm = compile(net, warm, { ...DEFAULT_GRAIN_OPTIONS, h2Formation: 'hollenbach-mckee' }, {});
    expect(Array.from(hm.terms.reaction)).not.toContain(12);
    const rate = hm.rateSet.rates.find((r) => r.reaction.index === 13)!;
    expect(rate.form).toBe('parametric-h2');
    const g = hm.rateSet.grain;
    expect(rate.k / h2FormationCoefficientHM79(20, 20, g.crossSection * g.abundance, 1.008)).toBeCloseTo(1, 3);
    expect(fdCheck(hm, randomState(hm, 1e-6, 7))).toBeLessThan(1e-5);
    expect(hm.clampNotes.join(' ')).not.toMatch(/Hollenbach/);
  });
  it('counts the share of H atoms striking grains that evaporate again: k_evap x_H(s) / (k_acc x_H)', () => {
    const found = hydrogenGrainTerms(net, sys.terms);
    expect(found.accretion).toHaveLength(1);
    expect(found.evaporation).toHaveLength(1);
    const y = new Float64Array(sys.n);
    y[net.speciesIndex.get('H')!] = 1e-4;
    y[net.speciesIndex.get('H(s)')!] = 1e-15;
    const k = (index: number) => sys.rateSet.rates.find((r) => r.reaction.index === index)!.k;
    expect(evaporatedHydrogenShare(found, sys.terms, y)! / ((k(9) * 1e-15) / (k(6) * 1e-4))).toBeCloseTo(1, 12);
    expect(evaporatedHydrogenShare(found, sys.terms, new Float64Array(sys.n))).toBeUndefined();
  });
  it('notes a run whose dust is warmer than where the HM79 recombination fraction is one half (600 K / ln 1e4 = 65 K, memory)', () => {
    const hot = compile(net, { ...c, dust_temperature: 80 }, { ...DEFAULT_GRAIN_OPTIONS, h2Formation: 'hollenbach-mckee' }, {});
    expect(hot.clampNotes).toEqual([expect.stringMatching(/Hollenbach & McKee 1979 .*below one half above 65 K dust: at 80 K/)]);
  });
});

describe('compile the default network', () => {
  const network = loadNetwork(join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml'));
  const nonDiffusive = { ...DEFAULT_GRAIN_OPTIONS, threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true };
  for (const grain of [
    DEFAULT_GRAIN_OPTIONS,
    { ...DEFAULT_GRAIN_OPTIONS, tunnelling: true, diffusionCompetition: true, h2Formation: 'parametric' as const },
    { ...DEFAULT_GRAIN_OPTIONS, tunnelling: true, h2Formation: 'hollenbach-mckee' as const },
    // Ice photolysis and the non-diffusive reactions (docs/ice-nondiffusive.md): the coverage term's ice-total derivative included.
    nonDiffusive,
    // The three-phase ice with every other switch: the transfer's rank-one block is checked in test/chem/mantle.test.ts.
    { ...nonDiffusive, mantle: true },
  ]) {
    it(`has an exact Jacobian below and above a monolayer (${JSON.stringify(grain)})`, () => {
      const sys = compile(network, { ...c, dust_temperature: 15 }, grain);
      const mono = sys.rateSet.grain.monolayerAbundance;
      expect(fdCheck(sys, randomState(sys, 1e-3 * mono, 17))).toBeLessThan(1e-5);
      expect(fdCheck(sys, randomState(sys, mono, 19))).toBeLessThan(1e-5);
    });
  }
});
