/**
 * The chi-square distribution: cumulative distribution, upper-tail
 * probability (the p-value of a fit) and quantile (the Delta chi^2
 * thresholds of confidence regions). CDF(x; k) = P(k/2, x/2), the
 * regularised incomplete gamma function (Numerical Recipes 6.2, eq. 6.2.18).
 */
import { logGamma, regularizedGammaP, regularizedGammaQ } from './gamma.ts';

/** Relative accuracy to which the quantile is solved. */
const QUANTILE_RELATIVE_TOLERANCE = 1e-12;
const QUANTILE_MAX_ITERATIONS = 200;

function checkDof(dof: number): void {
  if (!(dof > 0) || !Number.isFinite(dof)) throw new RangeError(`chi-square degrees of freedom must be a positive number, got ${dof}`);
}

/** P(chi^2 <= x) for `dof` degrees of freedom. */
export function chiSquareCdf(x: number, dof: number): number {
  checkDof(dof);
  return regularizedGammaP(dof / 2, x / 2);
}

/** P(chi^2 > x) for `dof` degrees of freedom: the p-value of a fit with chi^2 = x. */
export function chiSquarePValue(x: number, dof: number): number {
  checkDof(dof);
  return regularizedGammaQ(dof / 2, x / 2);
}

/** Probability density of chi^2 at x, used for Newton steps of the quantile. */
function chiSquareDensity(x: number, dof: number): number {
  if (x <= 0) return 0;
  const k = dof / 2;
  return Math.exp((k - 1) * Math.log(x) - x / 2 - k * Math.LN2 - logGamma(k));
}

/**
 * The x with P(chi^2 <= x) = probability for `dof` degrees of freedom.
 * For a confidence level and p parameters of interest this is the Delta
 * chi^2 threshold of the joint region (Avni 1976; Numerical Recipes 15.6).
 * Solved by Newton's method kept inside a bisection bracket.
 */
export function chiSquareQuantile(probability: number, dof: number): number {
  checkDof(dof);
  if (!(probability >= 0 && probability < 1)) throw new RangeError(`chi-square quantile needs a probability in [0, 1), got ${probability}`);
  if (probability === 0) return 0;
  let lo = 0;
  let hi = Math.max(1, dof);
  while (chiSquareCdf(hi, dof) < probability) {
    lo = hi;
    hi *= 2;
  }
  let x = 0.5 * (lo + hi);
  for (let i = 0; i < QUANTILE_MAX_ITERATIONS; i++) {
    const f = chiSquareCdf(x, dof) - probability;
    if (f > 0) hi = x;
    else lo = x;
    const density = chiSquareDensity(x, dof);
    let next = density > 0 ? x - f / density : NaN;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - x) <= QUANTILE_RELATIVE_TOLERANCE * Math.max(next, Number.MIN_VALUE) || hi - lo <= QUANTILE_RELATIVE_TOLERANCE * hi) return next;
    x = next;
  }
  return x;
}
