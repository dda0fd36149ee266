/** One model run: analytic freeze-out, output times, initial compositions, failure status. */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { UserError } from '../../src/config/errors.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import { makeNetwork } from './fixtures.ts';
import { scratch } from '../support/scratch.ts';

const solver = { rtol: 1e-8, atol: 1e-25, maxSteps: 20000 };

describe('CO freeze-out and thermal desorption (analytic)', () => {
  // A dust temperature where evaporation and freeze-out are comparable, so both matter.
  const conditions = { ...defaultConditions(), dust_temperature: 20, density: 1e4 };
  const net = makeNetwork(
    [
      { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' },
      { reactants: ['CO(s)'], products: ['CO'], law: 'thermal-desorption' },
    ],
    { CO: { bindingEnergy: 1150 } }, // E_D/k_B of CO, K: physics.md section 4 (memory)
  );
  it('matches y(t) = y_ss + (y0 - y_ss) exp(-(k_acc + k_evap) t) (linear ODE, common practice)', () => {
    const rates = computeRates(net, conditions, DEFAULT_GRAIN_OPTIONS).rates;
    const kAcc = rates[0].k;
    const kEvap = rates[1].k;
    expect(kEvap / kAcc).toBeGreaterThan(0.05);
    expect(kEvap / kAcc).toBeLessThan(20);
    const y0 = 1e-4;
    const timesYr = outputTimesYr(1e2, 1e7, 21);
    const result = runModel({ network: net, conditions, grain: DEFAULT_GRAIN_OPTIONS, initial: { CO: y0 }, timesYr, solver });
    expect(result.status).toBe('ok');
    const ySs = (y0 * kEvap) / (kAcc + kEvap);
    const iCO = result.species.indexOf('CO');
    let worst = 0;
    timesYr.forEach((t, k) => {
      const exact = ySs + (y0 - ySs) * Math.exp(-(kAcc + kEvap) * t * YEAR_SECONDS);
      worst = Math.max(worst, Math.abs(result.abundances[k * 2 + iCO] / exact - 1));
    });
    expect(worst).toBeLessThan(1e-5);
    expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-10);
    expect(result.stats.steps).toBeGreaterThan(0);
  });
});

describe('outputTimesYr', () => {
  it('spaces times evenly in log t and keeps both ends exactly', () => {
    const t = outputTimesYr(1e3, 1e7, 5);
    expect(Array.from(t)).toEqual([1e3, 1e4, 1e5, 1e6, 1e7].map((v, i) => (i === 0 || i === 4 ? v : expect.closeTo(v, 6))));
    expect(() => outputTimesYr(1e3, 1e2, 5)).toThrow(UserError);
    expect(() => outputTimesYr(0, 1e2, 5)).toThrow(UserError);
  });
});

describe('loadInitialComposition', () => {
  const net = makeNetwork([
    { reactants: ['C+', 'e-'], products: ['C'], law: 'arrhenius', params: { alpha: 1e-11 } },
    { reactants: ['H2'], products: ['H2+', 'e-'], law: 'cosmic-ray', params: { alpha: 1 } },
    { reactants: ['O', 'He'], products: ['O', 'He'], law: 'arrhenius', params: { alpha: 0 } },
    { reactants: ['N', 'S+'], products: ['N', 'S+'], law: 'arrhenius', params: { alpha: 0 } },
    { reactants: ['Si+', 'Fe+'], products: ['Si+', 'Fe+'], law: 'arrhenius', params: { alpha: 0 } },
    { reactants: ['Na+', 'Mg+'], products: ['Na+', 'Mg+'], law: 'arrhenius', params: { alpha: 0 } },
    { reactants: ['Cl+', 'P+'], products: ['Cl+', 'P+'], law: 'arrhenius', params: { alpha: 0 } },
  ]);
  it('reads the low-metal preset (physics.md section 4, memory) and balances the ions with electrons', () => {
    const x = loadInitialComposition('low-metal', '.', net);
    expect(x.H2).toBe(0.5);
    expect(x['C+']).toBe(7.3e-5);
    expect(x.O).toBe(1.76e-4);
    const ions = 7.3e-5 + 8e-8 + 8e-9 + 3e-9 + 2e-9 + 7e-9 + 1e-9 + 2e-10;
    expect(x['e-'] / ions).toBeCloseTo(1, 12);
  });
  it('takes an explicit mapping and a file path relative to the base folder', () => {
    expect(loadInitialComposition({ H2: 0.5, 'C+': 1e-4, 'e-': 1e-4 }, '.', net)).toEqual({ H2: 0.5, 'C+': 1e-4, 'e-': 1e-4 });
    const dir = scratch('hoarfrost-initial-');
    writeFileSync(join(dir, 'mine.yaml'), 'format: hoarfrost-initial 1\nabundances:\n  H2: 0.5\n  C+: { value: 2.0e-4, origin: test }\n');
    expect(loadInitialComposition('mine.yaml', dir, net)).toEqual({ H2: 0.5, 'C+': 2e-4, 'e-': 2e-4 });
  });
  it('names the species the network lacks, with file and line', () => {
    const small = makeNetwork([{ reactants: ['H2'], products: ['H2+', 'e-'], law: 'cosmic-ray', params: { alpha: 1 } }]);
    let err: unknown;
    try {
      loadInitialComposition('low-metal', '.', small);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(UserError);
    expect((err as Error).message).toMatch(/low-metal\.yaml:\d+.*'He'.*does not have/s);
    expect((err as Error).message).toMatch(/'C\+'/);
  });
  it('drops an optional trace species the network lacks, with a note', () => {
    const noPhosphorus = makeNetwork(net.reactions.filter((r) => !r.reactants.includes('P+')).map((r) => ({ reactants: r.reactants, products: r.products, law: r.law, params: r.params })), {}, ['Cl+']);
    const notes: string[] = [];
    const x = loadInitialComposition('low-metal', '.', noPhosphorus, notes);
    expect(x['P+']).toBeUndefined();
    expect(x['Cl+']).toBe(1e-9);
    expect(notes).toEqual([expect.stringMatching(/no P\+; this optional trace species/)]);
    expect(x['e-'] / (7.3e-5 + 8e-8 + 8e-9 + 3e-9 + 2e-9 + 7e-9 + 1e-9)).toBeCloseTo(1, 12);
  });
  it('rejects an unknown preset by listing the known ones', () => {
    expect(() => loadInitialComposition('nonexistent-preset', '.', net)).toThrow(/Known presets: .*low-metal/);
  });
});

describe('runModel status', () => {
  it('reports a solver that runs out of steps as a failure, without throwing', () => {
    const net = makeNetwork([
      { reactants: ['CO'], products: ['CO(s)'], law: 'accretion' },
      { reactants: ['CO(s)'], products: ['CO'], law: 'thermal-desorption' },
    ], { CO: { bindingEnergy: 1150 } }); // physics.md section 4 (memory)
    const result = runModel({
      network: net,
      conditions: { ...defaultConditions(), dust_temperature: 20 },
      grain: DEFAULT_GRAIN_OPTIONS,
      initial: { CO: 1e-4 },
      timesYr: outputTimesYr(1e2, 1e7, 11),
      solver: { rtol: 1e-8, atol: 1e-25, maxSteps: 3 },
    });
    expect(result.status).toBe('failed');
    expect(result.failure).toMatch(/solver stopped/);
    expect(Number.isNaN(result.abundances[result.abundances.length - 1])).toBe(true);
  });
});
