/**
 * Which reactions a model value hangs on (docs/uncertainty.md): over the
 * Monte Carlo realizations, the correlation of each reaction's drawn
 * log10 k (eps log10 F, its deviate times the log of its factor) with the
 * log10 of the value. Pearson's coefficient as in Wakelam et al. 2010
 * (Space Sci. Rev. 156, 13); Spearman's rank coefficient as an option
 * (monotonic but non-linear dependences, and robust to outlying realizations).
 *
 * Pure computation: eps[r][i] of reaction i in realization r, and the
 * value's log10 in each realization.
 */
import { lowerNormalQuantile } from './normal.ts';

export type CorrelationMethod = 'pearson' | 'spearman';

/** Pearson's product-moment correlation; NaN when either side does not vary. */
export function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : Number.NaN;
}

/** Ranks 1..n, ties given their mean rank (as Spearman's coefficient needs). */
export function ranks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const out = new Float64Array(n);
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && values[order[j + 1]] === values[order[i]]) j++;
    const rank = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) out[order[k]] = rank;
    i = j + 1;
  }
  return out;
}

/** Spearman's rank correlation: Pearson's coefficient of the ranks. */
export function spearman(x: ArrayLike<number>, y: ArrayLike<number>): number {
  return pearson(ranks(x), ranks(y));
}

export interface ReactionCorrelation {
  /** Index of the reaction in the network file's list. */
  reaction: number;
  coefficient: number;
}

/**
 * The correlation of every reaction's drawn log k with one value over the
 * realizations, strongest (by |coefficient|) first. Reactions that were not
 * drawn (F = 1) have no coefficient and are left out.
 */
export function rankReactions(epsilon: readonly Float64Array[], value: ArrayLike<number>, method: CorrelationMethod = 'pearson'): ReactionCorrelation[] {
  const nReal = epsilon.length;
  if (nReal !== value.length) throw new Error(`${nReal} realizations of the draws but ${value.length} of the value`);
  if (nReal < 3) return [];
  const nReactions = epsilon[0].length;
  const correlate = method === 'pearson' ? pearson : spearman;
  const column = new Float64Array(nReal);
  const out: ReactionCorrelation[] = [];
  for (let i = 0; i < nReactions; i++) {
    for (let r = 0; r < nReal; r++) column[r] = epsilon[r][i];
    const coefficient = correlate(column, value);
    if (Number.isFinite(coefficient)) out.push({ reaction: i, coefficient });
  }
  out.sort((a, b) => Math.abs(b.coefficient) - Math.abs(a.coefficient) || a.reaction - b.reaction);
  return out;
}

/**
 * The largest |coefficient| that N realizations give by chance alone when
 * M reactions are tested at once: under no dependence, Fisher's
 * z = atanh(r) is normal with variance 1/(N - 3) (Fisher 1915; any
 * statistics text), and a Bonferroni bound over the M tests at level
 * `alpha` gives r = tanh(Phi^-1(1 - alpha/(2M)) / sqrt(N - 3)). A ranking
 * whose leading coefficients are below it says nothing yet: run more
 * realizations. (For Spearman's coefficient the same bound holds
 * approximately.) NaN below 4 realizations.
 */
export function chanceCoefficient(realizations: number, reactions: number, alpha = 0.05): number {
  if (realizations < 4 || reactions < 1) return Number.NaN;
  return Math.tanh(-lowerNormalQuantile(alpha / (2 * reactions)) / Math.sqrt(realizations - 3));
}
