/**
 * The fit of one sightline: chi^2 of every candidate, the best candidate with
 * its reduced chi^2, p-value and agreement fraction, runner-ups within the
 * first confidence level, profiles and intervals of every fitted parameter,
 * 2-D profiles of the chosen pairs, and the warnings a reader needs.
 */
import { candidateRef } from './candidate-ref.ts';
import { chiSquarePValue } from './chi-square.ts';
import type { FitContext } from './context.ts';
import { degreesOfFreedom } from './dof.ts';
import { intervalFromProfile } from './intervals.ts';
import { usedCount, type ObservationVector } from './observation-vector.ts';
import { posteriorFromChi2 } from './posterior.ts';
import { profile1D, profile2D } from './profiles.ts';
import { scoreBreakdown, scoreCandidates } from './score.ts';
import type { CandidateRef, ParameterInterval, Profile1D, QuantityCounts, SightlineFit, SightlineProfiles } from './types.ts';

export interface SightlineFitOutput {
  fit: SightlineFit;
  profiles: SightlineProfiles;
}

export function argMin(values: Float64Array): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (values[i] < values[best]) best = i;
  return best;
}

export function quantityCounts(obs: ObservationVector): QuantityCounts {
  return { detections: obs.detections.length, upperLimits: obs.upperLimits.length, lowerLimits: obs.lowerLimits.length, skipped: obs.skipped.length };
}

/** Candidates within `deltaChi2` of the best, best first: the count and the first `limit` after the best. */
export function candidatesWithin(ctx: FitContext, chi2: Float64Array, bestIndex: number, deltaChi2: number, limit: number): { count: number; runnerUps: CandidateRef[] } {
  const chi2Best = chi2[bestIndex];
  const inside: number[] = [];
  // The test of the intervals (chi^2 - best against the threshold), so that the two never disagree by round-off.
  for (let c = 0; c < chi2.length; c++) if (chi2[c] - chi2Best <= deltaChi2) inside.push(c);
  inside.sort((a, b) => chi2[a] - chi2[b] || a - b);
  const runnerUps = inside
    .filter((c) => c !== bestIndex)
    .slice(0, limit)
    .map((c) => candidateRef(ctx.table, c, chi2[c], chi2Best));
  return { count: inside.length, runnerUps };
}

function formatValue(v: number): string {
  return Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-2 && v !== 0) ? v.toExponential(2) : String(Number(v.toPrecision(4)));
}

export function edgeWarnings(name: string, intervals: ParameterInterval[], firstLevel: number): string[] {
  const out: string[] = [];
  for (const iv of intervals) {
    if (iv.level !== firstLevel || (!iv.loAtEdge && !iv.hiAtEdge)) continue;
    const edges = [iv.loAtEdge ? `lower edge (${formatValue(iv.lo)})` : '', iv.hiAtEdge ? `upper edge (${formatValue(iv.hi)})` : ''].filter(Boolean).join(' and ');
    out.push(`${name}: the ${(iv.level * 100).toFixed(1)}% interval of ${iv.parameter} reaches the grid's ${edges}: the truth may lie outside the grid; extend the grid along ${iv.parameter} to bound it.`);
  }
  return out;
}

/** Independent varied axes of the grid less those held for this sightline. */
export function fittedParameterCount(ctx: FitContext, obs: ObservationVector): number {
  return ctx.axes.independent.filter((n) => !(n in obs.held)).length;
}

export function fitSightline(ctx: FitContext, obs: ObservationVector): SightlineFitOutput {
  const { table, model, axes, options } = ctx;
  if (usedCount(obs) === 0) throw new RangeError(`sightline ${obs.sightline} has no quantity to fit`);
  const chi2 = ctx.chi2;
  scoreCandidates(model, obs, table.nTimes, chi2);
  const bestIndex = argMin(chi2);
  const chi2Best = chi2[bestIndex];
  const best = candidateRef(table, bestIndex, chi2Best, chi2Best);
  const counts = quantityCounts(obs);
  const fittedParameters = fittedParameterCount(ctx, obs);
  const { dof, floored, counted } = degreesOfFreedom(counts, fittedParameters, options.limitsInDof);
  const pValue = chiSquarePValue(chi2Best, dof);
  const residuals = scoreBreakdown(model, obs, bestIndex, options.agreementDex);
  const agreementFraction = residuals.filter((r) => r.agrees).length / residuals.length;
  const firstLevel = options.levels[0];
  const { count, runnerUps } = candidatesWithin(ctx, chi2, bestIndex, firstLevel.deltaChi2, options.runnerUps);

  const profiles: Profile1D[] = [];
  const intervals: ParameterInterval[] = [];
  for (const axis of axes.axes) {
    if (!axis.varied || axis.name in obs.held) continue;
    const profile = profile1D(chi2, axis, chi2Best);
    profiles.push(profile);
    const bestValue = axis.values[axis.binOfCandidate[bestIndex]];
    for (const level of options.levels) intervals.push(intervalFromProfile(profile, bestValue, level));
  }
  const pairs = options.pairs.filter(([x, y]) => !(x in obs.held) && !(y in obs.held)).map(([x, y]) => profile2D(chi2, axes.byName.get(x)!, axes.byName.get(y)!, chi2Best));

  const fitted = axes.axes.filter((a) => a.varied && !(a.name in obs.held) && axes.independent.includes(a.name)).map((a) => a.name);
  const posterior = options.posterior ? posteriorFromChi2(chi2, axes, fitted, options.levels, options.pairs) : undefined;
  const id = obs.sightline;
  const warnings: string[] = [];
  if (obs.skipped.length > 0) warnings.push(`${id}: no measurement of ${obs.skipped.join(', ')}: fitted without ${obs.skipped.length === 1 ? 'it' : 'them'}.`);
  if (floored) {
    const what = options.limitsInDof ? `${counted} detection(s) and limit(s)` : `${counts.detections} detection(s)`;
    warnings.push(`${id}: ${what} for ${fittedParameters} fitted parameters: dof raised to 1, so the p-value does not test this fit (the parameters are not all constrained).`);
  }
  if (pValue < options.poorFitP) {
    warnings.push(`${id}: poor fit: chi2 = ${chi2Best.toFixed(2)} for ${dof} dof (p = ${pValue.toExponential(2)} < ${options.poorFitP}): no model of the grid reproduces these data within their errors and the ${options.modelSigmaDex} dex model floor, and the Delta chi2 regions, which assume a good fit at the minimum, understate the uncertainty.`);
  }
  warnings.push(...edgeWarnings(id, intervals, firstLevel.level));

  return {
    fit: {
      sightline: id,
      best,
      dof,
      reducedChi2: chi2Best / dof,
      pValue,
      agreementFraction,
      counts,
      fittedParameters,
      heldParameters: { ...obs.held },
      residuals,
      runnerUps,
      candidatesInRegion: count,
      intervals,
      ...(posterior ? { posterior } : {}),
      warnings,
    },
    profiles: { sightline: id, chi2Best, profiles, pairs },
  };
}
