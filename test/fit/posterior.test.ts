/**
 * The posterior reading (src/fit/posterior.ts) against a closed form: a
 * linear-Gaussian model, log10 X_j = a_j + J_j1 u1 + J_j2 u2 with u1 = log10
 * density and u2 = log10 age, Gaussian errors sigma_j, priors uniform in u1
 * and u2. The posterior is then Gaussian with covariance (J^T W J)^-1, W =
 * diag(1/sigma_j^2), centred on the least-squares solution (any statistics
 * text; e.g. Numerical Recipes 15.4, the covariance of linear least squares).
 * On a fine grid (0.02 dex) the marginal means, widths and equal-tailed
 * 68.3% intervals must match it.
 */
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import type { CandidateTable } from '../../src/fit/types.ts';
import { detection, observationSet } from './synthetic.ts';

const J = [
  [1, 0.5],
  [0.3, -1],
  [-0.8, 0.2],
];
const A = [-10, -6, -3];
const SIGMA = [0.1, 0.15, 0.12];
const TRUTH = [4, 5.5];

function linearTable(): CandidateTable {
  const u1 = Array.from({ length: 201 }, (_, i) => 2 + 0.02 * i);
  const u2 = Array.from({ length: 151 }, (_, i) => 4 + 0.02 * i);
  const nS = 3;
  const abundances = new Float64Array(u1.length * u2.length * nS);
  u1.forEach((a, m) =>
    u2.forEach((b, t) => {
      for (let j = 0; j < nS; j++) abundances[(m * u2.length + t) * nS + j] = Math.pow(10, A[j] + J[j][0] * a + J[j][1] * b);
    }),
  );
  return {
    parameterNames: ['density'],
    nModels: u1.length,
    nTimes: u2.length,
    nSpecies: nS,
    parameters: Float64Array.from(u1, (a) => 10 ** a),
    modelIds: u1.map((_, i) => `m${i}`),
    timesYr: Float64Array.from(u2, (b) => 10 ** b),
    species: ['A', 'B', 'C'],
    abundances,
  };
}

describe('posterior of a linear-Gaussian model', () => {
  it('marginal means, standard deviations and equal-tailed 68.3% intervals match the closed form', () => {
    // F = J^T W J; covariance = F^-1 (2 x 2, inverted by hand below).
    const f = [0, 0, 0, 0];
    J.forEach((row, j) => {
      const w = 1 / SIGMA[j] ** 2;
      f[0] += w * row[0] * row[0];
      f[1] += w * row[0] * row[1];
      f[3] += w * row[1] * row[1];
    });
    f[2] = f[1];
    const det = f[0] * f[3] - f[1] * f[2];
    const sd = [Math.sqrt(f[3] / det), Math.sqrt(f[0] / det)];
    const q = ['A', 'B', 'C'].map((s, j) => detection('s', s, A[j] + J[j][0] * TRUTH[0] + J[j][1] * TRUTH[1], SIGMA[j]));
    const section = fitSection.parse({ quantities: [{ species: 'A', as: 'abundance' }], model_sigma_dex: 0, refine: 1 });
    const { result } = runFitStage({ table: linearTable(), section, observations: observationSet(['s']), quantities: q });
    const post = result.fits[0].posterior!;
    expect(post.priors).toEqual(['uniform in log10 density', 'uniform in log10 age_yr']);
    ['density', 'age_yr'].forEach((name, k) => {
      const m = post.marginals.find((x) => x.parameter === name)!;
      expect(m.meanLog!).toBeCloseTo(TRUTH[k], 3);
      // A grid of 0.02 dex adds its own variance (h^2/12 = 3.3e-5) to a width of about 0.1: within 1 %.
      expect(Math.abs(m.sdLog! / sd[k] - 1)).toBeLessThan(0.01);
      const iv = post.intervals.find((x) => x.parameter === name && x.level === 0.683)!;
      // Equal-tailed 68.3%: mean -+ z sd with z = 1.0006 (NIST/SEMATECH normal table: Phi(1.00) = 0.84134).
      expect(Math.log10(iv.lo)).toBeCloseTo(TRUTH[k] - 1.0006 * sd[k], 2);
      expect(Math.log10(iv.hi)).toBeCloseTo(TRUTH[k] + 1.0006 * sd[k], 2);
      expect(iv.hdiDisjoint).toBe(false);
    });
    // The 2-D marginal sums to 1.
    expect(post.pairs[0].probability.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 12);
  });

  it('a joint group of two members with the same data: the posterior over the shared values is 1/sqrt(2) as wide', () => {
    const f = [0, 0, 0];
    J.forEach((row, j) => {
      const w = 1 / SIGMA[j] ** 2;
      f[0] += w * row[0] * row[0];
      f[1] += w * row[0] * row[1];
      f[2] += w * row[1] * row[1];
    });
    const sdDensity = Math.sqrt(f[2] / (f[0] * f[2] - f[1] * f[1]));
    const q = ['a', 'b'].flatMap((id) => ['A', 'B', 'C'].map((s, j) => detection(id, s, A[j] + J[j][0] * TRUTH[0] + J[j][1] * TRUTH[1], SIGMA[j])));
    const section = fitSection.parse({ quantities: [{ species: 'A', as: 'abundance' }], model_sigma_dex: 0, refine: 1, joint: [{ name: 'pair', sightlines: 'all', share: ['density', 'age_yr'] }] });
    const { result } = runFitStage({ table: linearTable(), section, observations: observationSet(['a', 'b']), quantities: q });
    const m = result.joint[0].posterior!.marginals.find((x) => x.parameter === 'density')!;
    expect(m.meanLog!).toBeCloseTo(TRUTH[0], 3);
    expect(Math.abs(m.sdLog! / (sdDensity / Math.SQRT2) - 1)).toBeLessThan(0.02);
  });
});
