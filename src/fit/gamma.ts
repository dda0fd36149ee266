/**
 * The log-gamma function and the regularised incomplete gamma functions
 * P(a, x) and Q(a, x) = 1 - P(a, x), on which the chi-square distribution
 * rests. Numerical Recipes (Press et al., 2nd ed.) sections 6.1 (Lanczos
 * approximation, gammln) and 6.2 (series gser for x < a + 1, continued
 * fraction gcf by the modified Lentz method otherwise).
 */

/** Lanczos coefficients for gamma = 5, n = 6 (Numerical Recipes 6.1, gammln). */
const LANCZOS_COEFFICIENTS = [76.18009172947146, -86.50532032941677, 24.01409824083091, -1.231739572450155, 0.1208650973866179e-2, -0.5395239384953e-5];
const LANCZOS_SERIES_ZERO = 1.000000000190015;
const SQRT_TWO_PI = 2.5066282746310005;
/**
 * Iteration cap and relative accuracy of the series and the continued
 * fraction (Numerical Recipes 6.2: ITMAX, EPS). Near x = a both need of the
 * order of sqrt(2 a ln(1/EPS)), about 8.3 sqrt(a), terms, so the cap grows with
 * sqrt(a): a fixed cap would cut the sums short, silently, for the large dof
 * of a joint fit of many sightlines.
 */
const MAX_ITERATIONS = 1000;
const ITERATIONS_PER_SQRT_A = 20;
const RELATIVE_ACCURACY = 1e-15;
/** Number near the smallest representable float, to keep the Lentz recursion away from division by zero (Numerical Recipes 6.2: FPMIN). */
const TINY = 1e-300;

/** ln Gamma(x) for x > 0 (Numerical Recipes 6.1; absolute error below 2e-10). */
export function logGamma(x: number): number {
  if (!(x > 0)) throw new RangeError(`logGamma needs x > 0, got ${x}`);
  let y = x;
  const tmp0 = x + 5.5;
  const tmp = tmp0 - (x + 0.5) * Math.log(tmp0);
  let ser = LANCZOS_SERIES_ZERO;
  for (const c of LANCZOS_COEFFICIENTS) ser += c / ++y;
  return -tmp + Math.log((SQRT_TWO_PI * ser) / x);
}

function iterationCap(a: number): number {
  return MAX_ITERATIONS + Math.ceil(ITERATIONS_PER_SQRT_A * Math.sqrt(a));
}

/** Series representation of P(a, x), valid for x < a + 1 (Numerical Recipes 6.2, gser). */
function lowerSeries(a: number, x: number): number {
  let ap = a;
  let del = 1 / a;
  let sum = del;
  const cap = iterationCap(a);
  for (let n = 0; n < cap; n++) {
    ap += 1;
    del *= x / ap;
    sum += del;
    if (Math.abs(del) < Math.abs(sum) * RELATIVE_ACCURACY) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - logGamma(a));
}

/** Continued fraction for Q(a, x), valid for x >= a + 1 (Numerical Recipes 6.2, gcf, modified Lentz). */
function upperContinuedFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  const cap = iterationCap(a);
  for (let i = 1; i <= cap; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < RELATIVE_ACCURACY) break;
  }
  return Math.exp(-x + a * Math.log(x) - logGamma(a)) * h;
}

/** Regularised lower incomplete gamma P(a, x) = gamma(a, x) / Gamma(a). */
export function regularizedGammaP(a: number, x: number): number {
  if (!(a > 0)) throw new RangeError(`regularizedGammaP needs a > 0, got ${a}`);
  if (x <= 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? lowerSeries(a, x) : 1 - upperContinuedFraction(a, x);
}

/** Regularised upper incomplete gamma Q(a, x) = 1 - P(a, x), computed directly in the upper tail so small values keep their precision. */
export function regularizedGammaQ(a: number, x: number): number {
  if (!(a > 0)) throw new RangeError(`regularizedGammaQ needs a > 0, got ${a}`);
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - lowerSeries(a, x) : upperContinuedFraction(a, x);
}
