import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import { assertNetworkClean, checkNetwork, formatReport, type NetworkReport } from '../../src/chem/network-check.ts';
import { UserErrors } from '../../src/config/errors.ts';

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-check-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function check(reactions: string[], species = '  - {name: CO, binding_energy: 1150}'): NetworkReport {
  const file = join(dir, `n${Math.random().toString(36).slice(2)}.yaml`);
  writeFileSync(file, `format: hoarfrost-network 1\nname: t\nspecies:\n${species}\nreactions:\n${reactions.map((r) => `  - ${r}`).join('\n')}\n`);
  return checkNetwork(loadNetwork(file));
}

const kinds = (r: NetworkReport, severity: 'error' | 'warning'): string[] => r.problems.filter((p) => p.severity === severity).map((p) => p.kind);

/** A closed little network: every species made and destroyed, CO freezes and desorbs. */
const CLOSED = [
  '{reactants: [H2], products: [H2+, e-], law: cosmic-ray, alpha: 1.2e-17}',
  '{reactants: [H2+, H2], products: [H3+, H], law: arrhenius, alpha: 2.1e-9}',
  '{reactants: [H3+, e-], products: [H2, H], law: arrhenius, alpha: 2.3e-8, beta: -0.52}',
  '{reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.61e-9}',
  '{reactants: [HCO+, e-], products: [CO, H], law: arrhenius, alpha: 2.8e-7, beta: -0.69}',
  '{reactants: [H, H], products: [H2], law: parametric-h2}',
  '{reactants: [CO], products: [CO(s)], law: accretion}',
  '{reactants: [CO(s)], products: [CO], law: thermal-desorption}',
  '{reactants: [H], products: [H(s)], law: accretion}',
  '{reactants: [H(s)], products: [H], law: thermal-desorption}',
  '{reactants: [H2], products: [H2(s)], law: accretion}',
  '{reactants: [H2(s)], products: [H2], law: thermal-desorption}',
];
const SPECIES = '  - {name: CO, binding_energy: 1150}\n  - {name: H, binding_energy: 450}\n  - {name: H2, binding_energy: 430}';

describe('checkNetwork', () => {
  it('a closed network is clean, and the counts are right', () => {
    const r = check(CLOSED, SPECIES);
    expect(r.problems).toEqual([]);
    expect(r.errors).toBe(0);
    expect(r.counts.species).toEqual({ total: 10, gas: 7, ice: 3, ions: 3, electrons: 1 });
    expect(r.counts.reactions.total).toBe(12);
    expect(r.counts.reactions.byLaw.arrhenius).toBe(4);
    expect(r.counts.reactions.byLaw.accretion).toBe(3);
    expect(r.counts.reactions.byLaw.surface).toBe(0);
    expect(formatReport(r)).toMatch(/OK: no errors\./);
  });

  it('catches a reaction that does not conserve elements, with its line', () => {
    const r = check([...CLOSED, '{reactants: [H3+, CO], products: [HCO+, H], law: arrhenius, alpha: 1e-9}'], SPECIES);
    expect(kinds(r, 'error')).toEqual(['elements']);
    const p = r.problems[0];
    expect(p.message).toMatch(/elements not conserved in H3\+ \+ CO -> HCO\+ \+ H \(arrhenius\): H 1 more in the reactants/);
    expect(p.source?.line).toBe(20);
    expect(p.reactions).toEqual([12]);
    expect(formatReport(r)).toMatch(/FAILED: 1 error\./);
  });

  it('assertNetworkClean throws the errors for a caller about to run the network', () => {
    const file = join(dir, 'assert.yaml');
    writeFileSync(file, `format: hoarfrost-network 1\nname: t\nspecies:\n${SPECIES}\nreactions:\n${[...CLOSED, '{reactants: [H3+, CO], products: [HCO+, H], law: arrhenius, alpha: 1e-9}'].map((r) => `  - ${r}`).join('\n')}\n`);
    expect(() => assertNetworkClean(loadNetwork(file))).toThrow(UserErrors);
    expect(() => assertNetworkClean(loadNetwork(file))).toThrow(`${file}:20: elements not conserved`);
    expect(assertNetworkClean(loadNetwork('config/networks/dark-cloud.yaml')).errors).toBe(0);
  });

  it('catches a charge error', () => {
    const r = check([...CLOSED, '{reactants: [HCO+, e-], products: [CO, H, e-], law: arrhenius, alpha: 1e-9}'], SPECIES);
    expect(kinds(r, 'error')).toEqual(['charge']);
    expect(r.problems[0].message).toMatch(/charge not conserved .* reactants carry 0, products -1/);
  });

  it('finds duplicates by multiset, law and overlapping temperature range', () => {
    const r = check(
      [
        ...CLOSED,
        '{reactants: [CO, H3+], products: [H2, HCO+], law: arrhenius, alpha: 1.7e-9}',
        '{reactants: [H2+, H2], products: [H3+, H], law: arrhenius, alpha: 2e-9, temperature: [10, 300]}',
      ],
      SPECIES,
    );
    expect(kinds(r, 'error')).toEqual(['duplicate', 'duplicate']);
    expect(r.problems[0].message).toMatch(/duplicates the reaction at .*:11 /);
  });

  it('pieces of one reaction over disjoint (or touching) temperature ranges are not duplicates', () => {
    const pieces = CLOSED.map((r) => (r.includes('[H2+, H2]') ? r.replace('alpha: 2.1e-9', 'alpha: 2.1e-9, temperature: [10, 300]') : r));
    const r = check([...pieces, '{reactants: [H2+, H2], products: [H3+, H], law: arrhenius, alpha: 2e-9, temperature: [300, 5000]}'], SPECIES);
    expect(r.errors).toBe(0);
  });

  it('the same reactants and products under another law are not a duplicate', () => {
    const r = check([...CLOSED, '{reactants: [CO(s)], products: [CO], law: cr-desorption}'], SPECIES);
    expect(r.errors).toBe(0);
  });

  it('reports an inverted temperature range', () => {
    const r = check([...CLOSED.slice(0, 3), CLOSED[3].replace('}', ', temperature: [300, 10]}'), ...CLOSED.slice(4)], SPECIES);
    expect(kinds(r, 'error')).toEqual(['inverted-range']);
    expect(r.problems[0].message).toMatch(/\[300, 10\] K is inverted/);
  });

  it('a reactive-desorption channel needs its surface reaction', () => {
    const species = `${SPECIES}\n  - {name: HCO, binding_energy: 1600}`;
    const extra = ['{reactants: [HCO], products: [HCO(s)], law: accretion}', '{reactants: [HCO(s)], products: [HCO], law: thermal-desorption}', '{reactants: [HCO], products: [CO, H], law: interstellar-uv, alpha: 1e-9, gamma: 1.5}'];
    const rd = '{reactants: [H(s), CO(s)], products: [HCO], law: reactive-desorption, activation_energy: 2500}';
    expect(kinds(check([...CLOSED, ...extra, rd], species), 'error')).toEqual(['unpaired-reactive-desorption']);
    const paired = check([...CLOSED, ...extra, rd, '{reactants: [CO(s), H(s)], products: [HCO(s)], law: surface, activation_energy: 2500}'], species);
    expect(paired.errors).toBe(0);
    // The little network's other ices (H2(s), HCO(s)) have no surface sink: that warning is tested below.
    expect(paired.problems.filter((p) => p.kind !== 'no-surface-sink')).toEqual([]);
  });

  it('warns when the branching ratios of one surface pair do not add up to 1', () => {
    const species = `${SPECIES}\n  - {name: HCO, binding_energy: 1600}`;
    const extra = ['{reactants: [HCO], products: [HCO(s)], law: accretion}', '{reactants: [HCO(s)], products: [HCO], law: thermal-desorption}', '{reactants: [HCO], products: [CO, H], law: interstellar-uv, alpha: 1e-9, gamma: 1.5}'];
    const r = check([...CLOSED, ...extra, '{reactants: [H(s), HCO(s)], products: [CO(s), H2], law: surface, branching: 0.5}'], species);
    expect(kinds(r, 'warning').filter((k) => k !== 'no-surface-sink')).toEqual(['branching']);
    expect(r.problems.find((p) => p.kind === 'branching')?.message).toMatch(/add up to 0\.5, not 1/);
  });

  it('warns about species only produced or only destroyed, gas neutrals that never freeze out, ices with no way back', () => {
    const r = check(
      [
        ...CLOSED,
        '{reactants: [CO], products: [C, O], law: interstellar-uv, alpha: 2e-10, gamma: 3}',
        '{reactants: [N2(s)], products: [N2], law: thermal-desorption}',
        '{reactants: [O], products: [O(s)], law: accretion}',
      ],
      `${SPECIES}\n  - {name: N2, binding_energy: 1000}\n  - {name: O, binding_energy: 800}\n  - {name: He, binding_energy: 100}`,
    );
    const w = r.problems.filter((p) => p.severity === 'warning').map((p) => `${p.kind} ${p.species}`);
    expect(r.problems.filter((p) => p.severity === 'error')).toEqual([]);
    expect(w).toEqual(
      expect.arrayContaining([
        'unused-species He',
        'only-produced C',
        'only-destroyed N2(s)',
        'only-produced N2',
        'no-accretion C',
        'no-accretion N2',
        'only-produced O(s)',
        'no-desorption O(s)',
      ]),
    );
    expect(w).toHaveLength(8);
  });
});

describe('ices that no surface process destroys', () => {
  /** CLOSED plus surface chemistry: H(s) + O(s) -> OH(s), and OH(s) with O(s) freezing out and desorbing. */
  const SURFACE = [
    ...CLOSED,
    '{reactants: [O], products: [O(s)], law: accretion}',
    '{reactants: [O(s)], products: [O], law: thermal-desorption}',
    '{reactants: [OH], products: [OH(s)], law: accretion}',
    '{reactants: [OH(s)], products: [OH], law: thermal-desorption}',
    '{reactants: [O, H3+], products: [OH+, H2], law: arrhenius, alpha: 8e-10}',
    '{reactants: [OH+, e-], products: [O, H], law: arrhenius, alpha: 3.75e-8}',
    '{reactants: [OH], products: [O, H], law: interstellar-uv, alpha: 3.9e-10, gamma: 2.2}',
    '{reactants: [H(s), O(s)], products: [OH(s)], law: surface}',
  ];
  const SURFACE_SPECIES = `${SPECIES}\n  - {name: O, binding_energy: 800}\n  - {name: OH, binding_energy: 2850}`;
  const sinkless = (r: NetworkReport): string[] => r.problems.filter((p) => p.kind === 'no-surface-sink').map((p) => p.species ?? '');

  it('warns of every ice that no surface reaction destroys once the network has surface chemistry (desorption and photolysis do not count)', () => {
    const r = check(SURFACE, SURFACE_SPECIES);
    expect(sinkless(r).sort()).toEqual(['CO(s)', 'H2(s)', 'OH(s)']);
    const p = r.problems.find((x) => x.species === 'OH(s)');
    expect(p?.severity).toBe('warning');
    expect(p?.message).toMatch(/no surface reaction destroys the ice OH\(s\)/);
    expect(p?.message).toMatch(/no_surface_sink/);
  });

  it('a reason in the species entry (no_surface_sink) silences it, and the reason is kept', () => {
    const species = SURFACE_SPECIES.replace('{name: OH, binding_energy: 2850}', '{name: OH, binding_energy: 2850, no_surface_sink: "test: kept on purpose"}');
    const r = check(SURFACE, species);
    expect(sinkless(r).sort()).toEqual(['CO(s)', 'H2(s)']);
  });

  it('a network without surface reactions keeps its ices inert by design: no warning', () => {
    expect(sinkless(check(CLOSED, SPECIES))).toEqual([]);
  });

  it('an empty reason is refused with its line', () => {
    const species = SURFACE_SPECIES.replace('{name: OH, binding_energy: 2850}', '{name: OH, binding_energy: 2850, no_surface_sink: ""}');
    expect(() => check(SURFACE, species)).toThrow(/no_surface_sink must say why/);
  });
});

describe('mantle species in a network file (docs/ice-mantle.md)', () => {
  it('may stand in the species list, where they give the data of their gas form and raise no unused-species warning', () => {
    const r = check(CLOSED, SPECIES.replace('{name: CO,', '{name: CO(mantle),'));
    expect(r.problems).toEqual([]);
  });

  it('may not take part in a reaction: the mantle is inert', () => {
    let caught: unknown;
    try {
      check([...CLOSED, '{reactants: [CO(mantle)], products: [CO], law: thermal-desorption}'], SPECIES);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(UserErrors);
    expect((caught as UserErrors).message).toMatch(/CO\(mantle\) is a mantle species: the inert bulk ice takes part in no reaction.*CO\(s\)/);
  });
});

describe('the default network config/networks/dark-cloud.yaml', () => {
  const net = loadNetwork('config/networks/dark-cloud.yaml');
  const report = checkNetwork(net);
  const has = (reactants: string[], products: string[], law: string): boolean =>
    net.reactions.some((r) => r.law === law && [...r.reactants].sort().join() === [...reactants].sort().join() && [...r.products].sort().join() === [...products].sort().join());

  it('passes the check with no errors and no warnings', () => {
    expect(report.problems).toEqual([]);
  });

  it('is as large as the issue asks: >= 80 gas species, >= 30 ices, >= 500 reactions', () => {
    expect(report.counts.species.gas).toBeGreaterThanOrEqual(80);
    expect(report.counts.species.ice).toBeGreaterThanOrEqual(30);
    expect(report.counts.reactions.total).toBeGreaterThanOrEqual(500);
    const elements = new Set(net.species.flatMap((s) => Object.keys(s.elements)));
    for (const el of ['H', 'He', 'C', 'N', 'O', 'S', 'Si', 'Fe', 'Mg', 'Na']) expect(elements.has(el)).toBe(true);
    for (const ion of ['Si+', 'Fe+', 'Mg+', 'Na+']) expect(net.speciesIndex.has(ion)).toBe(true);
  });

  it('carries the key processes', () => {
    expect(has(['H2'], ['H2+', 'e-'], 'cosmic-ray')).toBe(true);
    expect(has(['H2'], ['H+', 'H', 'e-'], 'cosmic-ray')).toBe(true);
    expect(has(['He'], ['He+', 'e-'], 'cosmic-ray')).toBe(true);
    expect(has(['H2+', 'H2'], ['H3+', 'H'], 'arrhenius')).toBe(true);
    expect(has(['H3+', 'CO'], ['HCO+', 'H2'], 'arrhenius')).toBe(true);
    expect(has(['H3+', 'N2'], ['N2H+', 'H2'], 'arrhenius')).toBe(true);
    expect(has(['HCO+', 'e-'], ['CO', 'H'], 'arrhenius')).toBe(true);
    expect(has(['Fe+', 'e-'], ['Fe'], 'arrhenius')).toBe(true);
    expect(has(['Fe', 'HCO+'], ['Fe+', 'HCO'], 'arrhenius')).toBe(true);
    expect(has(['H', 'H'], ['H2'], 'parametric-h2')).toBe(true);
    expect(has(['H(s)', 'H(s)'], ['H2'], 'surface')).toBe(true);
    const chains: [string, string, string][] = [
      ['O', 'OH', ''],
      ['OH', 'H2O', ''],
      ['CO', 'HCO', '2500'],
      ['HCO', 'H2CO', ''],
      ['H2CO', 'CH3O', '2200'],
      ['CH3O', 'CH3OH', ''],
      ['N', 'NH', ''],
      ['NH', 'NH2', ''],
      ['NH2', 'NH3', ''],
      ['C', 'CH', ''],
      ['CH', 'CH2', ''],
      ['CH2', 'CH3', ''],
      ['CH3', 'CH4', ''],
      ['S', 'HS', ''],
      ['HS', 'H2S', ''],
    ];
    for (const [from, to] of chains) {
      const r = net.reactions.find((x) => x.law === 'surface' && x.reactants.includes('H(s)') && x.reactants.includes(`${from}(s)`) && x.products.includes(`${to}(s)`));
      expect(r, `H(s) + ${from}(s) -> ${to}(s)`).toBeDefined();
      // Barriers of H + CO and H + H2CO of order 2000-2500 K (memory).
      if (from === 'CO' || from === 'H2CO') expect(r!.params.activation_energy).toBeGreaterThanOrEqual(2000);
      expect(has(r!.reactants, r!.products.map((p) => p.replace('(s)', '')), 'reactive-desorption')).toBe(true);
    }
    expect(has(['CO(s)', 'OH(s)'], ['CO2(s)', 'H(s)'], 'surface')).toBe(true);
  });

  it('carries the surface network of the laboratory summaries (Linnartz, Ioppolo & Fedoseev 2015), each channel with its reactive-desorption share', () => {
    const surface: [string[], string[]][] = [
      // H abstraction (physics.md section 10)
      [['H(s)', 'H2CO(s)'], ['HCO(s)', 'H2']],
      [['H(s)', 'CH3OH(s)'], ['CH2OH(s)', 'H2']],
      [['H(s)', 'CH3OH(s)'], ['CH3O(s)', 'H2']],
      [['H(s)', 'H2S(s)'], ['HS(s)', 'H2']],
      // the O/H network
      [['O(s)', 'O(s)'], ['O2(s)']],
      [['H(s)', 'O2(s)'], ['O2H(s)']],
      [['H(s)', 'O2H(s)'], ['H2O2(s)']],
      [['H(s)', 'O2H(s)'], ['OH(s)', 'OH(s)']],
      [['H(s)', 'H2O2(s)'], ['H2O(s)', 'OH(s)']],
      [['O(s)', 'O2(s)'], ['O3(s)']],
      [['H(s)', 'O3(s)'], ['OH(s)', 'O2(s)']],
      [['OH(s)', 'H2(s)'], ['H2O(s)', 'H(s)']],
      [['OH(s)', 'OH(s)'], ['H2O2(s)']],
      // H + HNO and the NO chain to NH2OH (Congiu et al. 2012; Fedoseev et al. 2012)
      [['H(s)', 'HNO(s)'], ['H2NO(s)']],
      [['H(s)', 'H2NO(s)'], ['NH2OH(s)']],
      // the routes to CO2
      [['CO(s)', 'OH(s)'], ['CO2(s)', 'H(s)']],
      [['O(s)', 'CO(s)'], ['CO2(s)']],
      [['O(s)', 'HCO(s)'], ['CO2(s)', 'H(s)']],
      // CO to methanol through both radicals
      [['H(s)', 'CH2OH(s)'], ['CH3OH(s)']],
    ];
    for (const [r, p] of surface) {
      expect(has(r, p, 'surface'), `${r.join(' + ')} -> ${p.join(' + ')}`).toBe(true);
      expect(has(r, p.map((x) => x.replace('(s)', '')), 'reactive-desorption'), `reactive desorption of ${r.join(' + ')}`).toBe(true);
    }
    const barrier = (r: string[], p: string[]): number | undefined =>
      net.reactions.find((x) => x.law === 'surface' && [...x.reactants].sort().join() === [...r].sort().join() && [...x.products].sort().join() === [...p].sort().join())?.params.activation_energy;
    // Barriers of order of the published ones: OH + H2 of order 2000 K (memory; it runs at 10 K only by tunnelling, Oba et al. 2012),
    // CO + OH 176 K (Cuppen et al. 2009), CO + O of order 1000 K (memory).
    expect(barrier(['OH(s)', 'H2(s)'], ['H2O(s)', 'H(s)'])).toBeGreaterThanOrEqual(1500);
    expect(barrier(['CO(s)', 'OH(s)'], ['CO2(s)', 'H(s)'])).toBe(176);
    expect(barrier(['O(s)', 'CO(s)'], ['CO2(s)'])).toBeGreaterThanOrEqual(500);
    // H + H2CO: 80 % CH3O and the rest abstraction (Song & Kastner 2017, ApJ 850, 118).
    const h2co = net.reactions.filter((x) => x.law === 'surface' && x.reactants.includes('H2CO(s)') && x.reactants.includes('H(s)'));
    expect(h2co.find((x) => x.products.includes('CH3O(s)'))?.params.branching).toBe(0.8);
    expect(h2co.find((x) => x.products.includes('HCO(s)'))?.params.branching).toBe(0.2);
  });

  it('every ice species has a surface sink or says why not (no_surface_sink), so the check warns of none', () => {
    expect(report.problems.filter((p) => p.kind === 'no-surface-sink')).toEqual([]);
    const reasons = [...net.speciesData.values()].filter((d) => d.noSurfaceSink !== undefined);
    for (const name of ['H2O', 'CO2', 'NH3', 'CH4', 'N2']) expect(net.speciesData.get(name)?.noSurfaceSink, name).toMatch(/\w{4,}/);
    // A reason is a stated exception, not a way to silence the runaway ices the check exists for.
    for (const name of ['HNO', 'H2O2', 'O3', 'H2CO', 'CH3OH', 'CO', 'O2']) expect(net.speciesData.get(name)?.noSurfaceSink, name).toBeUndefined();
    expect(reasons.length).toBeLessThan(net.species.filter((s) => s.phase === 'ice').length / 2);
  });

  it('the products of every neutral photodissociation have ice forms, so ice photolysis can follow the gas-phase channel', () => {
    for (const r of net.reactions) {
      if ((r.law !== 'interstellar-uv' && r.law !== 'cosmic-ray-uv') || r.products.some((p) => p === 'e-')) continue;
      if (!net.speciesIndex.has(`${r.reactants[0]}(s)`)) continue;
      for (const p of r.products) expect(net.speciesIndex.has(`${p}(s)`), `${p}(s) from ${r.reactants[0]} (${r.law})`).toBe(true);
    }
    for (const name of ['OH', 'H', 'O', 'HCO', 'CH3', 'NH2', 'CH3O', 'CH2OH']) expect(net.speciesData.get(name)?.bindingEnergy, name).toBeGreaterThan(0);
  });

  it('every neutral freezes out and has thermal, cosmic-ray and photo desorption', () => {
    const neutrals = net.species.filter((s) => s.phase === 'gas' && s.charge === 0 && !s.isElectron);
    expect(neutrals.length).toBeGreaterThanOrEqual(40);
    for (const s of neutrals) {
      expect(has([s.name], [`${s.name}(s)`], 'accretion'), s.name).toBe(true);
      for (const law of ['thermal-desorption', 'cr-desorption', 'photodesorption']) expect(has([`${s.name}(s)`], [s.name], law), `${s.name} ${law}`).toBe(true);
      expect(net.speciesData.get(s.name)?.bindingEnergy, s.name).toBeGreaterThan(0);
    }
  });

  it('binding energies of physics.md section 4 (memory) are used as given there', () => {
    const physicsMd: Record<string, number> = { H: 450, H2: 430, He: 100, C: 800, N: 800, O: 800, OH: 2850, H2O: 5700, CO: 1150, CO2: 2575, N2: 1000, O2: 1000, NH3: 5530, CH4: 1300, HCO: 1600, H2CO: 2050, CH3OH: 5530, H2S: 2740, S: 1100 };
    for (const [name, e] of Object.entries(physicsMd)) expect(net.speciesData.get(name)?.bindingEnergy, name).toBe(e);
  });

  it('every ion recombines with electrons', () => {
    for (const s of net.species.filter((x) => x.charge > 0)) {
      expect(net.reactions.some((r) => r.reactants.includes(s.name) && r.reactants.includes('e-')), s.name).toBe(true);
    }
  });

  it('photorates are of the published order (memory): interstellar UV alpha 1e-12..1e-8 s^-1, gamma 1.5..3.5; induced UV 1e-17..1e-13 s^-1', () => {
    for (const r of net.reactions) {
      if (r.law === 'interstellar-uv') {
        expect(r.params.alpha).toBeGreaterThanOrEqual(1e-12);
        expect(r.params.alpha).toBeLessThanOrEqual(1e-8);
        expect(r.params.gamma).toBeGreaterThanOrEqual(1.5);
        expect(r.params.gamma).toBeLessThanOrEqual(3.5);
      }
      if (r.law === 'cosmic-ray-uv') {
        expect(r.params.alpha).toBeGreaterThanOrEqual(1e-17);
        expect(r.params.alpha).toBeLessThanOrEqual(1e-13);
      }
    }
  });

  it('every reaction names its origin: a paper (author and year), common practice or memory', () => {
    expect(net.reactions.every((r) => r.origin.length > 0)).toBe(true);
    const cited = /memory|common practice|[A-Z][a-z]+( et al\.| & [A-Z][a-z]+)? (19|20)\d\d/;
    expect(net.reactions.filter((r) => !cited.test(r.origin)).map((r) => r.origin)).toEqual([]);
    // The gas phase stays flagged as written from memory.
    expect(net.reactions.filter((r) => r.law === 'arrhenius' && !/memory/.test(r.origin))).toEqual([]);
  });
});
