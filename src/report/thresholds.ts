/**
 * Delta chi^2 thresholds of confidence regions (Avni 1976; Numerical Recipes,
 * section 15.6): the chi-square quantile at the level for as many degrees of
 * freedom as parameters of interest. The fit stage states the ones it used
 * (FitStageResult.levels); these give the ones it did not state.
 */
import { errorFunction } from 'simple-statistics';
import type { RegionLevel } from '../fit/types.ts';

/** Bisection steps: halving [0, 40] this often pins z far below the error of erf. */
const BISECTION_STEPS = 80;
const Z_MAX = 40;

/**
 * One parameter: chi-square with 1 dof is the square of a standard normal,
 * so P(chi^2 <= z^2) = erf(z / sqrt 2) and the quantile at L is z^2 for
 * erf(z / sqrt 2) = L (1.00 at 68.3%, 4.00 at 95.45%); solved by bisection on
 * simple-statistics' erf (its probit is a coarser approximation, 1e-3 off).
 * Two parameters: chi-square with 2 dof is exponential with mean 2, so the
 * quantile is -2 ln(1 - L) (2.30 at 68.3%, 6.16 at 95.4%; tables print 6.18 for 95.45%).
 */
export function deltaChi2Threshold(level: number, parametersOfInterest: 1 | 2, stated: readonly RegionLevel[] = []): number {
  const given = stated.find((l) => l.parametersOfInterest === parametersOfInterest && Math.abs(l.level - level) < 1e-9);
  if (given) return given.deltaChi2;
  if (parametersOfInterest === 1) {
    let lo = 0;
    let hi = Z_MAX;
    for (let i = 0; i < BISECTION_STEPS; i++) {
      const mid = (lo + hi) / 2;
      if (errorFunction(mid / Math.SQRT2) < level) lo = mid;
      else hi = mid;
    }
    return ((lo + hi) / 2) ** 2;
  }
  return -2 * Math.log(1 - level);
}
