/**
 * Delta chi^2 thresholds of joint confidence regions: a region of confidence
 * level L for p parameters of interest holds the parameter values with
 * chi^2 - chi^2_min <= the chi-square quantile at L for p degrees of freedom
 * (Avni 1976; Numerical Recipes 15.6, table of Delta chi^2 as a function of
 * confidence level and degrees of freedom).
 */
import { chiSquareQuantile } from './chi-square.ts';
import type { RegionLevel } from './types.ts';

export function regionLevels(levels: readonly number[], parametersOfInterest: number): RegionLevel[] {
  const distinct = [...new Set(levels)].sort((a, b) => a - b);
  return distinct.map((level) => ({ level, parametersOfInterest, deltaChi2: chiSquareQuantile(level, parametersOfInterest) }));
}
