/**
 * Ice photolysis and the non-diffusive surface reactions (docs/ice-nondiffusive.md).
 *
 * Worked cases: the full texts of Jin & Garrod 2020 (ApJS 249, 26) and
 * Garrod et al. 2022 (ApJS 259, 1) were not at hand, so no rate they quote is
 * reproduced here; instead each mechanism is checked against its rate written
 * out by hand (an analytic check): R = R_appear x theta_partner x f_act, with
 * f_act the reaction-diffusion competition of Garrod & Pauly 2011 computed
 * here from HHL92's nu_0, hopping and tunnelling formulas and CODATA
 * constants, not from the code under test.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { scratch } from '../support/scratch.ts';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { deriveReactions } from '../../src/chem/derive.ts';
import { deriveIcePhotolysis } from '../../src/chem/ice-photolysis.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { parseSpecies } from '../../src/chem/species.ts';
import { compile, type CompiledSystem } from '../../src/chem/system.ts';
import { makeNetwork } from '../model/fixtures.ts';

// CODATA 2018 (cgs), written here so the check does not lean on src/chem/constants.ts.
const K_B = 1.380649e-16;
const HBAR = 6.62607015e-27 / (2 * Math.PI);
const AMU = 1.6605390666e-24;
/** HHL92: tunnelling barrier width 1 angstrom; diffusion barrier E_b = chi E_D. */
const WIDTH = 1e-8;

// Binding energies E_D/k_B, K (memory: values of the order physics.md section 4 quotes).
const data = {
  H: { bindingEnergy: 450 },
  O: { bindingEnergy: 800 },
  OH: { bindingEnergy: 2850 },
  CO: { bindingEnergy: 1150 },
  H2O: { bindingEnergy: 5700 },
  CO2: { bindingEnergy: 2575 },
};
/** CO + OH barrier, K: the default network's value (memory). */
const CO_OH_BARRIER = 150;
const net = makeNetwork(
  [
    { reactants: ['H'], products: ['H(s)'], law: 'accretion' },
    { reactants: ['O'], products: ['O(s)'], law: 'accretion' },
    { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' },
    { reactants: ['H(s)', 'O(s)'], products: ['OH(s)'], law: 'surface' },
    { reactants: ['H(s)', 'OH(s)'], products: ['H2O(s)'], law: 'surface' },
    { reactants: ['CO(s)', 'OH(s)'], products: ['CO2(s)', 'H(s)'], law: 'surface', params: { activation_energy: CO_OH_BARRIER } },
    // Gas-phase photodissociation of H2O: the default network's external-field values (memory); the
    // cosmic-ray induced rate is a fixture value.
    { reactants: ['H2O'], products: ['OH', 'H'], law: 'interstellar-uv', params: { alpha: 8e-10, gamma: 2.2 } },
    { reactants: ['H2O'], products: ['OH', 'H'], law: 'cosmic-ray-uv', params: { alpha: 1.3e-14 } },
    // C(s) is not in this network, and ions are not kept in the ice: no ice counterparts.
    { reactants: ['CO'], products: ['C', 'O'], law: 'interstellar-uv', params: { alpha: 2e-10, gamma: 3 } },
    { reactants: ['OH'], products: ['OH+', 'e-'], law: 'interstellar-uv', params: { alpha: 1e-11, gamma: 3 } },
    { reactants: ['H(s)'], products: ['H'], law: 'thermal-desorption' },
  ],
  data,
);
const c = { ...defaultConditions(), visual_extinction: 3 };
const grain = (g: Partial<GrainOptions>): GrainOptions => ({ ...DEFAULT_GRAIN_OPTIONS, ...g });
const idx = (name: string): number => net.speciesIndex.get(name)!;

function nu0(name: string): number {
  const s = parseSpecies(name);
  const ed = data[s.gasName as keyof typeof data].bindingEnergy;
  return Math.sqrt((2 * c.site_density * K_B * ed) / (Math.PI ** 2 * s.mass * AMU));
}
function hop(name: string): number {
  const ed = data[parseSpecies(name).gasName as keyof typeof data].bindingEnergy;
  return nu0(name) * Math.exp((-c.diffusion_ratio * ed) / c.dust_temperature);
}
/** Garrod & Pauly 2011 competition with the HHL92 barrier/tunnelling probability. */
function fAct(a: string, b: string, barrier: number): number {
  const ma = parseSpecies(a).mass;
  const mb = parseSpecies(b).mass;
  const mu = ((ma * mb) / (ma + mb)) * AMU;
  const kappa = barrier > 0 ? Math.max(Math.exp(-barrier / c.dust_temperature), Math.exp(-((2 * WIDTH) / HBAR) * Math.sqrt(2 * mu * K_B * barrier))) : 1;
  const nu = Math.max(nu0(a), nu0(b));
  return (nu * kappa) / (nu * kappa + hop(a) + hop(b));
}

function rhs(sys: CompiledSystem, y: Float64Array): Float64Array {
  const f = new Float64Array(sys.n);
  sys.rhs(0, y, f);
  return f;
}

function state(ice: number): Float64Array {
  const y = new Float64Array(net.species.length);
  for (const [name, x] of Object.entries({ H: 1e-6, O: 1e-5, CO: 1e-5, H2O: 1e-9, OH: 1e-9, 'H(s)': 1e-3, 'O(s)': 2e-3, 'OH(s)': 1e-3, 'CO(s)': 0.3, 'H2O(s)': 0.6, 'CO2(s)': 0.05 })) {
    y[idx(name)] = name.endsWith('(s)') ? x * ice : x;
  }
  return y;
}
const iceTotal = (y: Float64Array): number => net.species.reduce((s, sp, i) => s + (sp.phase === 'ice' ? y[i] : 0), 0);

describe('ice photolysis', () => {
  it('gives each neutral gas photoreaction with ice twins its ice counterpart at factor x the gas rate, attenuated as the gas rate (analytic)', () => {
    const sys = compile(net, c, grain({ icePhotolysis: true, icePhotolysisFactor: 0.3 }));
    const photo = sys.rateSet.rates.filter((r) => r.reaction.derived?.mechanism === 'ice-photolysis');
    expect(photo.map((r) => `${r.reaction.law}: ${r.reaction.reactants} > ${r.reaction.products}`)).toEqual([
      'ice-interstellar-uv: H2O(s) > OH(s),H(s)',
      'ice-cosmic-ray-uv: H2O(s) > OH(s),H(s)',
    ]);
    // k = factor alpha G0 exp(-gamma A_V) and factor alpha zeta/zeta_0 (common practice for the gas laws).
    expect(photo[0].k / (0.3 * 8e-10 * c.uv_field * Math.exp(-2.2 * c.visual_extinction))).toBeCloseTo(1, 12);
    expect(photo[1].k / (0.3 * 1.3e-14 * (c.cr_ionisation_rate / 1.3e-17))).toBeCloseTo(1, 12);
  });

  it('names the channels left out for want of an ice twin', () => {
    const { notes } = deriveIcePhotolysis(net, 1, net.reactions.length);
    expect(notes).toHaveLength(1);
    expect(notes[0]).toContain('CO -> C + O (C)');
    expect(notes[0]).toContain('OH -> OH+ + e- (OH+, e-)');
  });

  it('photolyses a second ice phase with one more call naming its twins', () => {
    // A hypothetical bulk twin named with another suffix: here the gas names themselves stand in for it.
    const { reactions } = deriveIcePhotolysis(net, 1, 0, (gas) => gas);
    expect(reactions.map((r) => `${r.law}: ${r.reactants} > ${r.products}`)).toEqual(['ice-interstellar-uv: H2O > OH,H', 'ice-cosmic-ray-uv: H2O > OH,H', 'ice-interstellar-uv: CO > C,O']);
  });

  it('does not derive a channel the network lists itself', () => {
    const own = makeNetwork([...net.reactions.map((r) => ({ ...r, params: { ...r.params } })), { reactants: ['H2O(s)'], products: ['OH(s)', 'H(s)'], law: 'ice-cosmic-ray-uv', params: { alpha: 1e-15 } }], data);
    const { reactions, notes } = deriveIcePhotolysis(own, 1, own.reactions.length);
    expect(reactions.map((r) => r.law)).toEqual(['ice-interstellar-uv']);
    expect(notes.some((n) => n.includes('lists H2O(s) -> OH(s) + H(s) itself'))).toBe(true);
  });
});

describe('non-diffusive reactions', () => {
  it('three-body: OH made by H + O reacts at once with a CO neighbour at R(H+O) x theta_CO x f_act (analytic, Jin & Garrod 2020 form)', () => {
    for (const ice of [1e-3, 10]) {
      const scale = (x: number) => x * sysOff.rateSet.grain.monolayerAbundance;
      const y = state(1);
      for (let i = 0; i < y.length; i++) if (net.species[i].phase === 'ice') y[i] = scale(y[i] * ice);
      const off = rhs(sysOff, y);
      const on = rhs(sysThree, y);
      const rHO = sysOff.rateSet.rates.find((r) => r.reaction.index === 3)!.k * c.density * y[idx('H(s)')] * y[idx('O(s)')];
      const theta = y[idx('CO(s)')] / Math.max(sysOff.rateSet.grain.monolayerAbundance, iceTotal(y));
      const expected = rHO * theta * fAct('OH(s)', 'CO(s)', CO_OH_BARRIER);
      // Only the three-body channel (H + O -> OH, then OH + CO) makes CO2 beyond the diffusive route.
      expect((on[idx('CO2(s)')] - off[idx('CO2(s)')]) / expected).toBeCloseTo(1, 9);
    }
  });

  it('Eley-Rideal: a landing H reacts with OH(s) at k_acc x_H theta_OH f_act; the gas loses no more H than it did (analytic)', () => {
    const sys = compile(net, c, grain({ eleyRideal: true }));
    const y = state(1e-3 * sys.rateSet.grain.monolayerAbundance);
    // No H(s): the diffusive H + OH is then zero and H2O(s) is made by the landing H alone.
    y[idx('H(s)')] = 0;
    const off = rhs(sysOff, y);
    const on = rhs(sys, y);
    const kAcc = sys.rateSet.rates.find((r) => r.reaction.index === 0)!.k;
    const theta = y[idx('OH(s)')] / sys.rateSet.grain.monolayerAbundance;
    const expected = kAcc * y[idx('H')] * theta * fAct('H(s)', 'OH(s)', 0);
    expect(off[idx('H2O(s)')]).toBe(0);
    expect(on[idx('H2O(s)')] / expected).toBeCloseTo(1, 9);
    expect(on[idx('H')]).toBe(off[idx('H')]);
  });

  it('photodissociation-induced: an OH fragment of H2O(s) reacts with CO(s) at k_photo x_H2O theta_CO f_act (analytic)', () => {
    const photolysis = compile(net, c, grain({ icePhotolysis: true }));
    const pdi = compile(net, c, grain({ icePhotolysis: true, photodissociationInduced: true }));
    const y = state(5 * pdi.rateSet.grain.monolayerAbundance);
    const kPhoto = 8e-10 * c.uv_field * Math.exp(-2.2 * c.visual_extinction) + 1.3e-14 * (c.cr_ionisation_rate / 1.3e-17);
    const expected = kPhoto * y[idx('H2O(s)')] * (y[idx('CO(s)')] / iceTotal(y)) * fAct('OH(s)', 'CO(s)', CO_OH_BARRIER);
    expect((rhs(pdi, y)[idx('CO2(s)')] - rhs(photolysis, y)[idx('CO2(s)')]) / expected).toBeCloseTo(1, 9);
  });

  it('adds only the stated reactions: each switch its own mechanism, as coverage terms, the mass-action part unchanged (counts enumerated by hand)', () => {
    const counts = (g: Partial<GrainOptions>): Record<string, number> => {
      const out: Record<string, number> = {};
      for (const r of deriveReactions(net, grain(g)).reactions) out[r.derived!.mechanism] = (out[r.derived!.mechanism] ?? 0) + 1;
      return out;
    };
    // H + O -> OH: OH on with H and with CO (2); H + OH -> H2O: none; CO + OH -> CO2 + H: H on with O and OH (2).
    expect(counts({ threeBody: true })).toEqual({ 'three-body': 4 });
    // H lands on O(s) or OH(s) (2), O on H(s) (1), CO on OH(s) (1).
    expect(counts({ eleyRideal: true })).toEqual({ 'eley-rideal': 4 });
    expect(counts({ icePhotolysis: true })).toEqual({ 'ice-photolysis': 2 });
    // Each of the two H2O(s) channels: OH on with H and CO, H on with O and OH.
    expect(counts({ icePhotolysis: true, photodissociationInduced: true })).toEqual({ 'ice-photolysis': 2, 'photodissociation-induced': 8 });
    expect(counts({ photodissociationInduced: true })).toEqual({});

    const m = sysOff.terms.k.length;
    expect(sysThree.terms.k.length).toBe(m);
    expect(sysThree.nonMassAction.length).toBe(sysOff.nonMassAction.length + 1);
    expect(sysThree.omitted.filter((o) => o.startsWith('coverage (derived three-body'))).toHaveLength(4);
    expect(compile(net, c, grain({ icePhotolysis: true })).terms.k.length).toBe(m + 2);
    expect(compile(net, c, grain({ icePhotolysis: true })).nonMassAction.length).toBe(sysOff.nonMassAction.length);
  });

  it('names each derived reaction by its mechanism and parents', () => {
    const names = sysThree.omitted.filter((o) => o.includes('three-body'));
    const name = 'coverage (derived three-body (H(s) + O(s) -> OH(s), then CO(s) + OH(s) -> CO2(s) + H(s)))';
    // Each omitted entry is the term's name, then why it is not mass action.
    expect(names.map((o) => o.slice(0, name.length))).toContain(name);
    expect(names.every((o) => o.includes(': a non-diffusive reaction'))).toBe(true);
  });

  it('keeps every element and the charge in the rhs with all switches on', () => {
    const sys = compile(net, c, grain({ threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true }));
    const f = rhs(sys, state(3 * sys.rateSet.grain.monolayerAbundance));
    for (const el of ['H', 'C', 'O']) {
      let total = 0;
      let size = 0;
      net.species.forEach((s, i) => {
        total += (s.elements[el] ?? 0) * f[i];
        size += Math.abs((s.elements[el] ?? 0) * f[i]);
      });
      expect(Math.abs(total)).toBeLessThan(1e-12 * size);
    }
  });
});

describe('network files', () => {
  it('refuse a derived-only law with a message naming the grain option', () => {
    const dir = scratch('hoarfrost-nd-');
    const file = join(dir, 'net.yaml');
    writeFileSync(
      file,
      [
        'format: hoarfrost-network 1',
        'name: t',
        'species:',
        '  - {name: H, binding_energy: 450}',
        '  - {name: CO, binding_energy: 1150}',
        'reactions:',
        '  - {reactants: [H], products: ["H(s)"], law: eley-rideal}',
        '',
      ].join('\n'),
    );
    expect(() => loadNetwork(file)).toThrow(/made by the model[\s\S]*grain option/);
  });
});

const sysOff = compile(net, c, DEFAULT_GRAIN_OPTIONS);
const sysThree = compile(net, c, grain({ threeBody: true }));
