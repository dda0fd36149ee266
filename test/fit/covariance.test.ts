/**
 * The generalised chi^2 r^T C^-1 r (src/fit/covariance.ts; Numerical Recipes
 * 15.4 and 2.9): a hand-worked 3 x 3 case, SciPy's multivariate normal
 * log-density (scipy.stats.multivariate_normal: -2 logpdf = chi^2 + n ln 2 pi
 * + ln det C), the plain sum to the last bit when C is diagonal, ratios and
 * abundances that carry the same information giving the same chi^2, and the
 * shared model error of a joint group against a dense solve.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { choleskyLower, whitenedChiSquare } from '../../src/fit/covariance.ts';
import { buildModelQuantities, collectTerms } from '../../src/fit/model-quantities.ts';
import { buildObservationVector, detectionCovariance } from '../../src/fit/observation-vector.ts';
import { scoreCandidates } from '../../src/fit/score.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import type { ObservedQuantity } from '../../src/obs/types.ts';
import { needReference, PYTHON, SCIPY } from '../support/references.ts';
import { analyticAbundances, detection, gaussian, logSpaced, observationSet, seededRandom, SPECIES, syntheticTable, denseChiSquare } from './synthetic.ts';

/** A detection with its error parts, as the observations room derives them: sigma_j per column, ratio references with sign -1. */
function withParts(id: string, num: string, log10: number, sigmas: Record<string, number>, den?: string): ObservedQuantity {
  const s = den ? Math.hypot(sigmas[num], sigmas[den]) : sigmas[num];
  return {
    ...detection(id, num, log10, s, den),
    errorParts: [{ source: num, dex: sigmas[num], sign: 1 as const }, ...(den ? [{ source: den, dex: sigmas[den], sign: -1 as const }] : [])],
  };
}

describe('generalised chi-square', () => {
  it('a hand-worked 3 x 3 case: C = L L^T with L = [[2,0,0],[1,1,0],[0,1,1]], r = (2, 3, 4): z = (1, 2, 2), chi^2 = 9', () => {
    const c = [4, 2, 0, 2, 2, 1, 0, 1, 2];
    const l = choleskyLower(c, 3)!;
    expect(Array.from(l)).toEqual([2, 0, 0, 1, 1, 0, 0, 1, 1]);
    const r = Float64Array.from([2, 3, 4]);
    expect(whitenedChiSquare(r, l, 3)).toBe(9);
    expect(Array.from(r)).toEqual([1, 2, 2]);
    expect(choleskyLower([1, 2, 2, 1], 2)).toBeUndefined();
  });

  it('equals -2 ln N(x; mu, C) - n ln 2 pi - ln det C of SciPy (scipy.stats.multivariate_normal)', (ctx) => {
    needReference(ctx, SCIPY);
    const random = seededRandom(77);
    const cases = Array.from({ length: 5 }, () => {
      const n = 4;
      const a = Array.from({ length: n * n }, () => gaussian(random));
      const cov = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => a.slice(i * n, i * n + n).reduce((s, v, k) => s + v * a[j * n + k], 0) + (i === j ? 0.5 : 0)));
      return { x: Array.from({ length: n }, () => gaussian(random)), mean: Array.from({ length: n }, () => gaussian(random)), cov };
    });
    const py = spawnSync(PYTHON, ['-c', MVN_SCRIPT], { input: JSON.stringify(cases), encoding: 'utf8' });
    expect(py.status, py.stderr).toBe(0);
    const expected = JSON.parse(py.stdout) as number[];
    cases.forEach((cs, i) => {
      const l = choleskyLower(cs.cov.flat(), 4)!;
      const r = Float64Array.from(cs.x, (v, k) => v - cs.mean[k]);
      expect(whitenedChiSquare(r, l, 4)).toBeCloseTo(expected[i], 9);
    });
  });

  it('with nothing shared the covariance is diagonal and the score is the plain sum to the last bit', () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 4), times: logSpaced(1e4, 1e7, 5) });
    const sig = { 'H2O(s)': 0.1, 'CO(s)': 0.2, 'CO2(s)': 0.15 };
    const q = [withParts('s', 'H2O(s)', -4.1, sig), withParts('s', 'CO(s)', -4.8, sig), withParts('s', 'CO2(s)', -4.9, sig)];
    const terms = collectTerms(q);
    const model = buildModelQuantities(table, terms);
    const withCov = buildObservationVector('s', q, terms, { modelSigmaDex: 0.3, limitSigmaDex: 0, correlatedErrors: true });
    const plain = buildObservationVector('s', q, terms, { modelSigmaDex: 0.3, limitSigmaDex: 0, correlatedErrors: false });
    expect(withCov.whiten).toBeUndefined();
    const a = new Float64Array(model.nCandidates);
    const b = new Float64Array(model.nCandidates);
    scoreCandidates(model, withCov, table.nTimes, a);
    scoreCandidates(model, plain, table.nTimes, b);
    expect(Array.from(a)).toEqual(Array.from(b));
  });

  it('ratios to H2O(s) beside X(H2O(s)), scored with their shared error, give the chi^2 of the independent abundances (one linear map of the same data)', () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 5), times: logSpaced(1e4, 1e7, 8) });
    const sig: Record<string, number> = { 'H2O(s)': 0.12, 'CO(s)': 0.2, 'CO2(s)': 0.15, 'CH3OH(s)': 0.25, CO: 0.1 };
    const x = analyticAbundances(2e4, 3e5).map(Math.log10);
    const random = seededRandom(5);
    const noisy = x.map((v, j) => v + sig[SPECIES[j]] * gaussian(random));
    const abs = SPECIES.map((s, j) => withParts('s', s, noisy[j], sig));
    const ratios = [withParts('s', 'H2O(s)', noisy[0], sig), ...SPECIES.slice(1).map((s, j) => withParts('s', s, noisy[j + 1] - noisy[0], sig, 'H2O(s)'))];
    const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], model_sigma_dex: 0, refine: 1 });
    const run = (q: ObservedQuantity[]) => runFitStage({ table, section, observations: observationSet(['s']), quantities: q });
    const fa = run(abs);
    const fr = run(ratios);
    expect(fr.result.fits[0].best.chi2).toBeCloseTo(fa.result.fits[0].best.chi2, 9);
    fa.profiles.sightlines[0].profiles.forEach((p, i) => p.chi2Min.forEach((v, k) => expect(fr.profiles.sightlines[0].profiles[i].chi2Min[k]).toBeCloseTo(v!, 9)));
    // Scored as independent instead, the ratios double-count the H2O(s) error: a different chi^2.
    const indep = runFitStage({ table, section: { ...section, correlated_errors: false }, observations: observationSet(['s']), quantities: ratios });
    expect(Math.abs(indep.result.fits[0].best.chi2 - fa.result.fits[0].best.chi2)).toBeGreaterThan(0.01);
    // The residual rows add up to chi^2 with the whitened shares.
    expect(fr.result.fits[0].residuals.reduce((s, r) => s + r.chi2, 0)).toBeCloseTo(fr.result.fits[0].best.chi2, 10);
  });

  it('a model covariance given to the stage (the hook for a Monte Carlo over rates) enters every sightline: here a perfect correlation of two terms is a dense check', () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 4), times: logSpaced(1e4, 1e7, 5) });
    const q = [detection('s', 'H2O(s)', -4.2, 0.1), detection('s', 'CO(s)', -0.9, 0.1, 'H2O(s)')];
    const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], model_sigma_dex: 0.3, refine: 1 });
    const modelCovariance = { keys: ['H2O(s)', 'CO(s)/H2O(s)'], matrix: Float64Array.from([0.04, 0.03, 0.03, 0.09]) };
    const out = runFitStage({ table, section, observations: observationSet(['s']), quantities: q, modelCovariance });
    const f = out.result.fits[0];
    const r = f.residuals.map((x) => x.residualDex);
    // C = observational diag (0.01) + model covariance.
    expect(f.best.chi2).toBeCloseTo(denseChiSquare([[0.05, 0.03], [0.03, 0.1]], r), 10);
    // A diagonal model covariance still sets the terms' model variance (the plain sum, with 0.04 and 0.09).
    const diagonal = runFitStage({ table, section, observations: observationSet(['s']), quantities: q, modelCovariance: { ...modelCovariance, matrix: Float64Array.from([0.04, 0, 0, 0.09]) } }).result.fits[0];
    const rd = diagonal.residuals.map((x) => x.residualDex);
    expect(diagonal.best.chi2).toBeCloseTo(rd[0] ** 2 / 0.05 + rd[1] ** 2 / 0.1, 10);
  });

  it("a joint group's shared model error: chi^2 of the group equals the dense r^T C^-1 r with sigma_shared^2 between members' same quantity", () => {
    const densities = logSpaced(1e3, 1e6, 4);
    const times = logSpaced(1e4, 1e7, 5);
    const table = syntheticTable({ densities, times });
    const sig: Record<string, number> = { 'H2O(s)': 0.1, 'CO(s)': 0.15, 'CO2(s)': 0.2, 'CH3OH(s)': 0.2, CO: 0.1 };
    const random = seededRandom(9);
    const members = ['a', 'b', 'c'];
    const q = members.flatMap((id, m) => {
      const x = analyticAbundances(densities[1], times[1 + m]).map(Math.log10);
      return [withParts(id, 'H2O(s)', x[0] + 0.1 * gaussian(random), sig), withParts(id, 'CO(s)', x[1] - x[0] + 0.1 * gaussian(random), sig, 'H2O(s)'), withParts(id, 'CO2(s)', x[2] - x[0] + 0.1 * gaussian(random), sig, 'H2O(s)')];
    });
    const floor = 0.3;
    const shared = 0.2;
    // Every member shares density and age: each has one candidate per shared value, so the group's chi^2 is exact.
    const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], model_sigma_dex: floor, model_sigma_shared_dex: shared, refine: 1, joint: [{ name: 'g', sightlines: 'all', share: ['density', 'age_yr'] }] });
    const out = runFitStage({ table, section, observations: observationSet(members), quantities: q });
    const j = out.result.joint[0];
    // Dense check at the group's best: residual blocks, member covariances, sigma_shared^2 between members' same term.
    const terms = collectTerms(q);
    const model = buildModelQuantities(table, terms);
    const widths = { modelSigmaDex: floor, limitSigmaDex: 0, correlatedErrors: true };
    const vectors = members.map((id) => buildObservationVector(id, q.filter((x) => x.sightline === id), terms, widths));
    const candidate = j.memberFits[0].best.modelIndex * table.nTimes + j.memberFits[0].best.timeIndex;
    const r: number[] = [];
    const termOf: number[] = [];
    const memberOf: number[] = [];
    const blocks = vectors.map((v) => detectionCovariance(v, terms, widths));
    vectors.forEach((v, m) => v.detections.forEach((t) => {
      r.push(model.values[candidate * terms.length + t] - v.log10[t]);
      termOf.push(t);
      memberOf.push(m);
    }));
    const n = r.length;
    const c = Array.from({ length: n }, (_, a) => Array.from({ length: n }, (_, b) => {
      if (memberOf[a] === memberOf[b]) {
        const nd = vectors[memberOf[a]].detections.length;
        return blocks[memberOf[a]][(a % nd) * nd + (b % nd)];
      }
      return termOf[a] === termOf[b] ? shared * shared : 0;
    }));
    expect(j.chi2).toBeCloseTo(denseChiSquare(c, r), 9);
    // Without a shared part it is the sum of the members' own chi^2.
    const independent = runFitStage({ table, section: { ...section, model_sigma_shared_dex: 0 }, observations: observationSet(members), quantities: q }).result.joint[0];
    expect(independent.chi2).toBeCloseTo(independent.memberFits.reduce((s, m) => s + m.chi2, 0), 10);
  });
});

const MVN_SCRIPT = `
import json, sys
import numpy as np
from scipy.stats import multivariate_normal
out = []
for case in json.load(sys.stdin):
    x = np.array(case['x']); mean = np.array(case['mean']); cov = np.array(case['cov'])
    sign, logdet = np.linalg.slogdet(cov)
    out.append(float(-2 * multivariate_normal(mean=mean, cov=cov).logpdf(x) - len(x) * np.log(2 * np.pi) - logdet))
print(json.dumps(out))
`;
