/**
 * The one table of confidence levels and Delta chi^2 thresholds. A joint
 * confidence region of level L for p parameters of interest holds the
 * parameter values with chi^2 - chi^2_min <= the chi-square quantile at L for
 * p degrees of freedom (Avni 1976; Numerical Recipes 15.6, table of Delta
 * chi^2 as a function of confidence level and degrees of freedom). The fit
 * stage, the CLI, the lock file and the report all read their levels and
 * thresholds here.
 */
import { chiSquareQuantile } from './chi-square.ts';
import type { RegionLevel } from './types.ts';

/** The Gaussian 1- and 2-sigma probabilities as tables print them, 68.3% and 95.4% (erf(1/sqrt 2) = 0.6827, erf(sqrt 2) = 0.9545; common practice). */
export const ONE_SIGMA_LEVEL = 0.683;
export const TWO_SIGMA_LEVEL = 0.954;
/** Levels of a fit whose pipeline names none (the fit section's schema default; test/fit/chi-square.test.ts checks that the two agree). */
export const DEFAULT_LEVELS: readonly number[] = [ONE_SIGMA_LEVEL, TWO_SIGMA_LEVEL];
/** Level of the bounds in best_fits.csv, of the intervals `hoarfrost fit` prints and of those a lock file keeps; the fit stage always computes it. */
export const TABLE_LEVEL = ONE_SIGMA_LEVEL;

/**
 * Parameters of interest of the 2-D regions (the pair profiles and the
 * chi^2 maps): two parameters jointly, Delta chi^2 = 2.30 and 6.18 at 68.3% and
 * 95.4% (Avni 1976). Intervals of one parameter use fit.parameters_of_interest,
 * 1 by default (Delta chi^2 = 1.00 and 4.00): the one-parameter reading.
 */
export const PAIR_PARAMETERS = 2;

/**
 * How an interval read at p parameters of interest is to be named wherever it
 * is shown: at p = 1 it is the interval of that parameter alone; at p > 1 it
 * is the projection of the joint region of p parameters onto one axis, wider
 * than a one-parameter interval of the same level (docs/statistics.md section 5).
 */
export function intervalReading(parametersOfInterest: number): string {
  return parametersOfInterest === 1 ? 'one-parameter' : `projected from the ${parametersOfInterest}-parameter region`;
}

/** "68.3%, Delta chi2 <= 1.00, one-parameter": the level, its threshold and its reading, as every table and figure states them. */
export function levelStatement(level: RegionLevel, symbol = 'Delta chi2'): string {
  return `${Number((level.level * 100).toFixed(1))}%, ${symbol} <= ${level.deltaChi2.toFixed(2)}, ${intervalReading(level.parametersOfInterest)}`;
}

/** Same level within rounding of a stored number. */
const LEVEL_TOLERANCE = 1e-9;

/**
 * The level as a fit states it (`levels` of fit.json, or its `regionLevels` for
 * the 2-D regions); a fit that states none (a file written before) gets the
 * quantile for p parameters of interest, `fallbackParameters`.
 */
export function statedLevel(level: number, stated: readonly RegionLevel[] | undefined, fallbackParameters: number): RegionLevel {
  const given = stated?.find((l) => Math.abs(l.level - level) < LEVEL_TOLERANCE);
  return given ?? { level, parametersOfInterest: fallbackParameters, deltaChi2: chiSquareQuantile(level, fallbackParameters) };
}

/**
 * The Delta chi^2 threshold of level `level` for p parameters of interest:
 * the one a fit stated for that level and p (so a figure cuts where the fit's
 * intervals end), else the chi-square quantile.
 */
export function deltaChi2Threshold(level: number, parametersOfInterest: number, stated: readonly RegionLevel[] = []): number {
  const given = stated.find((l) => l.parametersOfInterest === parametersOfInterest && Math.abs(l.level - level) < LEVEL_TOLERANCE);
  return given ? given.deltaChi2 : chiSquareQuantile(level, parametersOfInterest);
}

/** The distinct levels, ascending, each with its threshold for p parameters of interest. */
export function regionLevels(levels: readonly number[], parametersOfInterest: number): RegionLevel[] {
  const distinct = [...new Set(levels)].sort((a, b) => a - b);
  return distinct.map((level) => ({ level, parametersOfInterest, deltaChi2: deltaChi2Threshold(level, parametersOfInterest) }));
}
