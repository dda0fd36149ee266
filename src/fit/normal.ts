/**
 * The natural log of the standard normal cumulative distribution, ln Phi(z),
 * accurate far into the lower tail (where Phi itself underflows), for the
 * censored likelihood of limits. Phi(z) = erfc(-z / sqrt 2) / 2, with erfc
 * from the Chebyshev fit of Numerical Recipes 6.2 (erfcc: fractional error
 * below 1.2e-7 everywhere), whose form t exp(-x^2 + poly(t)) lets the log be
 * taken without forming erfc.
 */

/** Chebyshev coefficients of erfcc (Numerical Recipes 6.2), highest order last. */
const ERFC_COEFFICIENTS = [-1.26551223, 1.00002368, 0.37409196, 0.09678418, -0.18628806, 0.27886807, -1.13520398, 1.48851587, -0.82215223, 0.17087277];

/** ln erfc(x) for x >= 0. */
function logErfcNonNegative(x: number): number {
  const t = 1 / (1 + 0.5 * x);
  let poly = ERFC_COEFFICIENTS[ERFC_COEFFICIENTS.length - 1];
  for (let i = ERFC_COEFFICIENTS.length - 2; i >= 0; i--) poly = ERFC_COEFFICIENTS[i] + t * poly;
  return Math.log(t) - x * x + poly;
}

/** ln Phi(z): the log of the standard normal CDF. */
export function logNormalCdf(z: number): number {
  const x = -z * Math.SQRT1_2;
  if (x >= 0) return logErfcNonNegative(x) - Math.LN2;
  // erfc(x) = 2 - erfc(-x) for x < 0; erfc(-x) <= 1 here so the subtraction keeps its precision.
  return Math.log1p(-0.5 * Math.exp(logErfcNonNegative(-x)));
}

/**
 * The lower-tail quantile of the standard normal, z with Phi(z) = q, for
 * 0 < q <= 0.5: Newton's method on ln Phi(z) = ln q (so it keeps its
 * precision far into the tail), from the tail estimate
 * z = -sqrt(-2 ln q) (common practice). Accurate to the 1.2e-7 of
 * logNormalCdf.
 */
export function lowerNormalQuantile(q: number): number {
  if (!(q > 0 && q <= 0.5)) throw new Error(`lowerNormalQuantile takes 0 < q <= 0.5, got ${q}`);
  const target = Math.log(q);
  let z = q > 0.3 ? 0 : -Math.sqrt(-2 * target);
  for (let i = 0; i < 50; i++) {
    const logPhi = logNormalCdf(z);
    // d ln Phi / dz = phi(z) / Phi(z)
    const slope = Math.exp(-0.5 * z * z - 0.5 * Math.log(2 * Math.PI) - logPhi);
    const step = (logPhi - target) / slope;
    z -= step;
    if (Math.abs(step) < 1e-12) break;
  }
  return z;
}
