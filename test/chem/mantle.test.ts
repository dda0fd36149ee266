/**
 * The three-phase ice of src/chem/mantle.ts: derived mantle twins, output
 * columns, photodesorption that sees the surface alone, and the transfer
 * term's analytic Jacobian against central differences (common practice)
 * in both regimes of Garrod & Pauly (2011): growth, and erosion with the
 * mantle thicker or thinner than the surface.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';
import { IceTransfer, outputColumns, outputSpeciesNames, withMantle } from '../../src/chem/mantle.ts';
import { compile, type CompiledSystem } from '../../src/chem/system.ts';
import { makeNetwork } from '../model/fixtures.ts';
import { fdCheck } from '../support/jacobian.ts';

const MANTLE: GrainOptions = { ...DEFAULT_GRAIN_OPTIONS, mantle: true };
// Binding energies E_D/k_B, K: physics.md section 4 (memory). The reactions are a test fixture whose rates
// span a few decades only, so that central differences resolve every Jacobian entry; their values are not science.
const data = { CO: { bindingEnergy: 1150 }, O: { bindingEnergy: 800 }, CO2: { bindingEnergy: 2575 }, O2: { bindingEnergy: 1000 } };
const net = makeNetwork(
  [
    { reactants: ['O', 'CO2'], products: ['CO', 'O2'], law: 'arrhenius', params: { alpha: 1e-11 } },
    { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' },
    { reactants: ['O'], products: ['O(s)'], law: 'accretion' },
    { reactants: ['CO2'], products: ['CO2(s)'], law: 'accretion' },
    { reactants: ['CO(s)'], products: ['CO'], law: 'photodesorption' },
    { reactants: ['CO2(s)'], products: ['CO2'], law: 'photodesorption' },
    { reactants: ['CO(s)'], products: ['CO'], law: 'thermal-desorption' },
    { reactants: ['O(s)'], products: ['O'], law: 'thermal-desorption' },
    { reactants: ['O(s)', 'CO(s)'], products: ['CO2(s)'], law: 'surface' },
    { reactants: ['O(s)', 'O(s)'], products: ['O2(s)'], law: 'surface' },
    { reactants: ['O(s)', 'O(s)'], products: ['O2'], law: 'reactive-desorption' },
  ],
  data,
);
const iceNames = net.species.filter((s) => s.phase === 'ice').map((s) => s.gasName);

describe('mantle species', () => {
  it('are derived for every ice species, after the network own species, and only once', () => {
    const three = withMantle(net);
    expect(three.species.slice(0, net.species.length)).toEqual(net.species);
    expect(three.species.slice(net.species.length).map((s) => s.name)).toEqual(iceNames.map((g) => `${g}(mantle)`));
    expect(three.species.slice(net.species.length).every((s) => s.phase === 'mantle')).toBe(true);
    expect(withMantle(three)).toBe(three);
    expect(three.reactions).toBe(net.reactions);
  });

  it('give the outputs the whole ice X(s) beside X(surface) and X(mantle); without the mantle the outputs are the species', () => {
    expect(outputSpeciesNames(net, DEFAULT_GRAIN_OPTIONS)).toEqual(net.species.map((s) => s.name));
    const three = withMantle(net);
    const columns = outputColumns(three.species, MANTLE);
    expect(outputColumns(three.species, DEFAULT_GRAIN_OPTIONS).names).toEqual(three.species.map((s) => s.name));
    const at = (name: string) => columns.names.indexOf(name);
    const parts = (name: string) => Array.from(columns.parts.subarray(columns.start[at(name)], columns.start[at(name) + 1])).map((i) => three.species[i].name);
    expect(parts('CO(s)')).toEqual(['CO(s)', 'CO(mantle)']);
    expect(parts('CO(surface)')).toEqual(['CO(s)']);
    expect(parts('CO(mantle)')).toEqual(['CO(mantle)']);
    expect(parts('CO')).toEqual(['CO']);
    expect(columns.names.length).toBe(net.species.length + 2 * iceNames.length);
  });
});

describe('photodesorption with the mantle on', () => {
  it('shares its monolayer among the surface species only (physics.md section 3, the mantle lies below the outer layer)', () => {
    const c = defaultConditions();
    const photo = makeNetwork([{ reactants: ['CO(s)'], products: ['CO'], law: 'photodesorption' }], data);
    const sys = compile(photo, c, MANTLE);
    const mono = grainProperties(c).monolayerAbundance;
    const y = new Float64Array(sys.n);
    y[sys.species.indexOf('CO(s)')] = 2 * mono;
    y[sys.species.indexOf('CO(mantle)')] = 100 * mono;
    const dydt = new Float64Array(sys.n);
    sys.rhs(0, y, dydt);
    const k = sys.rateSet.rates[0].k;
    // One monolayer's worth of CO leaves per unit k: k x_CO(s) x_ML / x_surf with x_surf = 2 x_ML.
    expect(dydt[sys.species.indexOf('CO')] / (k * mono)).toBeCloseTo(1, 12);
  });
});

/** F, the net rate of the other processes on the surface population: the same network without the mantle (its species come first). */
function surfaceRate(sys: CompiledSystem, twoPhase: CompiledSystem, y: Float64Array): number {
  const dydt = new Float64Array(twoPhase.n);
  twoPhase.rhs(0, y.subarray(0, twoPhase.n), dydt);
  let f = 0;
  twoPhase.species.forEach((name, i) => {
    if (name.endsWith('(s)')) f += dydt[i];
  });
  expect(sys.species.slice(0, twoPhase.n)).toEqual(twoPhase.species);
  return f;
}

describe('surface-mantle transfer Jacobian against central differences', () => {
  const set = (sys: CompiledSystem, y: Float64Array, values: Record<string, number>) => {
    for (const [name, x] of Object.entries(values)) y[sys.species.indexOf(name)] = x;
  };

  it('while the ice grows: an empty grain, and a grain with surface and mantle (10 K dust)', () => {
    const c = defaultConditions();
    const mono = grainProperties(c).monolayerAbundance;
    const sys = compile(net, c, MANTLE);
    const two = compile(net, c, DEFAULT_GRAIN_OPTIONS);
    const empty = new Float64Array(sys.n);
    set(sys, empty, { CO: 1e-4, O: 1e-4, CO2: 1e-6, O2: 1e-6 });
    expect(surfaceRate(sys, two, empty)).toBeGreaterThan(0);
    expect(fdCheck(sys, empty, 1e-3 * mono)).toBeLessThan(1e-5);
    const mixed = Float64Array.from(empty);
    set(sys, mixed, { 'CO(s)': 0.4 * mono, 'CO2(s)': 0.5 * mono, 'O(s)': 1e-6 * mono, 'O2(s)': 0.05 * mono, 'CO(mantle)': 3 * mono, 'CO2(mantle)': 10 * mono, 'O(mantle)': 0.1 * mono, 'O2(mantle)': 0.2 * mono });
    expect(surfaceRate(sys, two, mixed)).toBeGreaterThan(0);
    expect(fdCheck(sys, mixed, 1e-3 * mono)).toBeLessThan(1e-5);
  });

  it('while the ice erodes: a full mantle, and a mantle thinner than the surface (22 K dust, CO leaves)', () => {
    const c = { ...defaultConditions(), dust_temperature: 22 };
    const mono = grainProperties(c).monolayerAbundance;
    const sys = compile(net, c, MANTLE);
    const two = compile(net, c, DEFAULT_GRAIN_OPTIONS);
    const full = new Float64Array(sys.n);
    set(sys, full, { CO: 1e-9, O: 1e-6, CO2: 1e-6, O2: 1e-9, 'CO(s)': 0.6 * mono, 'CO2(s)': 0.4 * mono, 'O(s)': 0.1 * mono, 'O2(s)': 1e-2 * mono, 'CO(mantle)': 20 * mono, 'CO2(mantle)': 40 * mono, 'O2(mantle)': 0.5 * mono });
    expect(surfaceRate(sys, two, full)).toBeLessThan(0);
    expect(fdCheck(sys, full, 1e-3 * mono)).toBeLessThan(1e-5);
    const thin = Float64Array.from(full);
    set(sys, thin, { 'CO(mantle)': 0.2 * mono, 'CO2(mantle)': 0.1 * mono, 'O2(mantle)': 0 });
    expect(surfaceRate(sys, two, thin)).toBeLessThan(0);
    expect(fdCheck(sys, thin, 1e-3 * mono)).toBeLessThan(1e-5);
  });

  it('adds nothing when the mantle is off, and is named among the terms the emitted mass-action system leaves out', () => {
    const c = defaultConditions();
    expect(compile(net, c, DEFAULT_GRAIN_OPTIONS).omitted.some((o) => o.startsWith('surface-mantle transfer'))).toBe(false);
    const massOnly = compile(net, c, MANTLE, { massActionOnly: true });
    expect(massOnly.omitted.some((o) => o.startsWith('surface-mantle transfer'))).toBe(true);
    expect(massOnly.nonMassAction).toHaveLength(0);
  });
});

describe('surface-mantle transfer form held through the round-off of F (docs/ice-mantle.md, "The band")', () => {
  // One ice species: surface at index 0, mantle at 1; the other terms put F on the surface row and the
  // round-off bound of F is given. Lambda = 1, so the growth form moves F x_s and the erosion form F x_m / max(x_s, x_m).
  let f = 0;
  const band = 1e-3;
  const term = new IceTransfer(Int32Array.of(0), Int32Array.of(1), 1, 2, () => Float64Array.of(f, 0), () => band);
  const y = Float64Array.of(0.5, 2);
  const transferred = (): number => {
    const dydt = Float64Array.of(f, 0);
    term.addRhs(y, dydt);
    return dydt[1];
  };

  it('switches form only when F leaves the band on the other side, and keeps the held form inside it', () => {
    f = -0.01;
    expect(term.beginStep(y)).toBe(true);
    expect(transferred()).toBeCloseTo(-0.01, 15); // erosion: F x_m / x_m
    f = 0.5 * band;
    expect(term.beginStep(y)).toBe(false);
    expect(transferred()).toBeCloseTo(0.5 * band, 15); // still the erosion form, at this F
    f = -0.5 * band;
    expect(term.beginStep(y)).toBe(false);
    f = 2 * band;
    expect(term.beginStep(y)).toBe(true);
    expect(transferred()).toBeCloseTo(2 * band * 0.5, 15); // growth: F x_s / Lambda
    f = -band;
    expect(term.beginStep(y)).toBe(false);
    f = -1.01 * band;
    expect(term.beginStep(y)).toBe(true);
  });
});
