import { chiSquaredDistributionTable } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquarePValue, chiSquareQuantile } from '../../src/fit/chi-square.ts';
import { logGamma, regularizedGammaP, regularizedGammaQ } from '../../src/fit/gamma.ts';
import { fitSection } from '../../src/config/sections/fit.ts';
import { DEFAULT_LEVELS, deltaChi2Threshold, regionLevels, TABLE_LEVEL } from '../../src/fit/regions.ts';

/** The Gaussian 1- and 2-sigma probabilities, erf(1/sqrt 2) and erf(2/sqrt 2), which the Avni table prints as 68.3% and 95.4% (common practice). */
const ONE_SIGMA = 0.6826894921370859;
const TWO_SIGMA = 0.9544997361036416;

describe('incomplete gamma (Numerical Recipes 6.1-6.2)', () => {
  it('log-gamma matches factorials and Gamma(1/2) = sqrt(pi)', () => {
    expect(logGamma(1)).toBeCloseTo(0, 9);
    expect(logGamma(5)).toBeCloseTo(Math.log(24), 9);
    expect(logGamma(11)).toBeCloseTo(Math.log(3628800), 8);
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 9);
  });

  it('P(1, x) = 1 - exp(-x) and P + Q = 1 on both branches', () => {
    for (const x of [0.01, 0.5, 1.9, 2.1, 10, 40]) {
      expect(regularizedGammaP(1, x)).toBeCloseTo(1 - Math.exp(-x), 12);
      expect(regularizedGammaQ(1, x)).toBeCloseTo(Math.exp(-x), 12);
      expect(regularizedGammaP(3.5, x) + regularizedGammaQ(3.5, x)).toBeCloseTo(1, 12);
    }
  });

  it('the chi-square CDF for 2 dof is 1 - exp(-x/2) (closed form)', () => {
    for (const x of [0.1, 2.3, 6.18, 30]) expect(chiSquareCdf(x, 2)).toBeCloseTo(1 - Math.exp(-x / 2), 12);
  });
});

describe("the fit room's table of Delta chi^2 thresholds against Avni (1976) and Numerical Recipes 15.6", () => {
  // The published table (Avni 1976, table 1; Numerical Recipes 15.6; physics.md section 6): rows 68.3%, 90%, 95.4%, 99% for p = 1, 2, 3, printed to 3 significant figures.
  const table: [number, number[]][] = [
    [ONE_SIGMA, [1.0, 2.3, 3.53]],
    [0.9, [2.71, 4.61, 6.25]],
    [TWO_SIGMA, [4.0, 6.18, 8.02]],
    [0.99, [6.63, 9.21, 11.3]],
  ];
  it.each(table)('level %f', (level, values) => {
    values.forEach((expected, i) => {
      const p = i + 1;
      const got = deltaChi2Threshold(level, p);
      // Rounded to the table's precision: half a unit of its last printed digit.
      const halfUlp = expected >= 10 ? 0.05 : 0.005;
      expect(Math.abs(got - expected)).toBeLessThanOrEqual(halfUlp);
    });
  });

  it('regionLevels gives those thresholds for the default levels, sorted, for p = 2', () => {
    const levels = regionLevels([0.954, 0.683], 2);
    expect(levels.map((l) => l.level)).toEqual([0.683, 0.954]);
    // 0.683 and 0.954 are the rounded sigma levels, so their thresholds sit just below 2.30 and 6.18:
    // for 2 dof the CDF is 1 - exp(-x/2) (closed form), so the quantile is -2 ln(1 - L) = 2.2977 and 6.1582.
    expect(levels[0].deltaChi2).toBeCloseTo(-2 * Math.log(1 - 0.683), 10);
    expect(levels[1].deltaChi2).toBeCloseTo(-2 * Math.log(1 - 0.954), 10);
    expect(levels.every((l) => l.parametersOfInterest === 2)).toBe(true);
  });

  it('a threshold the fit stage stated for that level and p wins over the computed one', () => {
    const stated = [{ level: 0.683, parametersOfInterest: 1, deltaChi2: 1.5 }];
    expect(deltaChi2Threshold(0.683, 1, stated)).toBe(1.5);
    expect(deltaChi2Threshold(0.683, 2, stated)).toBeCloseTo(-2 * Math.log(1 - 0.683), 10);
  });

  it("the fit section's default levels are the table's, and the table level is one of them", () => {
    // config imports nothing of ours, so its schema restates the default; this ties the two.
    expect(fitSection.parse({ quantities: [{ species: 'CO(s)' }] }).levels).toEqual(DEFAULT_LEVELS);
    expect(DEFAULT_LEVELS).toContain(TABLE_LEVEL);
  });
});

describe('chi-square critical values', () => {
  it('upper-tail 0.05 values of the NIST/SEMATECH e-Handbook (section 1.3.6.7.4)', () => {
    const nist: [number, number][] = [[1, 3.841], [2, 5.991], [3, 7.815], [5, 11.07], [10, 18.307]];
    for (const [dof, value] of nist) {
      expect(Math.abs(chiSquareQuantile(0.95, dof) - value)).toBeLessThan(6e-4);
      expect(chiSquarePValue(value, dof)).toBeCloseTo(0.05, 4);
    }
  });

  it("every entry of simple-statistics' chiSquaredDistributionTable (Hines & Montgomery 1980, 2 decimals)", () => {
    const t = chiSquaredDistributionTable as unknown as Record<string, Record<string, number>>;
    let checked = 0;
    for (const [dof, row] of Object.entries(t)) {
      for (const [upperTail, value] of Object.entries(row)) {
        const got = chiSquareQuantile(1 - Number(upperTail), Number(dof));
        // The table is printed to 0.01 and a few of its entries are one unit off in that digit (e.g. 6 dof at 0.1: 10.645 printed 10.65).
        expect(Math.abs(got - value), `dof ${dof}, upper tail ${upperTail}`).toBeLessThanOrEqual(0.01);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(300);
  });

  it('p-values for the large dof of a joint fit of many sightlines (SciPy 1.10.1 scipy.stats.chi2.sf, Debian python3-scipy)', () => {
    // chi2.sf(41000, 40000) = 2.2502803564234105e-4, chi2.sf(250000, 250000) = 0.49962387359425176.
    expect(chiSquarePValue(41000, 40000) / 2.2502803564234105e-4).toBeCloseTo(1, 8);
    expect(chiSquarePValue(250000, 250000)).toBeCloseTo(0.49962387359425176, 8);
    expect(chiSquareCdf(250000, 250000)).toBeCloseTo(1 - 0.49962387359425176, 8);
  });

  it('p-values far in the tail keep their precision (Q computed directly)', () => {
    // For 2 dof, Q = exp(-x/2) exactly.
    expect(chiSquarePValue(200, 2) / Math.exp(-100)).toBeCloseTo(1, 9);
  });
});
