/**
 * Joint fit of a group of sightlines that share some parameters (one age for
 * a cloud's stars, one density for a core): at each combination of shared
 * grid values, chi^2 is the sum over members of each member's chi^2
 * minimised over its own (unshared) parameters; the group's best is the
 * combination of least summed chi^2. A profile of each shared parameter is
 * that sum minimised over the other shared parameters.
 */
import type { Axis } from './axes.ts';
import { candidateRef } from './candidate-ref.ts';
import { chiSquarePValue } from './chi-square.ts';
import type { FitContext } from './context.ts';
import { edgeWarnings, fittedParameterCount, quantityCounts } from './fit-sightline.ts';
import { intervalFromProfile } from './intervals.ts';
import type { ObservationVector } from './observation-vector.ts';
import { profileFromMinima } from './profiles.ts';
import { scoreCandidates } from './score.ts';
import type { JointFit, JointMember, ParameterInterval, Profile1D, SightlineProfiles } from './types.ts';

export interface JointFitOutput {
  fit: JointFit;
  profiles: SightlineProfiles;
}

/**
 * The independent axes whose value the shared values fix: the shared axes
 * themselves and any tied to them (sharing dust_temperature tied to
 * gas_temperature shares gas_temperature). Each is one fitted parameter of
 * the group, not one per member.
 */
function determinedBy(independent: readonly Axis[], keyOfCandidate: Int32Array, nKeys: number): string[] {
  const binOfKey = new Int32Array(nKeys);
  return independent
    .filter((axis) => {
      binOfKey.fill(-1);
      const bins = axis.binOfCandidate;
      for (let c = 0; c < bins.length; c++) {
        const k = keyOfCandidate[c];
        if (binOfKey[k] < 0) binOfKey[k] = bins[c];
        else if (binOfKey[k] !== bins[c]) return false;
      }
      return true;
    })
    .map((axis) => axis.name);
}

export function fitJoint(ctx: FitContext, name: string, members: readonly ObservationVector[], shared: readonly string[]): JointFitOutput {
  const { table, axes, options } = ctx;
  const sharedAxes: Axis[] = shared.map((s) => axes.byName.get(s)!);
  const strides = new Int32Array(sharedAxes.length);
  let nKeys = 1;
  for (let i = sharedAxes.length - 1; i >= 0; i--) {
    strides[i] = nKeys;
    nKeys *= sharedAxes[i].values.length;
  }
  const nC = table.nModels * table.nTimes;
  const keyOfCandidate = new Int32Array(nC);
  for (let i = 0; i < sharedAxes.length; i++) {
    const bins = sharedAxes[i].binOfCandidate;
    for (let c = 0; c < nC; c++) keyOfCandidate[c] += bins[c] * strides[i];
  }

  const total = new Float64Array(nKeys);
  const memberMin: Float64Array[] = [];
  const memberArg: Int32Array[] = [];
  for (const obs of members) {
    scoreCandidates(ctx.model, obs, table.nTimes, ctx.chi2);
    const mins = new Float64Array(nKeys).fill(Infinity);
    const args = new Int32Array(nKeys).fill(-1);
    for (let c = 0; c < nC; c++) {
      const k = keyOfCandidate[c];
      if (ctx.chi2[c] < mins[k]) {
        mins[k] = ctx.chi2[c];
        args[k] = c;
      }
    }
    for (let k = 0; k < nKeys; k++) total[k] += mins[k];
    memberMin.push(mins);
    memberArg.push(args);
  }
  let bestKey = 0;
  for (let k = 1; k < nKeys; k++) if (total[k] < total[bestKey]) bestKey = k;
  const chi2Best = total[bestKey];

  const sharedFree = determinedBy(axes.independent.map((n) => axes.byName.get(n)!), keyOfCandidate, nKeys);
  let fittedParameters = sharedFree.length;
  for (const obs of members) fittedParameters += fittedParameterCount(ctx, obs) - sharedFree.filter((n) => !(n in obs.held)).length;
  let counted = 0;
  for (const obs of members) {
    const c = quantityCounts(obs);
    counted += c.detections + (options.limitsInDof ? c.upperLimits + c.lowerLimits : 0);
  }
  const rawDof = counted - fittedParameters;
  const dof = Math.max(1, rawDof);
  const pValue = chiSquarePValue(chi2Best, dof);

  const memberFits: JointMember[] = members.map((obs, i) => ({
    sightline: obs.sightline,
    best: candidateRef(table, memberArg[i][bestKey], memberMin[i][bestKey], memberMin[i][bestKey]),
    chi2: memberMin[i][bestKey],
    counts: quantityCounts(obs),
  }));
  const sharedBest: Record<string, number> = {};
  const profiles: Profile1D[] = [];
  const intervals: ParameterInterval[] = [];
  sharedAxes.forEach((axis, i) => {
    const bestBin = Math.floor(bestKey / strides[i]) % axis.values.length;
    sharedBest[axis.name] = axis.values[bestBin];
    const mins = new Float64Array(axis.values.length).fill(Infinity);
    for (let k = 0; k < nKeys; k++) {
      const b = Math.floor(k / strides[i]) % axis.values.length;
      if (total[k] < mins[b]) mins[b] = total[k];
    }
    const profile = profileFromMinima(axis.name, axis.values, mins, chi2Best);
    profiles.push(profile);
    for (const level of options.levels) intervals.push(intervalFromProfile(profile, axis.values[bestBin], level));
  });

  const warnings: string[] = [];
  if (rawDof < 1) warnings.push(`joint group ${name}: ${counted} counted quantities for ${fittedParameters} fitted parameters: dof raised to 1, so the p-value does not test this fit.`);
  if (pValue < options.poorFitP) {
    warnings.push(`joint group ${name}: poor fit: chi2 = ${chi2Best.toFixed(2)} for ${dof} dof (p = ${pValue.toExponential(2)} < ${options.poorFitP}): the members are not consistent with one shared ${shared.join(' and ')} within the grid.`);
  }
  warnings.push(...edgeWarnings(`joint group ${name}`, intervals, options.levels[0].level));

  return {
    fit: { name, members: members.map((m) => m.sightline), shared: [...shared], sharedBest, chi2: chi2Best, dof, reducedChi2: chi2Best / dof, pValue, fittedParameters, memberFits, profiles, intervals, warnings },
    profiles: { sightline: name, chi2Best, profiles, pairs: [] },
  };
}
