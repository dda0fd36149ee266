/**
 * The posterior reading of a grid fit (docs/statistics.md section 8;
 * physics.md section 12): posterior proportional to prior x exp(-chi^2 / 2)
 * over the candidates (the refined mesh where there is one), with priors
 * uniform in log10 of each fitted parameter (uniform in the value itself for
 * an axis with values <= 0). Each candidate carries the prior mass of its
 * cell: the product over fitted axes of the cell's width in the prior's
 * coordinate (half-way to each neighbour; half a cell at the edges), so an
 * uneven grid does not weigh its dense parts more.
 *
 * From it: marginal posteriors of each fitted parameter (the sum over every
 * other parameter), their mean and standard deviation in the prior's
 * coordinate, and credible intervals at each level, equal-tailed and highest
 * density (HDI), read from the cumulative mass with linear interpolation
 * within cells. This is the second implementation of the fit's method seam:
 * the profile (minimise over the others) and the posterior (marginalise with
 * priors) read the same chi^2 array of the same candidate table.
 */
import type { Axis, GridAxes } from './axes.ts';
import type { CredibleInterval, MarginalPosterior, PosteriorSummary, RegionLevel } from './types.ts';

/** Cell widths of an axis in its prior coordinate (log10 for positive values). */
function cellWidths(values: Float64Array): { u: Float64Array; width: Float64Array; log: boolean } {
  const log = values[0] > 0;
  const u = Float64Array.from(values, (v) => (log ? Math.log10(v) : v));
  const n = u.length;
  const width = new Float64Array(n);
  if (n === 1) width[0] = 1;
  for (let i = 0; i < n && n > 1; i++) {
    const left = i > 0 ? 0.5 * (u[i] - u[i - 1]) : 0;
    const right = i < n - 1 ? 0.5 * (u[i + 1] - u[i]) : 0;
    width[i] = left + right;
  }
  return { u, width, log };
}

/** Equal-tailed bounds from a binned density: cumulative mass interpolated linearly across each cell. */
function quantileOfBins(u: Float64Array, width: Float64Array, mass: Float64Array, q: number): number {
  let acc = 0;
  const n = u.length;
  for (let i = 0; i < n; i++) {
    if (acc + mass[i] >= q) {
      const lo = i > 0 ? u[i] - 0.5 * (u[i] - u[i - 1]) : u[i];
      const f = mass[i] > 0 ? (q - acc) / mass[i] : 0;
      return lo + f * width[i];
    }
    acc += mass[i];
  }
  return u[n - 1];
}

function marginal(axis: Axis, weight: Float64Array, levels: readonly RegionLevel[], prior: string): { marginal: MarginalPosterior; intervals: CredibleInterval[] } {
  const { u, width, log } = cellWidths(axis.values);
  const n = u.length;
  const mass = new Float64Array(n);
  const bins = axis.binOfCandidate;
  for (let c = 0; c < weight.length; c++) mass[bins[c]] += weight[c];
  let total = 0;
  for (let i = 0; i < n; i++) total += mass[i];
  for (let i = 0; i < n; i++) mass[i] /= total;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += mass[i] * u[i];
  let variance = 0;
  for (let i = 0; i < n; i++) variance += mass[i] * (u[i] - mean) ** 2;
  const fromU = (x: number) => (log ? Math.pow(10, x) : x);
  const intervals: CredibleInterval[] = [];
  for (const level of levels) {
    const tail = 0.5 * (1 - level.level);
    // Highest density: cells by density (mass per width), densest first, until the level's mass.
    const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => mass[b] / (width[b] || 1) - mass[a] / (width[a] || 1));
    const inside = new Uint8Array(n);
    let acc = 0;
    for (const i of order) {
      if (acc >= level.level) break;
      inside[i] = 1;
      acc += mass[i];
    }
    let first = -1;
    let last = -1;
    for (let i = 0; i < n; i++) {
      if (!inside[i]) continue;
      if (first < 0) first = i;
      last = i;
    }
    let gaps = false;
    for (let i = first; i <= last; i++) if (!inside[i]) gaps = true;
    intervals.push({
      parameter: axis.name,
      level: level.level,
      lo: fromU(quantileOfBins(u, width, mass, tail)),
      hi: fromU(quantileOfBins(u, width, mass, 1 - tail)),
      hdiLo: fromU(first > 0 ? u[first] - 0.5 * (u[first] - u[first - 1]) : u[first]),
      hdiHi: fromU(last < n - 1 ? u[last] + 0.5 * (u[last + 1] - u[last]) : u[last]),
      hdiDisjoint: gaps,
      loAtEdge: mass[0] > tail * 0.5,
      hiAtEdge: mass[n - 1] > tail * 0.5,
    });
  }
  return {
    marginal: { parameter: axis.name, prior, values: Array.from(axis.values), probability: Array.from(mass), meanLog: log ? mean : null, sdLog: log ? Math.sqrt(variance) : null },
    intervals,
  };
}

/**
 * The posterior of one fit from its chi^2 array (Infinity: a candidate not
 * open to the sightline, weight 0). `fitted` are the fitted axes (held ones
 * excluded). Priors: uniform in log10 of each (PRIOR_TEXT).
 */
export function posteriorFromChi2(chi2: Float64Array, axes: GridAxes, fitted: readonly string[], levels: readonly RegionLevel[], pairs: readonly [string, string][] = []): PosteriorSummary {
  let best = Infinity;
  for (let c = 0; c < chi2.length; c++) if (chi2[c] < best) best = chi2[c];
  const fittedAxes = fitted.map((n) => axes.byName.get(n)!);
  const cellWidth = fittedAxes.map((a) => cellWidths(a.values).width);
  const weight = new Float64Array(chi2.length);
  for (let c = 0; c < chi2.length; c++) {
    if (!Number.isFinite(chi2[c])) continue;
    let w = Math.exp(-0.5 * (chi2[c] - best));
    for (let k = 0; k < fittedAxes.length; k++) w *= cellWidth[k][fittedAxes[k].binOfCandidate[c]];
    weight[c] = w;
  }
  const marginals: MarginalPosterior[] = [];
  const intervals: CredibleInterval[] = [];
  for (const axis of fittedAxes) {
    const prior = axis.values[0] > 0 ? `uniform in log10 ${axis.name}` : `uniform in ${axis.name}`;
    const m = marginal(axis, weight, levels, prior);
    marginals.push(m.marginal);
    intervals.push(...m.intervals);
  }
  const joint = pairs
    .filter(([x, y]) => fitted.includes(x) && fitted.includes(y))
    .map(([x, y]) => {
      const ax = axes.byName.get(x)!;
      const ay = axes.byName.get(y)!;
      const nx = ax.values.length;
      const cells = new Float64Array(nx * ay.values.length);
      let total = 0;
      for (let c = 0; c < weight.length; c++) {
        cells[ay.binOfCandidate[c] * nx + ax.binOfCandidate[c]] += weight[c];
        total += weight[c];
      }
      return { x, y, xValues: Array.from(ax.values), yValues: Array.from(ay.values), probability: Array.from(cells, (v) => v / total) };
    });
  return { priors: marginals.map((m) => m.prior), marginals, intervals, pairs: joint };
}
