import { describe, expect, it } from 'vitest';
import { lowerLimitCost, upperLimitCost } from '../../src/fit/censored.ts';
import { ABUNDANCE_FLOOR, buildModelQuantities, collectTerms } from '../../src/fit/model-quantities.ts';
import { logNormalCdf } from '../../src/fit/normal.ts';
import { buildObservationVector } from '../../src/fit/observation-vector.ts';
import { scoreBreakdown, scoreCandidates } from '../../src/fit/score.ts';
import { detection, limit, SPECIES, syntheticTable } from './synthetic.ts';

// Standard normal CDF values from the NIST/SEMATECH e-Handbook normal table (section 1.3.6.7.1):
// Phi(-1) = 0.15866, Phi(-2) = 0.02275, Phi(0) = 0.5; to more digits, Python 3's math.erfc
// (the C library's erfc) gives Phi(-1) = 0.158655254, Phi(-2) = 0.022750132, Phi(3.3333) = 0.999570940,
// Phi(-10) = 7.619853e-24, Phi(-30) = 4.906714e-198.

describe('ln Phi (Numerical Recipes 6.2 erfc, fractional error below 1.2e-7)', () => {
  it('matches the normal table and the far tails', () => {
    expect(Math.exp(logNormalCdf(-1))).toBeCloseTo(0.158655254, 6);
    expect(Math.exp(logNormalCdf(-2))).toBeCloseTo(0.022750132, 7);
    expect(Math.exp(logNormalCdf(0))).toBeCloseTo(0.5, 7);
    expect(Math.exp(logNormalCdf(10 / 3))).toBeCloseTo(0.99957094, 7);
    expect(logNormalCdf(-10) / Math.log(7.619853e-24)).toBeCloseTo(1, 6);
    expect(logNormalCdf(-30) / Math.log(4.906714e-198)).toBeCloseTo(1, 6);
  });
});

describe('censored cost of limits (physics.md section 6)', () => {
  const sigma = 0.3;
  const limitLog = -5; // an upper limit X < 1e-5

  it('a model well below an upper limit costs (almost) nothing', () => {
    // model 1 dex below: z = (-5 - (-6)) / 0.3 = 3.333; -2 ln(0.9995709) = 8.58e-4 (worked by hand).
    expect(upperLimitCost(limitLog, -6, sigma)).toBeCloseTo(8.583e-4, 6);
    expect(upperLimitCost(limitLog, -8, sigma)).toBeLessThan(1e-20);
  });

  it('a model above an upper limit costs -2 ln Phi((log L - log X)/sigma)', () => {
    // at the limit: -2 ln 0.5 = 1.3863
    expect(upperLimitCost(limitLog, -5, sigma)).toBeCloseTo(1.386294, 5);
    // 1 sigma above: -2 ln(0.158655) = 2 x 1.841022 = 3.682043
    expect(upperLimitCost(limitLog, -4.7, sigma)).toBeCloseTo(3.682043, 5);
    // 2 sigma above: -2 ln(0.0227501) = 2 x 3.783184 = 7.566369
    expect(upperLimitCost(limitLog, -4.4, sigma)).toBeCloseTo(7.566369, 5);
    // far above, it grows like the one-sided Gaussian (d/sigma)^2 = 100 plus ln(2 pi z^2) = 6.46
    expect(upperLimitCost(limitLog, -2, sigma)).toBeCloseTo(106.4626, 3);
  });

  it('a lower limit is the mirror image', () => {
    expect(lowerLimitCost(limitLog, -4, sigma)).toBeCloseTo(8.583e-4, 6);
    expect(lowerLimitCost(limitLog, -5.3, sigma)).toBeCloseTo(3.682043, 5);
    expect(lowerLimitCost(limitLog, -5.6, sigma)).toBeCloseTo(7.566369, 5);
  });

  it('the scoring loop adds the limit costs to the detections, sigma from the model floor', () => {
    const table = syntheticTable({ densities: [1e4], times: [1e5] });
    const xH2O = Math.log10(table.abundances[0]);
    const xCO = Math.log10(table.abundances[4]);
    const quantities = [
      detection('s', 'H2O(s)', xH2O - 0.2, 0.4), // d = +0.2, sigma^2 = 0.4^2 + 0.3^2 = 0.25
      limit('s', 'upper', 'CO', xCO - 0.3), // model 1 sigma (0.3 dex) above its upper limit
      limit('s', 'lower', 'CO(s)', Math.log10(table.abundances[1]) - 1), // model 1 dex above a lower limit
    ];
    const terms = collectTerms(quantities);
    const model = buildModelQuantities(table, terms);
    const widths = { modelSigmaDex: 0.3, limitSigmaDex: 0 };
    const obs = buildObservationVector('s', quantities, terms, widths);
    const out = new Float64Array(1);
    scoreCandidates(model, obs, table.nTimes, out);
    // 0.2^2 / 0.25 = 0.16; + 3.682043; + 8.583e-4
    expect(out[0]).toBeCloseTo(0.16 + 3.682043 + 8.583e-4, 5);
    const rows = scoreBreakdown(model, obs, 0, 1);
    expect(rows.map((r) => r.agrees)).toEqual([true, false, true]);
    expect(rows[0].sigmaDex).toBeCloseTo(0.5, 12);
    expect(rows.reduce((s, r) => s + r.chi2, 0)).toBeCloseTo(out[0], 12);
  });

  it('asymmetric errors: the side is chosen by the sign of d', () => {
    const table = syntheticTable({ densities: [1e4], times: [1e5] });
    const x = Math.log10(table.abundances[0]);
    const terms = collectTerms([detection('s', 'H2O(s)', 0, 0.1)]);
    const model = buildModelQuantities(table, terms);
    const asym = (obsLog: number) => ({ ...detection('s', 'H2O(s)', obsLog, 0), sigmaLoDex: 0.1, sigmaHiDex: 0.4 });
    const out = new Float64Array(1);
    // Model above the observation (d = +0.4): the upper error 0.4 applies: chi2 = 0.16/0.16 = 1.
    scoreCandidates(model, buildObservationVector('s', [asym(x - 0.4)], terms, { modelSigmaDex: 0, limitSigmaDex: 0 }), 1, out);
    expect(out[0]).toBeCloseTo(1, 12);
    // Model below (d = -0.4): the lower error 0.1 applies: chi2 = 0.16/0.01 = 16.
    scoreCandidates(model, buildObservationVector('s', [asym(x + 0.4)], terms, { modelSigmaDex: 0, limitSigmaDex: 0 }), 1, out);
    expect(out[0]).toBeCloseTo(16, 10);
  });
});

describe('model side of the quantities', () => {
  it('log10 of abundances and of ratios, the reference shared by several terms, zeros raised to the floor', () => {
    const table = syntheticTable({ densities: [1e3, 1e5], times: [1e4, 1e6] });
    table.abundances[2] = 0; // CO2(s) of the first candidate: a species the model lacks there
    const quantities = [
      detection('s', 'H2O(s)', -4, 0.1),
      detection('s', 'CO(s)', -0.5, 0.1, 'H2O(s)'),
      detection('s', 'CO2(s)', -0.5, 0.1, 'H2O(s)'),
      detection('s', 'CO', -4, 0.1),
      detection('s', 'CO', 0, 0.1, 'H2O(s)'),
    ];
    const terms = collectTerms(quantities);
    const model = buildModelQuantities(table, terms);
    const idx = terms.map((t) => [SPECIES.indexOf(t.numerator), t.denominator === undefined ? -1 : SPECIES.indexOf(t.denominator)]);
    const log = (x: number) => Math.log10(Math.max(x, ABUNDANCE_FLOOR));
    for (let c = 0; c < model.nCandidates; c++) {
      const row = table.abundances.subarray(c * table.nSpecies, (c + 1) * table.nSpecies);
      idx.forEach(([n, d], j) => {
        // The definition, term by term: log10 X_num (- log10 X_den), to the last bit.
        expect(model.values[c * terms.length + j]).toBe(d < 0 ? log(row[n]) : log(row[n]) - log(row[d]));
      });
    }
    expect(model.values[2]).toBe(-30 - Math.log10(table.abundances[0]));
  });
});

