/** The realizations' spread in the fit (fit.model_uncertainty; docs/uncertainty.md) and the covariance of quantities. */
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { collectTerms } from '../../src/fit/model-quantities.ts';
import { logCovariance, logRealizations, logSpread, modelSigmaDex } from '../../src/fit/model-spread.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import { analyticAbundances, detection, gaussian, logSpaced, observationSet, seededRandom, SPECIES, syntheticTable } from './synthetic.ts';

const DENSITIES = logSpaced(1e3, 1e6, 5);
const TIMES = logSpaced(1e4, 1e7, 8);
const table = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: [1] });
const random = seededRandom(3);
const quantities = ['s1', 's2'].flatMap((id, i) => {
  const x = analyticAbundances(DENSITIES[1 + i], TIMES[4 + i], 1).map(Math.log10);
  return SPECIES.map((s, j) => detection(id, s, x[j] + 0.1 * gaussian(random), 0.1));
});
const section = (extra: Record<string, unknown>) => fitSection.parse({ quantities: SPECIES.map((species) => ({ species, as: 'abundance' })), ...extra });
const terms = collectTerms(quantities);
const spreadOf = (value: number) => new Map(['s1', 's2'].map((id) => [id, new Map(terms.map((t) => [t.key, value]))]));

function fitsOf(extra: Record<string, unknown>, modelSpread?: ReturnType<typeof spreadOf>) {
  return runFitStage({ table, section: section(extra), observations: observationSet(['s1', 's2']), quantities, modelSpread }).result.fits;
}

describe('the model spread in the fit', () => {
  it('with F = 1 everywhere (spread exactly 0) equals the fixed-floor fit with floor 0', () => {
    // Three realizations of one model with every factor 1 are the same numbers: spread 0 (test/chem/uncertainty.test.ts shows they are bit-identical).
    const copies = [0, 1, 2].map(() => Float64Array.from(table.abundances.subarray(0, table.nSpecies * table.nTimes)));
    expect(Math.max(...logSpread(logRealizations(copies)).sd)).toBe(0);
    const withSpread = fitsOf({ model_uncertainty: 'spread', model_sigma_dex: 0.3 }, spreadOf(0));
    const floorZero = fitsOf({ model_uncertainty: 'floor', model_sigma_dex: 0 });
    expect(withSpread).toEqual(floorZero);
    // and it is not the 0.3 dex floor fit
    expect(fitsOf({ model_sigma_dex: 0.3 })[0].best.chi2).not.toBeCloseTo(withSpread[0].best.chi2, 6);
  });

  it('spread-and-floor adds them in quadrature: spread 0.4 with floor 0.3 is the fit with a 0.5 dex floor', () => {
    expect(modelSigmaDex('spread-and-floor', 0.3, 0.4)).toBeCloseTo(0.5, 15);
    expect(fitsOf({ model_uncertainty: 'spread-and-floor', model_sigma_dex: 0.3 }, spreadOf(0.4))).toEqual(fitsOf({ model_sigma_dex: 0.5 }));
  });

  it('floor (the default) ignores a spread given', () => {
    expect(fitsOf({ model_sigma_dex: 0.3 }, spreadOf(2))).toEqual(fitsOf({ model_sigma_dex: 0.3 }));
  });
});

describe('the covariance of log X over realizations', () => {
  it('has the spread squared on its diagonal and the sample covariance off it (checked by hand for three realizations)', () => {
    // Two quantities: y = 2 x exactly, so cov = 2 var(x), var(y) = 4 var(x).
    const values = [Float64Array.of(1, 2), Float64Array.of(2, 4), Float64Array.of(4, 8)];
    const c = logCovariance(values);
    const varX = ((1 - 7 / 3) ** 2 + (2 - 7 / 3) ** 2 + (4 - 7 / 3) ** 2) / 2;
    expect(c[0]).toBeCloseTo(varX, 12);
    expect(c[1]).toBeCloseTo(2 * varX, 12);
    expect(c[2]).toBe(c[1]);
    expect(c[3]).toBeCloseTo(4 * varX, 12);
    expect(Math.sqrt(c[0])).toBeCloseTo(logSpread(values.map((v) => v.subarray(0, 1))).sd[0], 12);
  });
});
