/**
 * Rate-coefficient uncertainty factors and their Monte Carlo realizations
 * (docs/uncertainty.md; physics.md section 13; Wakelam et al. 2005, 2006, 2010).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { UserError, UserErrors } from '../../src/config/errors.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { checkNetwork, formatReport } from '../../src/chem/network-check.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { DEFAULT_UNCERTAINTY_FACTORS, drawRateFactors, standardNormalDraw, uncertaintyFactor } from '../../src/chem/uncertainty.ts';
import { RATE_LAW_NAMES } from '../../src/chem/laws.ts';
import type { Network } from '../../src/chem/network-types.ts';
import { logRealizations, logSpread } from '../../src/fit/model-spread.ts';
import { rankReactions } from '../../src/fit/sensitivity.ts';
import { runModel } from '../../src/model/run.ts';
import { makeNetwork } from '../model/fixtures.ts';
import { scratch } from '../support/scratch.ts';

const solver = { rtol: 1e-10, atol: 1e-30, maxSteps: 20000 };
/** zeta = zeta_0, so a cosmic-ray law's k is its alpha (physics.md section 1). */
const conditions = { ...defaultConditions(), cr_ionisation_rate: 1.3e-17 };

function withFactors(net: Network, factors: number[]): Network {
  return { ...net, reactions: net.reactions.map((r, i) => ({ ...r, uncertaintyFactor: factors[i] })) };
}

/** Realizations run in this process: x[r] is the abundance row-major [time][species]. */
function realize(net: Network, initial: Record<string, number>, timesYr: Float64Array, count: number, seed = 7) {
  const runs = Array.from({ length: count }, (_, r) => runModel({ network: net, conditions, grain: DEFAULT_GRAIN_OPTIONS, initial, timesYr, solver, rateDraw: { seed, realization: r } }));
  for (const run of runs) expect(run.status).toBe('ok');
  return { runs, epsilon: runs.map((_, r) => drawRateFactors(net, { seed, realization: r }).epsilon) };
}

function sampleSd(v: ArrayLike<number>): number {
  const n = v.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += v[i] / n;
  let s = 0;
  for (let i = 0; i < n; i++) s += (v[i] - m) ** 2;
  return Math.sqrt(s / (n - 1));
}

describe('the uncertainty factor of a reaction', () => {
  it('defaults by law, each default with its origin, and F >= 1', () => {
    for (const law of RATE_LAW_NAMES) {
      expect(DEFAULT_UNCERTAINTY_FACTORS[law].factor).toBeGreaterThanOrEqual(1);
      expect(DEFAULT_UNCERTAINTY_FACTORS[law].origin.length).toBeGreaterThan(10);
    }
    const net = makeNetwork([{ reactants: ['HNC'], products: ['HCN'], law: 'cosmic-ray', params: { alpha: 1e-12 } }]);
    expect(uncertaintyFactor(net.reactions[0])).toBe(DEFAULT_UNCERTAINTY_FACTORS['cosmic-ray'].factor);
    expect(uncertaintyFactor(withFactors(net, [1.25]).reactions[0])).toBe(1.25);
  });

  it('draws a standard normal deviate that depends on (seed, realization, reaction) alone', () => {
    expect(standardNormalDraw(1, 2, 3)).toBe(standardNormalDraw(1, 2, 3));
    expect(standardNormalDraw(1, 2, 3)).not.toBe(standardNormalDraw(1, 2, 4));
    expect(standardNormalDraw(1, 2, 3)).not.toBe(standardNormalDraw(2, 2, 3));
    // Moments of 20000 draws against N(0, 1): mean 0 +- 5 sigma/sqrt(n), variance 1 +- 5 sqrt(2/n) (common practice).
    const n = 20000;
    const eps = Float64Array.from({ length: n }, (_, i) => standardNormalDraw(11, i, 0));
    const mean = eps.reduce((a, b) => a + b, 0) / n;
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(sampleSd(eps) ** 2 - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
    // One-sigma share: Phi(1) - Phi(-1) = 0.6827 (any normal table), +- 5 binomial sigmas.
    const inside = eps.filter((e) => Math.abs(e) < 1).length / n;
    expect(Math.abs(inside - 0.6827)).toBeLessThan(5 * Math.sqrt((0.68 * 0.32) / n));
  });

  it('multiplies k by F^eps: log10 k\' = log10 k + eps log10 F', () => {
    const net = withFactors(makeNetwork([{ reactants: ['HNC'], products: ['HCN'], law: 'cosmic-ray', params: { alpha: 1e-12 } }]), [3]);
    const nominal = computeRates(net, conditions, DEFAULT_GRAIN_OPTIONS).rates[0].k;
    const { epsilon, multipliers } = drawRateFactors(net, { seed: 5, realization: 0 });
    const drawn = computeRates(net, conditions, DEFAULT_GRAIN_OPTIONS, { multipliers }).rates[0].k;
    expect(Math.log10(drawn) - Math.log10(nominal)).toBeCloseTo(epsilon[0] * Math.log10(3), 12);
  });
});

describe('a single first-order step A -> B, k log-normal with factor F', () => {
  // HNC -> HCN stands for A -> B (one atom set, so elements are conserved).
  const F = 3;
  const k = 1e-12; // s^-1
  const net = withFactors(makeNetwork([{ reactants: ['HNC'], products: ['HCN'], law: 'cosmic-ray', params: { alpha: k } }]), [F]);
  const early = 1e-3 / (k * YEAR_SECONDS); // k t = 1e-3 (years)
  const late = 5000 / (k * YEAR_SECONDS); // k t = 5000: even at eps = -3.5, k t = 5000 F^-3.5 > 100
  const timesYr = Float64Array.of(early, late);
  const { runs, epsilon } = realize(net, { HNC: 1e-4 }, timesYr, 200);
  const iB = runs[0].species.indexOf('HCN');
  const logs = logRealizations(runs.map((r) => r.abundances));
  const spread = logSpread(logs);
  const nSpecies = runs[0].species.length;

  it('early (x_B = x_A k t): the spread of log10 x_B is log10 F times the sample spread of eps (exact), and log10 F within sampling error', () => {
    const eps = epsilon.map((e) => e[0]);
    // x_B = x_A0 (1 - exp(-k t)): the departure from k t at k t = F^3 1e-3 is below 1e-2 in x_B, so allow 2e-3 in the ratio of spreads.
    expect(spread.sd[0 * nSpecies + iB] / (Math.log10(F) * sampleSd(eps))).toBeCloseTo(1, 2);
    // Realization by realization: log10 x_B - log10 (x_A0 k t) = eps log10 F + log10((1 - e^-kt')/(k't)).
    runs.forEach((run, r) => {
      const kt = k * F ** eps[r] * early * YEAR_SECONDS;
      const exact = Math.log10(1e-4 * (1 - Math.exp(-kt)));
      expect(logs[r][iB]).toBeCloseTo(exact, 6);
    });
    // Sampling: the sd of 200 normal draws is within 5 x sd/sqrt(2(n-1)) of the true one.
    expect(Math.abs(spread.sd[iB] - Math.log10(F))).toBeLessThan((5 * Math.log10(F)) / Math.sqrt(2 * 199));
  });

  it('late (all of A turned into B): the spread goes to 0', () => {
    expect(spread.sd[1 * nSpecies + iB]).toBeLessThan(1e-9);
    expect(spread.sd[0 * nSpecies + iB]).toBeGreaterThan(0.3);
  });
});

describe('a chain A -> B -> C with one slow step', () => {
  // HNC -> HCN fast (k1 t = 1e3 at the output), HCN -> CNH slow (k2 t = 1e-3): x_C = x_A0 k2 t, set by the slow step alone.
  const k1 = 1e-8;
  const k2 = 1e-14;
  const t = 1e3 / (k1 * YEAR_SECONDS);
  const net = withFactors(
    makeNetwork([
      { reactants: ['HNC'], products: ['HCN'], law: 'cosmic-ray', params: { alpha: k1 } },
      { reactants: ['HCN'], products: ['CNH'], law: 'cosmic-ray', params: { alpha: k2 } },
    ]),
    [2, 2],
  );

  it('ranks the slow step first for C with correlation near 1 (Pearson, as Wakelam et al. 2010; Spearman too)', () => {
    const { runs, epsilon } = realize(net, { HNC: 1e-4 }, Float64Array.of(t), 40);
    const iC = runs[0].species.indexOf('CNH');
    const logC = logRealizations(runs.map((r) => r.abundances)).map((l) => l[iC]);
    for (const method of ['pearson', 'spearman'] as const) {
      const ranked = rankReactions(epsilon, logC, method);
      expect(ranked[0].reaction).toBe(1);
      expect(ranked[0].coefficient).toBeGreaterThan(0.999);
      expect(Math.abs(ranked[1].coefficient)).toBeLessThan(0.5);
    }
  });
});

describe('F = 1 everywhere', () => {
  it('gives every realization the nominal model, bit for bit (spread 0)', () => {
    const net = withFactors(
      makeNetwork([
        { reactants: ['HNC'], products: ['HCN'], law: 'cosmic-ray', params: { alpha: 1e-12 } },
        { reactants: ['HCN'], products: ['CNH'], law: 'cosmic-ray', params: { alpha: 1e-13 } },
      ]),
      [1, 1],
    );
    const timesYr = Float64Array.of(1e3, 1e5, 1e7);
    const nominal = runModel({ network: net, conditions, grain: DEFAULT_GRAIN_OPTIONS, initial: { HNC: 1e-4 }, timesYr, solver });
    const { runs } = realize(net, { HNC: 1e-4 }, timesYr, 3);
    for (const run of runs) expect(Buffer.from(run.abundances.buffer).equals(Buffer.from(nominal.abundances.buffer))).toBe(true);
    const s = logSpread(logRealizations(runs.map((r) => r.abundances)));
    expect(Math.max(...s.sd)).toBe(0);
  });
});

describe('uncertainty factors in network files', () => {
  const yaml = (factor: string) => `format: hoarfrost-network 1
name: f-test
reactions:
  - {reactants: [HNC], products: [HCN], law: cosmic-ray, alpha: 1.0e-12, uncertainty_factor: ${factor}}
  - {reactants: [HCN], products: [CNH], law: cosmic-ray, alpha: 1.0e-13}
`;

  it('reads uncertainty_factor from a YAML network, and network check lists the reactions left at a default', () => {
    const dir = scratch('hoarfrost-unc-');
    const file = join(dir, 'n.yaml');
    writeFileSync(file, yaml('1.25'));
    const net = loadNetwork(file);
    expect(net.reactions[0].uncertaintyFactor).toBe(1.25);
    expect(net.reactions[1].uncertaintyFactor).toBeUndefined();
    const report = checkNetwork(net);
    expect(report.uncertainty.given).toBe(1);
    expect(report.uncertainty.atDefault).toEqual([expect.objectContaining({ law: 'cosmic-ray', count: 1, reactions: [1], factor: DEFAULT_UNCERTAINTY_FACTORS['cosmic-ray'].factor })]);
    expect(formatReport(report)).toMatch(/uncertainty factors: 1 given, 1 left at their law's default/);
  });

  it('refuses a factor below 1 with the file, line and field', () => {
    const dir = scratch('hoarfrost-unc-');
    const file = join(dir, 'n.yaml');
    writeFileSync(file, yaml('0.5'));
    let error: unknown;
    try {
      loadNetwork(file);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(UserError);
    const problem = error instanceof UserErrors ? error.problems[0] : (error as UserError);
    expect(problem.message).toMatch(/uncertainty factor must be a number of at least 1.*found 0.5/);
    expect(problem.location).toMatchObject({ file, line: 4, field: 'reactions[0].uncertainty_factor' });
  });

  it('maps a table column to the factor; an empty cell keeps the default', () => {
    const dir = scratch('hoarfrost-unc-');
    writeFileSync(join(dir, 't.csv'), 'r1,p1,a,f\nHNC,HCN,1e-12,1.5\nHCN,CNH,1e-13,\n');
    writeFileSync(
      join(dir, 't.mapping.yaml'),
      `format: hoarfrost-network-table 1
name: t
law: cosmic-ray
columns: {reactants: [r1], products: [p1], parameters: {alpha: a}, uncertainty_factor: f}
`,
    );
    const net = loadNetwork(join(dir, 't.csv'));
    expect(net.reactions.map((r) => r.uncertaintyFactor)).toEqual([1.5, undefined]);
    writeFileSync(join(dir, 't.csv'), 'r1,p1,a,f\nHNC,HCN,1e-12,two\n');
    expect(() => loadNetwork(join(dir, 't.csv'))).toThrow(/expected a number for the uncertainty factor F.*'two'/);
  });
});

describe('the chance level of a correlation coefficient', () => {
  it('is tanh(z / sqrt(N - 3)) with the Bonferroni quantile (Fisher 1915; z(0.975) = 1.959964 from any normal table)', async () => {
    const { chanceCoefficient } = await import('../../src/fit/sensitivity.ts');
    expect(chanceCoefficient(103, 1)).toBeCloseTo(Math.tanh(1.959964 / 10), 4);
    // Ten tests: z(1 - 0.0025) = 2.807034 (normal table).
    expect(chanceCoefficient(103, 10)).toBeCloseTo(Math.tanh(2.807034 / 10), 4);
    expect(chanceCoefficient(3, 10)).toBeNaN();
    // Deep tail: Phi^-1(1e-6) = -4.753424 (normal table; what the Bonferroni bound of many reactions reaches).
    const { lowerNormalQuantile } = await import('../../src/fit/normal.ts');
    expect(lowerNormalQuantile(1e-6)).toBeCloseTo(-4.753424, 5);
    expect(lowerNormalQuantile(0.5)).toBeCloseTo(0, 6);
    expect(chanceCoefficient(1000, 894)).toBeLessThan(chanceCoefficient(100, 894));
  });
});
