/**
 * The realizations' covariance in a sightline's chi^2 (docs/uncertainty.md
 * section 4, docs/statistics.md section 2): with fit.model_uncertainty
 * spread or spread-and-floor, the model part of a sightline's covariance is
 * the sample covariance of log10 X over the realizations at its best fit,
 * off the diagonal too, and chi^2 = r^T C^-1 r (Numerical Recipes 15.4).
 */
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { fitSection } from '../../src/config/sections/fit.ts';
import type { ModelCovariance } from '../../src/fit/covariance.ts';
import { logCovariance } from '../../src/fit/model-spread.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import { detection, gaussian, logSpaced, observationSet, seededRandom, syntheticTable, denseChiSquare } from './synthetic.ts';

/**
 * Realizations of a tiny network solved in closed form: A -> B (k1) and
 * A -> C (k2), first order, x_A(0) = 1, so x_B(t) = k1/(k1+k2) (1 - e^-(k1+k2)t)
 * and x_C likewise; log10 k_i = log10 k_i,0 + eps_i log10 F_i with eps_i
 * standard normal (the log-normal factor of physics.md section 13). The
 * quantities are log10 x_B and log10 x_C at t: they covary through k1 + k2.
 */
function tinyNetworkLogs(count: number, factors: [number, number], seed: number): Float64Array[] {
  const random = seededRandom(seed);
  const t = 1e5;
  return Array.from({ length: count }, () => {
    const k1 = 1e-5 * 10 ** (gaussian(random) * Math.log10(factors[0]));
    const k2 = 3e-6 * 10 ** (gaussian(random) * Math.log10(factors[1]));
    const done = 1 - Math.exp(-(k1 + k2) * t);
    return Float64Array.of(Math.log10((k1 / (k1 + k2)) * done), Math.log10((k2 / (k1 + k2)) * done));
  });
}

const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 4), times: logSpaced(1e4, 1e7, 5) });
const KEYS = ['H2O(s)', 'CO(s)'];
const quantities = [detection('s', 'H2O(s)', -4.2, 0.1), detection('s', 'CO(s)', -4.9, 0.15)];
const section = (extra: Record<string, unknown>) => fitSection.parse({ quantities: KEYS.map((species) => ({ species, as: 'abundance' })), refine: 1, ...extra });
const fit = (extra: Record<string, unknown>, cov: ModelCovariance | undefined, q = quantities) =>
  runFitStage({ table, section: section(extra), observations: observationSet(['s']), quantities: q, ...(cov ? { sightlineModelCovariance: new Map([['s', cov]]) } : {}) }).result.fits[0];

describe("the realizations' covariance in a sightline's chi^2", () => {
  const logs = tinyNetworkLogs(200, [3, 2], 11);
  const matrix = logCovariance(logs);
  const cov: ModelCovariance = { keys: KEYS, matrix };

  it('the tiny network gives two quantities that covary (a check that the test can fail)', () => {
    const rho = matrix[1] / Math.sqrt(matrix[0] * matrix[3]);
    expect(Math.abs(rho)).toBeGreaterThan(0.2);
    expect(matrix[0]).toBeGreaterThan(0.01);
  });

  it('spread: chi^2 of the best fit equals r^T C^-1 r with C = observational variance + the full realization covariance (dense solve)', () => {
    const f = fit({ model_uncertainty: 'spread', model_sigma_dex: 0.3 }, cov);
    const r = f.residuals.map((x) => x.residualDex);
    const c = [
      [0.1 ** 2 + matrix[0], matrix[1]],
      [matrix[2], 0.15 ** 2 + matrix[3]],
    ];
    expect(f.best.chi2).toBeCloseTo(denseChiSquare(c, r), 10);
    // Not the diagonal reading: the off-diagonal term changes chi^2.
    expect(f.best.chi2).not.toBeCloseTo(r[0] ** 2 / c[0][0] + r[1] ** 2 / c[1][1], 4);
  });

  it('spread-and-floor: the floor squared joins the diagonal', () => {
    const f = fit({ model_uncertainty: 'spread-and-floor', model_sigma_dex: 0.3 }, cov);
    const r = f.residuals.map((x) => x.residualDex);
    const c = [
      [0.1 ** 2 + matrix[0] + 0.09, matrix[1]],
      [matrix[2], 0.15 ** 2 + matrix[3] + 0.09],
    ];
    expect(f.best.chi2).toBeCloseTo(denseChiSquare(c, r), 10);
  });

  it('floor (the default) ignores the realizations\' covariance', () => {
    expect(fit({ model_sigma_dex: 0.3 }, cov)).toEqual(fit({ model_sigma_dex: 0.3 }, undefined));
  });

  it('with F = 1 (zero spread, zero covariance) spread-and-floor equals the floor fit', () => {
    const flat = logCovariance(tinyNetworkLogs(20, [1, 1], 5));
    expect(Math.max(...flat.map(Math.abs))).toBe(0);
    expect(fit({ model_uncertainty: 'spread-and-floor', model_sigma_dex: 0.3 }, { keys: KEYS, matrix: flat })).toEqual(fit({ model_sigma_dex: 0.3 }, undefined));
  });

  it('a detection with zero error and zero spread is a clear error, not a RangeError', () => {
    const zero = [detection('s', 'H2O(s)', -4.2, 0), detection('s', 'CO(s)', -4.9, 0.15)];
    const flat: ModelCovariance = { keys: KEYS, matrix: new Float64Array(4) };
    const run = () => fit({ model_uncertainty: 'spread', model_sigma_dex: 0.3 }, flat, zero);
    expect(run).toThrow(UserError);
    expect(run).toThrow(/sightline s: .*X\(H2O\(s\)\).* no width/);
    // The same with the diagonal spread alone.
    const diag = () =>
      runFitStage({ table, section: section({ model_uncertainty: 'spread', model_sigma_dex: 0.3 }), observations: observationSet(['s']), quantities: zero, modelSpread: new Map([['s', new Map(KEYS.map((k) => [k, 0]))]]) });
    expect(diag).toThrow(UserError);
  });

  it('zero errors on two detections that move together in every realization (a singular covariance) are a clear error', () => {
    const zero = [detection('s', 'H2O(s)', -4.2, 0), detection('s', 'CO(s)', -4.9, 0)];
    // Perfectly correlated: log10 x_C = log10 x_B + const in each realization (rank 1).
    const tied: ModelCovariance = { keys: KEYS, matrix: Float64Array.of(0.04, 0.04, 0.04, 0.04) };
    const run = () => fit({ model_uncertainty: 'spread', model_sigma_dex: 0.3 }, tied, zero);
    expect(run).toThrow(UserError);
    expect(run).toThrow(/sightline s: .*singular/);
    // With the floor on the diagonal the same covariance is positive definite and the fit runs.
    expect(fit({ model_uncertainty: 'spread-and-floor', model_sigma_dex: 0.3 }, tied, zero).best.chi2).toBeGreaterThanOrEqual(0);
  });
});

describe("a joint group's shared model error from the realizations", () => {
  // Each realization draws every rate once for all sightlines (physics.md section 13), so the members' model values covary across sightlines: the tiny network at two ages.
  function memberLogs(count: number, seed: number, t: number): Float64Array[] {
    const random = seededRandom(seed);
    return Array.from({ length: count }, () => {
      const k1 = 1e-5 * 10 ** (gaussian(random) * Math.log10(3));
      const k2 = 3e-6 * 10 ** (gaussian(random) * Math.log10(2));
      const done = 1 - Math.exp(-(k1 + k2) * t);
      return Float64Array.of(Math.log10((k1 / (k1 + k2)) * done), Math.log10((k2 / (k1 + k2)) * done));
    });
  }
  const members = ['a', 'b'];
  const ids = Array.from({ length: 60 }, (_, r) => r);
  // Same seed: the same draws of k1, k2 in realization r for both members.
  const logsOf = new Map([
    ['a', { keys: KEYS, realizations: ids, values: memberLogs(60, 21, 3e4) }],
    ['b', { keys: KEYS, realizations: ids, values: memberLogs(60, 21, 3e5) }],
  ]);
  const q = [detection('a', 'H2O(s)', -4.2, 0.1), detection('a', 'CO(s)', -4.9, 0.15), detection('b', 'H2O(s)', -4.1, 0.1), detection('b', 'CO(s)', -4.7, 0.12)];
  const jointSection = (mode: string) =>
    fitSection.parse({ quantities: KEYS.map((species) => ({ species, as: 'abundance' })), refine: 1, model_uncertainty: mode, model_sigma_dex: 0.3, joint: [{ name: 'g', sightlines: 'all', share: ['density', 'age_yr'] }] });

  const ownCovariance = new Map([...logsOf].map(([id, l]) => [id, { keys: KEYS, matrix: logCovariance(l.values) }]));

  it('without realizations between members, spread-and-floor keeps the members\' own widths (spread and floor) and the floor\'s shared part between them', () => {
    const j = runFitStage({ table, section: jointSection('spread-and-floor'), observations: observationSet(members), quantities: q, sightlineModelCovariance: ownCovariance }).result.joint[0];
    const candidate = j.memberFits[0].best.modelIndex * table.nTimes + j.memberFits[0].best.timeIndex;
    const r = q.map((x) => Math.log10(table.abundances[candidate * table.nSpecies + table.species.indexOf(x.numerator)]) - x.log10);
    const shared2 = (0.3 / Math.SQRT2) ** 2;
    const c = q.map((x, a) =>
      q.map((y, b) => {
        if (x.sightline === y.sightline) {
          const m = ownCovariance.get(x.sightline)!.matrix;
          return m[KEYS.indexOf(x.numerator) * 2 + KEYS.indexOf(y.numerator)] + (a === b ? x.sigmaLoDex ** 2 + 0.09 : 0);
        }
        return x.numerator === y.numerator ? shared2 : 0;
      }),
    );
    expect(j.chi2).toBeCloseTo(denseChiSquare(c, r), 9);
  });

  it('without realizations between members, spread has no floor to share: the group\'s chi^2 is the sum of the members\' own', () => {
    const j = runFitStage({ table, section: jointSection('spread'), observations: observationSet(members), quantities: q, sightlineModelCovariance: ownCovariance }).result.joint[0];
    expect(j.chi2).toBeCloseTo(j.memberFits.reduce((sum, m) => sum + m.chi2, 0), 10);
  });

  it('a member without realizations: the group says what it fell back to', () => {
    const out = runFitStage({ table, section: jointSection('spread'), observations: observationSet(members), quantities: q, sightlineModelCovariance: ownCovariance, realizationLogs: new Map([['a', logsOf.get('a')!]]) }).result;
    expect(out.warnings.join('\n')).toMatch(/joint group g: no realizations at the best fit of b: no model error is shared/);
    expect(out.joint[0].chi2).toBeCloseTo(out.joint[0].memberFits.reduce((sum, m) => sum + m.chi2, 0), 10);
  });

  it("a group far below its dof says that the realizations, not the floor, set the shared error", () => {
    // Both members observed exactly at one candidate: chi^2 = 0, p = 1.
    const c = 1 * table.nTimes + 2;
    const exact = members.flatMap((id) => KEYS.map((k) => detection(id, k, Math.log10(table.abundances[c * table.nSpecies + table.species.indexOf(k)]), 0.1)));
    const j = runFitStage({ table, section: jointSection('spread'), observations: observationSet(members), quantities: exact, sightlineModelCovariance: ownCovariance, realizationLogs: logsOf }).result.joint[0];
    const text = j.warnings.join('\n');
    expect(text).toMatch(/far below its dof/);
    expect(text).toMatch(/realizations/);
    expect(text).not.toMatch(/Of the floor/);
  });

  for (const mode of ['spread', 'spread-and-floor'] as const) {
    it(`${mode}: the group's chi^2 equals the dense r^T C^-1 r with the realizations' covariance between and within members`, () => {
      const sightlineModelCovariance = new Map([...logsOf].map(([id, l]) => [id, { keys: KEYS, matrix: logCovariance(l.values) }]));
      const out = runFitStage({ table, section: jointSection(mode), observations: observationSet(members), quantities: q, sightlineModelCovariance, realizationLogs: logsOf });
      const j = out.result.joint[0];
      // Both members share density and age: one candidate.
      const candidate = j.memberFits[0].best.modelIndex * table.nTimes + j.memberFits[0].best.timeIndex;
      const nS = table.nSpecies;
      const r = q.map((x) => Math.log10(table.abundances[candidate * nS + table.species.indexOf(x.numerator)]) - x.log10);
      const all = ids.map((k) => Float64Array.of(...logsOf.get('a')!.values[k], ...logsOf.get('b')!.values[k]));
      const model = logCovariance(all);
      const floor2 = mode === 'spread-and-floor' ? 0.09 : 0;
      const shared2 = mode === 'spread-and-floor' ? (0.3 / Math.SQRT2) ** 2 : 0;
      const c = q.map((x, a) =>
        q.map((y, b) => {
          let v = model[a * 4 + b];
          if (a === b) v += x.sigmaLoDex ** 2 + floor2;
          else if (x.sightline !== y.sightline && x.numerator === y.numerator) v += shared2;
          return v;
        }),
      );
      expect(j.chi2).toBeCloseTo(denseChiSquare(c, r), 9);
      // The cross-member covariance matters here: without it (each member alone) chi^2 differs.
      expect(j.chi2).not.toBeCloseTo(j.memberFits.reduce((s, m) => s + m.chi2, 0), 3);
    });
  }
});
