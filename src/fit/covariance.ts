/**
 * Correlated errors: the generalised chi^2 = r^T C^-1 r of a residual vector
 * r with covariance C (Numerical Recipes 15.4 and 15.6; docs/statistics.md
 * section 2), computed as |L^-1 r|^2 with C = L L^T (Cholesky; Numerical
 * Recipes 2.9). The forward substitution adds one squared whitened residual
 * per quantity, so partial sums only grow (the map's cut-off relies on it).
 *
 * Where C comes from, per sightline, over its detections:
 * - the observational error parts of each quantity (ObservedQuantity.errorParts):
 *   two quantities that share a measurement (ratios to one reference, an
 *   abundance of the reference beside ratios to it, abundances sharing A_V)
 *   covary by sign_j sign_k sigma_j sigma_k of that measurement;
 * - the model uncertainty: the floor squared on the diagonal, or a model
 *   covariance given per pair of quantities (ModelCovariance: the hook for a
 *   Monte Carlo over rate coefficients, which makes quantities of one model
 *   covary).
 * A correlated sightline's asymmetric errors are symmetrised (the mean of
 * the lower and upper variances): the Gaussian of r^T C^-1 r has one width
 * per direction.
 */

/**
 * A model covariance between quantity terms, dex^2: matrix[a * keys.length + b]
 * for the terms keyed keys[a], keys[b] (`CO(s)/H2O(s)`, `H2O(s)`), symmetric,
 * the same for every candidate. Given, it replaces the diagonal model floor of
 * the terms it names (fit options `modelCovariance`).
 */
export interface ModelCovariance {
  keys: string[];
  matrix: Float64Array;
}

/** Relative size below which an off-diagonal element counts as zero (round-off of products of dex values). */
const ZERO_COVARIANCE = 0;

/**
 * A pivot below this fraction of its diagonal element counts as zero: what
 * is left of it is round-off of a singular matrix (two quantities tied
 * exactly), and its inverse would weigh round-off by 1e12 or more (common
 * practice: a relative pivot tolerance in a Cholesky factorisation).
 */
const PIVOT_TOLERANCE = 1e-12;

/**
 * The lower Cholesky factor of an n x n symmetric positive-definite matrix
 * (row-major), or undefined when it is not positive definite (or singular
 * within round-off: PIVOT_TOLERANCE).
 */
export function choleskyLower(c: ArrayLike<number>, n: number): Float64Array | undefined {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = c[i * n + j];
      for (let k = 0; k < j; k++) sum -= l[i * n + k] * l[j * n + k];
      if (i === j) {
        if (!(sum > PIVOT_TOLERANCE * c[i * n + i])) return undefined;
        l[i * n + i] = Math.sqrt(sum);
      } else {
        l[i * n + j] = sum / l[j * n + j];
      }
    }
  }
  return l;
}

/**
 * r^T C^-1 r from the Cholesky factor L of C. `r` is overwritten by the
 * whitened residuals z = L^-1 r (z_i^2 is quantity i's share of the sum).
 */
export function whitenedChiSquare(r: Float64Array, l: Float64Array, n: number): number {
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    let acc = r[i];
    const row = i * n;
    for (let k = 0; k < i; k++) acc -= l[row + k] * r[k];
    const z = acc / l[row + i];
    r[i] = z;
    chi2 += z * z;
  }
  return chi2;
}

/** True when some off-diagonal element is not zero. */
export function hasCorrelation(c: ArrayLike<number>, n: number): boolean {
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) if (Math.abs(c[i * n + j]) > ZERO_COVARIANCE) return true;
  return false;
}
