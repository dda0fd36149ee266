/**
 * The pipeline's `realizations:` section (docs/uncertainty.md): Monte Carlo
 * realizations of the rate coefficients at each fitted sightline's best-fit
 * model, run on the worker pool into OUT/store/realizations.sqlite (stored
 * and resumable like grid models), and what they say: the spread of every
 * fitted quantity over time, the covariance of the quantities at the best
 * fit, and the reactions each quantity and each sightline's chi^2 hang on.
 */
import { describeReaction } from '../chem/reaction-text.ts';
import { drawRateFactors, uncertaintyFactor } from '../chem/uncertainty.ts';
import type { Network } from '../chem/network-types.ts';
import type { Pipeline } from '../config/pipeline.ts';
import { UserError } from '../config/errors.ts';
import type { RealizationsSection } from '../config/sections/realizations.ts';
import { censoredCost } from '../fit/censored.ts';
import type { ModelCovariance } from '../fit/covariance.ts';
import { termKey } from '../fit/model-quantities.ts';
import { log10Abundance, logCovariance, logSpread, type RealizationLogs } from '../fit/model-spread.ts';
import { chanceCoefficient, rankReactions } from '../fit/sensitivity.ts';
import type { FitStageResult, QuantityScore } from '../fit/types.ts';
import type { GridPlan, PlannedPoint } from '../grid/plan.ts';
import { readRealizations, realizationStoreFile, runRealizations, type RealizationBase } from '../grid/realizations.ts';
import type { ModelTrack, SightlineSensitivity } from '../report/types.ts';
import type { GridRunResult } from '../grid/run.ts';

export const SPREAD_FORMAT = 'hoarfrost-spread/1';
/** Reactions kept per quantity in spread.json and drawn in the figure (the CSV has all). */
export const TOP_REACTIONS = 10;

export interface RankedReaction {
  /** 1-based number of the reaction in the network file. */
  reaction: number;
  equation: string;
  law: string;
  uncertaintyFactor: number;
  coefficient: number;
}

export interface QuantitySpread {
  label: string;
  key: string;
  /** log10 of the quantity over time: the 15.9 %, 50 % and 84.1 % quantiles of the realizations, and their standard deviation (dex). */
  lo: number[];
  median: number[];
  hi: number[];
  sdDex: number[];
  /** The spread at the best-fit age, dex: what fit.model_uncertainty uses. */
  sdDexAtBest: number;
  top: RankedReaction[];
}

export interface SightlineSpread {
  sightline: string;
  modelId: string;
  ageYr: number;
  timesYr: number[];
  realizations: number;
  missing: number;
  quantities: QuantitySpread[];
  /** Covariance of the quantities' log10 at the best-fit age, dex^2, rows and columns in `quantities` order. */
  covariance: number[][];
  /** chi^2 of the best-fit candidate in each realization (the best fit's widths): its spread, and the reactions it hangs on. */
  chi2: { median: number; lo: number; hi: number; top: RankedReaction[] };
}

export interface SpreadReport {
  format: typeof SPREAD_FORMAT;
  count: number;
  seed: number;
  method: RealizationsSection['method'];
  /** |coefficient| that chance alone reaches with these realizations and reactions (Fisher z, Bonferroni, 5 %). */
  chanceCoefficient: number | null;
  sightlines: SightlineSpread[];
}

export interface SpreadAtBestFits {
  report: SpreadReport;
  /** Every coefficient: sightline, quantity (or chi2), age, rank, reaction, equation, law, F, coefficient. */
  csvRows: (string | number)[][];
  run: GridRunResult;
  /** Per sightline: its quantities' log10 at the best fit in each realization (kept in memory for the joint groups' covariance between members; not in spread.json). */
  logs: Map<string, RealizationLogs>;
}

export const SENSITIVITY_CSV_HEADER = ['sightline', 'quantity', 'age_yr', 'rank', 'reaction', 'equation', 'law', 'uncertainty_factor', 'coefficient'];

/** The chi^2 of one candidate's model values against the best fit's residual rows (their observed values and widths). */
function chi2Of(rows: readonly QuantityScore[], model: readonly number[]): number {
  let chi2 = 0;
  rows.forEach((q, j) => {
    const d = model[j] - q.observedLog10;
    if (q.kind === 'detection') chi2 += (d / q.sigmaDex) ** 2;
    else chi2 += censoredCost((q.kind === 'upper' ? -d : d) / q.sigmaDex);
  });
  return chi2;
}

export async function spreadAtBestFits(pipeline: Pipeline, plan: GridPlan, fit: FitStageResult, section: RealizationsSection, options: { workers?: number; progress(line: string): void }): Promise<SpreadAtBestFits> {
  const wanted = section.sightlines ?? fit.fits.map((f) => f.sightline);
  const fits = wanted.map((id) => {
    const f = fit.fits.find((x) => x.sightline === id);
    if (!f) throw new UserError(`realizations.sightlines names '${id}', which has no fit; name fitted sightlines (${fit.fits.slice(0, 8).map((x) => x.sightline).join(', ')}).`, { file: pipeline.file, line: pipeline.yaml.lineOf(['realizations', 'sightlines']), field: 'realizations.sightlines' });
    return f;
  });
  const pointOf = new Map(plan.points.map((p) => [p.id, p]));
  // A best fit between grid values (the fit's refined mesh, id `~...`) has no model of its own: its realizations run at the nearest grid model.
  // A column summed over layers is many models: realizations run at single models only.
  for (const f of fits) {
    if (pointOf.has(f.best.modelId) || f.best.modelId.startsWith('~')) continue;
    throw new UserError(
      `realizations: the best fit of ${f.sightline} (${f.best.modelId}) is not one model of the grid (a column summed over layers has one model per layer); realizations run at single models. Remove the realizations section, or fit single-point sightlines.`,
      { file: pipeline.file, line: pipeline.yaml.lineOf(['realizations']), field: 'realizations' },
    );
  }
  const nodeOf = new Map(fits.map((f) => [f.sightline, pointOf.has(f.best.modelId) ? f.best.modelId : nearestGridModel(plan, f.best.parameters)]));
  // Each base with its own track when track parameters are grid axes (the setup's track would be the axis's first value).
  const baseOf = (p: PlannedPoint): RealizationBase => ({ id: p.id, conditions: p.conditions, ...(p.track ? { track: p.track, trackParameters: p.trackParameters } : {}) });
  const bases = [...new Set(nodeOf.values())].map((id) => baseOf(pointOf.get(id)!));
  const settings = { count: section.count, seed: section.seed };
  const run = await runRealizations(pipeline, plan, bases, settings, {
    workers: options.workers,
    onStart: (i) => options.progress(`realizations: ${i.share} (${bases.length} best-fit models x ${section.count}), ${i.upToDate} already in the store, ${i.todo} to compute on ${i.workers} worker${i.workers === 1 ? '' : 's'}`),
  });
  const sets = new Map(readRealizations(realizationStoreFile(plan), run.plan, bases, settings).map((s) => [s.baseId, s]));
  const network: Network = plan.network;
  const epsilonOf = new Map<number, Float64Array>();
  const epsilon = (r: number) => {
    if (!epsilonOf.has(r)) epsilonOf.set(r, drawRateFactors(network, { seed: settings.seed, realization: r }).epsilon);
    return epsilonOf.get(r)!;
  };
  const drawn = network.reactions.filter((r) => uncertaintyFactor(r) !== 1).length;
  const ranked = (eps: Float64Array[], value: number[]): RankedReaction[] =>
    rankReactions(eps, value, section.method).map((c) => {
      const r = network.reactions[c.reaction];
      return { reaction: c.reaction + 1, equation: describeReaction(r), law: r.law, uncertaintyFactor: uncertaintyFactor(r), coefficient: c.coefficient };
    });

  const csvRows: (string | number)[][] = [];
  const logs = new Map<string, RealizationLogs>();
  let realizationsUsed = section.count;
  const sightlines: SightlineSpread[] = fits.map((f) => {
    const modelId = nodeOf.get(f.sightline)!;
    const set = sets.get(modelId)!;
    if (set.abundances.length < 2) throw new UserError(`only ${set.abundances.length} of ${section.count} realizations of the best fit of ${f.sightline} finished; a spread needs two. See the failures with 'hoarfrost grid --status'.`);
    realizationsUsed = Math.min(realizationsUsed, set.abundances.length);
    const eps = set.realizations.map(epsilon);
    const nSpecies = set.species.length;
    const nTimes = set.timesYr.length;
    const column = new Map(set.species.map((s, i) => [s, i]));
    // The output time nearest the best-fit age in log (the refined mesh's times lie between the grid's).
    const t = nearestTimeIndex(set.timesYr, f.best.ageYr);
    const quantityLogs = f.residuals.map((q) => {
      const num = column.get(q.numerator)!;
      const den = q.denominator === undefined ? undefined : column.get(q.denominator)!;
      return set.abundances.map((a) => Float64Array.from({ length: nTimes }, (_, k) => log10Abundance(a[k * nSpecies + num]) - (den === undefined ? 0 : log10Abundance(a[k * nSpecies + den]))));
    });
    const quantities: QuantitySpread[] = f.residuals.map((q, j) => {
      const s = logSpread(quantityLogs[j]);
      const top = ranked(eps, quantityLogs[j].map((l) => l[t]));
      top.forEach((c, rank) => csvRows.push([f.sightline, q.label, set.timesYr[t], rank + 1, c.reaction, c.equation, c.law, c.uncertaintyFactor, c.coefficient]));
      return { label: q.label, key: termKey(q.numerator, q.denominator), lo: Array.from(s.lo), median: Array.from(s.median), hi: Array.from(s.hi), sdDex: Array.from(s.sd), sdDexAtBest: s.sd[t], top: top.slice(0, TOP_REACTIONS) };
    });
    const atBest = set.abundances.map((_, r) => Float64Array.from(quantityLogs, (l) => l[r][t]));
    logs.set(f.sightline, { keys: quantities.map((x) => x.key), realizations: set.realizations, values: atBest });
    const cov = logCovariance(atBest);
    const m = f.residuals.length;
    const chi2 = atBest.map((v) => chi2Of(f.residuals, Array.from(v)));
    const sortedChi2 = Float64Array.from(chi2).sort();
    const chi2Top = ranked(eps, chi2);
    chi2Top.forEach((c, rank) => csvRows.push([f.sightline, 'chi2', set.timesYr[t], rank + 1, c.reaction, c.equation, c.law, c.uncertaintyFactor, c.coefficient]));
    const q = (p: number) => sortedChi2[Math.min(sortedChi2.length - 1, Math.round(p * (sortedChi2.length - 1)))];
    return {
      sightline: f.sightline,
      modelId,
      ageYr: set.timesYr[t],
      timesYr: Array.from(set.timesYr),
      realizations: set.abundances.length,
      missing: set.missing.length,
      quantities,
      covariance: Array.from({ length: m }, (_, j) => Array.from(cov.subarray(j * m, (j + 1) * m))),
      chi2: { median: q(0.5), lo: q(0.1587), hi: q(0.8413), top: chi2Top.slice(0, TOP_REACTIONS) },
    };
  });
  const chance = chanceCoefficient(realizationsUsed, drawn);
  return {
    report: { format: SPREAD_FORMAT, count: section.count, seed: section.seed, method: section.method, chanceCoefficient: Number.isFinite(chance) ? chance : null, sightlines },
    csvRows,
    run,
    logs,
  };
}

/** The grid model nearest a point of parameter space: least sum of squared log10 ratios (differences where a value is not positive) over the point's parameters. */
export function nearestGridModel(plan: GridPlan, parameters: Readonly<Record<string, number>>): string {
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const p of plan.points) {
    const conditions = { ...(p.conditions as unknown as Record<string, number>), ...(p.trackParameters ?? {}) } as Record<string, number>;
    let d = 0;
    for (const [name, value] of Object.entries(parameters)) {
      const g = conditions[name];
      if (g === undefined) continue;
      d += g > 0 && value > 0 ? Math.log10(g / value) ** 2 : (g - value) ** 2;
    }
    if (d < bestDistance) {
      bestDistance = d;
      best = p.id;
    }
  }
  if (best === undefined) throw new RangeError('the grid plan has no model');
  return best;
}

/** The index of the time nearest `ageYr` in log10 (times positive and ascending). */
export function nearestTimeIndex(timesYr: ArrayLike<number>, ageYr: number): number {
  let best = 0;
  for (let k = 1; k < timesYr.length; k++) if (Math.abs(Math.log10(timesYr[k] / ageYr)) < Math.abs(Math.log10(timesYr[best] / ageYr))) best = k;
  return best;
}

/** Each sightline's spread of each quantity term at its best fit, dex: the fit's model-uncertainty input. */
export function modelSpreadOf(report: SpreadReport): Map<string, Map<string, number>> {
  return new Map(report.sightlines.map((s) => [s.sightline, new Map(s.quantities.map((q) => [q.key, q.sdDexAtBest]))]));
}

/**
 * Each sightline's covariance of its quantity terms' log10 at its best fit,
 * dex^2, over the realizations: the model part of that sightline's
 * covariance in the generalised chi^2 (fit.model_uncertainty spread or
 * spread-and-floor; docs/uncertainty.md section 4).
 */
export function modelCovarianceOf(report: SpreadReport): Map<string, ModelCovariance> {
  return new Map(report.sightlines.map((s) => [s.sightline, { keys: s.quantities.map((q) => q.key), matrix: Float64Array.from(s.covariance.flat()) }]));
}

/** a(time) - b(time), linear in log10 time between the given times, held at the ends. */
function interpolateLogTime(timesYr: readonly number[], a: readonly number[], b: readonly number[], time: number): number {
  const n = timesYr.length;
  if (!(time > timesYr[0])) return a[0] - b[0];
  if (!(time < timesYr[n - 1])) return a[n - 1] - b[n - 1];
  let k = 0;
  while (timesYr[k + 1] < time) k++;
  const w = Math.log10(time / timesYr[k]) / Math.log10(timesYr[k + 1] / timesYr[k]);
  return (1 - w) * (a[k] - b[k]) + w * (a[k + 1] - b[k + 1]);
}

/** The best-fit tracks with the realizations' 68 % band, and each sightline's chi^2 sensitivity, as the report takes them. */
export function spreadForReport(tracks: ModelTrack[], report: SpreadReport | undefined): { tracks: ModelTrack[]; sensitivity?: SightlineSensitivity[] } {
  if (!report) return { tracks };
  const bySightline = new Map(report.sightlines.map((s) => [s.sightline, s]));
  const banded = tracks.map((t) => {
    const s = bySightline.get(t.sightline);
    const q = s?.quantities.find((x) => x.label === t.label);
    if (!s || !q || t.role !== 'best') return t;
    if (t.modelId === s.modelId) return { ...t, band: { lo: q.lo, hi: q.hi, realizations: s.realizations } };
    // A best fit between grid values: the nearest grid model's spread about its median, interpolated in log time to the track's times and centred on the track.
    const lo: number[] = [];
    const hi: number[] = [];
    t.timesYr.forEach((time, i) => {
      const v = t.log10[i];
      lo.push(v === null ? NaN : v + interpolateLogTime(s.timesYr, q.lo, q.median, time));
      hi.push(v === null ? NaN : v + interpolateLogTime(s.timesYr, q.hi, q.median, time));
    });
    return { ...t, band: { lo, hi, realizations: s.realizations, nearestModel: s.modelId } };
  });
  const sensitivity = report.sightlines.map((s) => ({
    sightline: s.sightline,
    method: report.method,
    realizations: s.realizations,
    chanceCoefficient: report.chanceCoefficient,
    ageYr: s.ageYr,
    top: s.chi2.top.map((c) => ({ reaction: `${c.reaction}: ${c.equation}`, coefficient: c.coefficient })),
  }));
  return { tracks: banded, sensitivity };
}
