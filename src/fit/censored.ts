/**
 * The censored-likelihood cost of a limit (a Tobit-style likelihood;
 * docs/statistics.md section 3): for an upper limit L, -2 ln Phi((log10 L - log10 X_model) / sigma),
 * and mirrored for a lower limit, -2 ln Phi((log10 X_model - log10 L) / sigma).
 * Far inside the allowed side it tends to 0; across the limit it grows like a
 * one-sided Gaussian, ((log10 X_model - log10 L) / sigma)^2 plus a slowly growing log term.
 */
import { logNormalCdf } from './normal.ts';

/**
 * chi^2 cost of a limit from its standardised distance to the allowed side,
 * z = (log10 L - log10 X) / sigma for an upper limit and (log10 X - log10 L) / sigma
 * for a lower one. The scoring loops form z with the stored 1/sigma, a product
 * where the two functions below divide.
 */
export function censoredCost(z: number): number {
  return -2 * logNormalCdf(z);
}

/** chi^2 cost of an upper limit at log10 L for a model at log10 X, width sigma in dex. */
export function upperLimitCost(limitLog10: number, modelLog10: number, sigmaDex: number): number {
  return censoredCost((limitLog10 - modelLog10) / sigmaDex);
}

/** chi^2 cost of a lower limit at log10 L for a model at log10 X, width sigma in dex. */
export function lowerLimitCost(limitLog10: number, modelLog10: number, sigmaDex: number): number {
  return censoredCost((modelLog10 - limitLog10) / sigmaDex);
}
