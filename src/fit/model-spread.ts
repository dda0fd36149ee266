/**
 * The model's own uncertainty from Monte Carlo realizations of the rate
 * coefficients (docs/uncertainty.md; physics.md section 13): for every
 * quantity at every output time, the spread of log10 X over the
 * realizations, and the covariance between quantities from the same
 * realizations (Wakelam, Herbst & Selsis 2006, A&A 451, 551 use the
 * spread of log X as the model's error bar).
 *
 * Pure computation on typed arrays; the realizations arrive as one
 * Float64Array of log10 values per realization.
 */
import { ABUNDANCE_FLOOR } from './model-quantities.ts';

/** log10 of an abundance with the fit's numerical floor (src/fit/model-quantities.ts). */
export function log10Abundance(x: number): number {
  return Math.log10(x > ABUNDANCE_FLOOR ? x : ABUNDANCE_FLOOR);
}

/** log10 of every value of every realization (abundances row-major [time][species]). */
export function logRealizations(abundances: readonly Float64Array[]): Float64Array[] {
  return abundances.map((a) => Float64Array.from(a, log10Abundance));
}

export interface LogSpread {
  /** Per cell (time x quantity, row-major as the input): mean of log10 X over the realizations. */
  mean: Float64Array;
  /** Sample standard deviation (n - 1) of log10 X, dex. */
  sd: Float64Array;
  /** 15.87 %, 50 % and 84.13 % quantiles of log10 X (the one-sigma band of a normal; linear interpolation between order statistics). */
  lo: Float64Array;
  median: Float64Array;
  hi: Float64Array;
  realizations: number;
}

/** One-sigma quantiles of a normal distribution (Phi(-1), Phi(1)). */
const LOWER_ONE_SIGMA = 0.15865525393145707;
const UPPER_ONE_SIGMA = 0.8413447460685429;

/** Quantile p of sorted values, linear between order statistics (type 7 of Hyndman & Fan 1996, NumPy's default). */
export function sortedQuantile(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p;
  const i = Math.floor(h);
  return i + 1 < sorted.length ? sorted[i] + (h - i) * (sorted[i + 1] - sorted[i]) : sorted[i];
}

/** Mean, standard deviation and one-sigma band of log10 values over realizations. */
export function logSpread(logs: readonly Float64Array[]): LogSpread {
  const n = logs.length;
  if (n < 2) throw new Error('a spread needs at least two realizations');
  const cells = logs[0].length;
  const mean = new Float64Array(cells);
  const sd = new Float64Array(cells);
  const lo = new Float64Array(cells);
  const median = new Float64Array(cells);
  const hi = new Float64Array(cells);
  const column = new Float64Array(n);
  for (let c = 0; c < cells; c++) {
    // Sums of deviations from the first value (shifted data): identical values give exactly 0.
    const shift = logs[0][c];
    let s = 0;
    for (let r = 0; r < n; r++) {
      column[r] = logs[r][c];
      s += column[r] - shift;
    }
    const m = s / n;
    let ss = 0;
    for (let r = 0; r < n; r++) ss += (column[r] - shift - m) ** 2;
    mean[c] = shift + m;
    sd[c] = Math.sqrt(ss / (n - 1));
    column.sort();
    lo[c] = sortedQuantile(column, LOWER_ONE_SIGMA);
    median[c] = sortedQuantile(column, 0.5);
    hi[c] = sortedQuantile(column, UPPER_ONE_SIGMA);
  }
  return { mean, sd, lo, median, hi, realizations: n };
}

/**
 * Sample covariance (n - 1) of the log10 model values of several quantities
 * over the realizations: values[r][j] -> C[j * m + k], dex^2. The diagonal is
 * the square of the spread; the statistics' generalised chi^2 takes C as the
 * systematic (model) part of the residuals' covariance.
 */
export function logCovariance(values: readonly Float64Array[]): Float64Array {
  const n = values.length;
  if (n < 2) throw new Error('a covariance needs at least two realizations');
  const m = values[0].length;
  // Deviations from the first realization (shifted data, as logSpread): identical realizations (every F = 1) give exactly 0.
  const shift = values[0];
  const mean = new Float64Array(m);
  for (const v of values) for (let j = 0; j < m; j++) mean[j] += v[j] - shift[j];
  for (let j = 0; j < m; j++) mean[j] /= n;
  const c = new Float64Array(m * m);
  for (const v of values) {
    for (let j = 0; j < m; j++) {
      const dj = v[j] - shift[j] - mean[j];
      for (let k = 0; k <= j; k++) c[j * m + k] += (dj * (v[k] - shift[k] - mean[k])) / (n - 1);
    }
  }
  for (let j = 0; j < m; j++) for (let k = j + 1; k < m; k++) c[j * m + k] = c[k * m + j];
  return c;
}

/**
 * One sightline's model values at its best fit over the realizations:
 * values[i][a] is log10 of quantity term keys[a] in realization
 * realizations[i]. Realization r draws every rate once for all sightlines
 * (physics.md section 13), so two sightlines' values covary through the
 * realizations they have in common: the systematic model error of a joint
 * group.
 */
export interface RealizationLogs {
  keys: readonly string[];
  realizations: readonly number[];
  values: readonly Float64Array[];
}

/** How the model's own uncertainty of a quantity enters sigma_j^2 (a fit option). */
export type ModelUncertaintyMode = 'floor' | 'spread' | 'spread-and-floor';

/**
 * The model uncertainty of one quantity, dex: the fixed floor (physics.md
 * section 6), the realizations' spread instead of it, or both in quadrature.
 */
export function modelSigmaDex(mode: ModelUncertaintyMode, floorDex: number, spreadDex: number): number {
  switch (mode) {
    case 'floor':
      return floorDex;
    case 'spread':
      return spreadDex;
    case 'spread-and-floor':
      return Math.hypot(spreadDex, floorDex);
  }
}
