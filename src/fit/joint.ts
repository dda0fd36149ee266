/**
 * Joint fit of a group of sightlines that share some parameters (one age for
 * a cloud's stars, one density for a core): at each combination of shared
 * grid values, chi^2 is the sum over members of each member's chi^2
 * minimised over its own (unshared) parameters; the group's best is the
 * combination of least summed chi^2. A profile of each shared parameter is
 * that sum minimised over the other shared parameters.
 */
import type { Axis, GridAxes } from './axes.ts';
import { posteriorFromChi2 } from './posterior.ts';
import { candidateRef } from './candidate-ref.ts';
import { chiSquarePValue } from './chi-square.ts';
import type { FitContext } from './context.ts';
import { edgeWarnings, fittedParameterCount, quantityCounts } from './fit-sightline.ts';
import { intervalFromProfile } from './intervals.ts';
import type { ObservationVector, ScoringWidths } from './observation-vector.ts';
import { profileFromMinima } from './profiles.ts';
import { scoreCandidates } from './score.ts';
import { censoredCost } from './censored.ts';
import { choleskyLower, whitenedChiSquare } from './covariance.ts';
import { detectionCovariance } from './observation-vector.ts';
import type { JointFit, JointMember, ParameterInterval, PosteriorSummary, Profile1D, SightlineProfiles } from './types.ts';

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

/**
 * The model covariance of a joint group from Monte Carlo realizations
 * (docs/statistics.md section 6, docs/uncertainty.md section 4): each
 * member's detections' covariance as its own fit has it, and the
 * covariance between members' detections.
 */
export interface JointModelCovariance {
  /** Per member: the covariance of its detections, nd x nd row-major (detectionCovariance with its own widths). */
  blocks: readonly Float64Array[];
  /** D x D over all members' detections in member order (D = the sum of nd); only entries between two different members are read, dex^2. */
  between: Float64Array;
}

/** How a group's model error is shared (the stage sets it from fit.model_uncertainty; a plain floor fit needs none of it). */
export interface JointModelError {
  /** The realizations' covariance between members (spread modes with realizations at every member's best fit). */
  modelCovariance?: JointModelCovariance;
  /** Each member's scoring widths as its own fit had them (spread modes); default: the fit options. */
  memberWidths?: readonly ScoringWidths[];
  /** False: no floor part is shared (fit.model_uncertainty spread uses no floor). Default true. */
  sharedFloor?: boolean;
}

export function fitJoint(ctx: FitContext, name: string, members: readonly ObservationVector[], shared: readonly string[], modelError: JointModelError = {}): JointFitOutput {
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
  if (modelError.modelCovariance !== undefined) denseModelError(ctx, members, memberArg, total, modelError.modelCovariance);
  else if (ctx.options.sharedModelSigmaDex > 0 && modelError.sharedFloor !== false) sharedModelError(ctx, members, memberArg, total, modelError.memberWidths);
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

  // The posterior over the shared values (members' own parameters profiled, not marginalised: docs/statistics.md section 8).
  let posterior: PosteriorSummary | undefined;
  if (options.posterior) {
    const keyAxes: Axis[] = sharedAxes.map((axis, i) => ({ name: axis.name, values: axis.values, varied: axis.values.length > 1, binOfCandidate: Int32Array.from({ length: nKeys }, (_, k) => Math.floor(k / strides[i]) % axis.values.length) }));
    const keyGrid: GridAxes = { axes: keyAxes, byName: new Map(keyAxes.map((a) => [a.name, a])), independent: keyAxes.filter((a) => a.varied).map((a) => a.name) };
    const sharedPairs = options.pairs.filter(([x, y]) => shared.includes(x) && shared.includes(y));
    posterior = posteriorFromChi2(total, keyGrid, keyGrid.independent, options.levels, sharedPairs);
  }
  const warnings: string[] = [];
  if (rawDof < 1) warnings.push(`joint group ${name}: ${counted} counted quantities for ${fittedParameters} fitted parameters: dof raised to 1, so the p-value does not test this fit.`);
  if (pValue < options.poorFitP) {
    warnings.push(`joint group ${name}: poor fit: chi2 = ${chi2Best.toFixed(2)} for ${dof} dof (p = ${pValue.toExponential(2)} < ${options.poorFitP}): the members are not consistent with one shared ${shared.join(' and ')} within the grid.`);
  }
  warnings.push(...edgeWarnings(`joint group ${name}`, intervals, options.levels[0].level));

  return {
    fit: { name, members: members.map((m) => m.sightline), shared: [...shared], sharedBest, chi2: chi2Best, dof, reducedChi2: chi2Best / dof, pValue, fittedParameters, memberFits, profiles, intervals, ...(posterior ? { posterior } : {}), warnings },
    profiles: { sightline: name, chi2Best, profiles, pairs: [] },
  };
}

/** Inverse of a symmetric positive-definite matrix from its Cholesky factor (small matrices: a member's detections). */
function inverseFromCholesky(l: Float64Array, n: number): Float64Array {
  const inv = new Float64Array(n * n);
  const col = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    col.fill(0);
    col[j] = 1;
    solveCholesky(l, n, col);
    for (let i = 0; i < n; i++) inv[i * n + j] = col[i];
  }
  return inv;
}

/** Solves L L^T x = b in place. */
function solveCholesky(l: Float64Array, n: number, b: Float64Array): void {
  for (let i = 0; i < n; i++) {
    let acc = b[i];
    for (let k = 0; k < i; k++) acc -= l[i * n + k] * b[k];
    b[i] = acc / l[i * n + i];
  }
  for (let i = n - 1; i >= 0; i--) {
    let acc = b[i];
    for (let k = i + 1; k < n; k++) acc -= l[k * n + i] * b[k];
    b[i] = acc / l[i * n + i];
  }
}

/**
 * The group's chi^2 with the model error of each quantity shared by all
 * members (docs/statistics.md section 6): C = B + U S U^T, B the members'
 * own covariances (block diagonal, each with the independent part of the
 * floor on its diagonal), S = diag(sigma_shared^2) per quantity term and U the indicator
 * of a member's detection of that term; so an error the model makes for every
 * sightline alike is one error, not N independent ones. By the Woodbury
 * identity (Numerical Recipes 2.7), r^T C^-1 r = sum_m r_m^T B_m^-1 r_m -
 * v^T (S^-1 + U^T B^-1 U)^-1 v with v = U^T B^-1 r. Each member keeps the
 * candidate it chose alone at each shared value (its own minimum); the
 * group's chi^2 at that value is then recomputed, limits added as they were.
 * Overwrites `total`.
 */
function sharedModelError(ctx: FitContext, members: readonly ObservationVector[], memberArg: readonly Int32Array[], total: Float64Array, memberWidths?: readonly ScoringWidths[]): void {
  const terms = ctx.model.terms;
  const nTerms = terms.length;
  const values = ctx.model.values;
  const sharedSigma = Float64Array.from(terms, (t) => Math.min(ctx.options.sharedModelSigmaDex, ctx.options.termModelSigmaDex?.get(t.key) ?? ctx.options.modelSigmaDex));
  const blocks = members.map((obs, mi) => {
    const nd = obs.detections.length;
    // The member's own block keeps the independent part of the floor: U S U^T adds the shared part back on its diagonal.
    const own = detectionCovariance(obs, terms, memberWidths?.[mi] ?? ctx.options);
    for (let a = 0; a < nd; a++) own[a * nd + a] -= sharedSigma[obs.detections[a]] ** 2;
    const l = choleskyLower(own, nd);
    if (l === undefined) throw new RangeError(`the covariance of the detections of ${obs.sightline} is not positive definite`);
    return { l, inv: inverseFromCholesky(l, nd), nd };
  });
  // M = S^-1 + U^T B^-1 U over the terms with a shared part.
  const shared = Int32Array.from(terms.map((_, j) => j).filter((j) => sharedSigma[j] > 0));
  const ns = shared.length;
  const slot = new Int32Array(nTerms).fill(-1);
  shared.forEach((j, i) => (slot[j] = i));
  const m = new Float64Array(ns * ns);
  for (let i = 0; i < ns; i++) m[i * ns + i] = 1 / sharedSigma[shared[i]] ** 2;
  members.forEach((obs, mi) => {
    const { inv, nd } = blocks[mi];
    for (let a = 0; a < nd; a++) {
      const sa = slot[obs.detections[a]];
      if (sa < 0) continue;
      for (let b = 0; b < nd; b++) {
        const sb = slot[obs.detections[b]];
        if (sb >= 0) m[sa * ns + sb] += inv[a * nd + b];
      }
    }
  });
  const lm = choleskyLower(m, ns);
  if (lm === undefined) throw new RangeError('the shared model covariance of a joint group is not positive definite');
  const v = new Float64Array(ns);
  const maxNd = Math.max(0, ...blocks.map((b) => b.nd));
  const y = new Float64Array(maxNd);
  const r0 = new Float64Array(maxNd);
  // Views of the scratch vector sized per member, made once (a subarray is an object).
  const views = blocks.map((b) => y.subarray(0, b.nd));
  const w = new Float64Array(ns);
  for (let k = 0; k < total.length; k++) {
    if (!Number.isFinite(total[k])) continue;
    v.fill(0);
    let chi2 = 0;
    for (let mi = 0; mi < members.length; mi++) {
      const obs = members[mi];
      const c = memberArg[mi][k];
      const base = c * nTerms;
      const { l, nd } = blocks[mi];
      const ry = views[mi];
      for (let a = 0; a < nd; a++) {
        ry[a] = values[base + obs.detections[a]] - obs.log10[obs.detections[a]];
        r0[a] = ry[a];
      }
      solveCholesky(l, nd, ry);
      for (let a = 0; a < nd; a++) {
        chi2 += r0[a] * ry[a];
        const sa = slot[obs.detections[a]];
        if (sa >= 0) v[sa] += ry[a];
      }
      for (const j of obs.upperLimits) chi2 += censoredCost((obs.log10[j] - values[base + j]) * obs.inverseSigmaLimit[j]);
      for (const j of obs.lowerLimits) chi2 += censoredCost((values[base + j] - obs.log10[j]) * obs.inverseSigmaLimit[j]);
    }
    w.set(v);
    solveCholesky(lm, ns, w);
    for (let i = 0; i < ns; i++) chi2 -= v[i] * w[i];
    total[k] = chi2;
  }
}

/**
 * The group's chi^2 with a dense model covariance between members (from the
 * realizations): C = the members' own blocks on the diagonal, the
 * realizations' covariance (and the shared part of a floor) between them;
 * r^T C^-1 r by one Cholesky factorisation of C (it does not depend on the
 * candidate), each member keeping the candidate it chose alone at each
 * shared value, limits added as they were. Overwrites `total`.
 */
function denseModelError(ctx: FitContext, members: readonly ObservationVector[], memberArg: readonly Int32Array[], total: Float64Array, mc: JointModelCovariance): void {
  const nTerms = ctx.model.terms.length;
  const values = ctx.model.values;
  const offsets = new Int32Array(members.length + 1);
  members.forEach((obs, m) => (offsets[m + 1] = offsets[m] + obs.detections.length));
  const d = offsets[members.length];
  if (mc.between.length !== d * d) throw new RangeError(`a joint model covariance of ${Math.sqrt(mc.between.length)} detections for a group of ${d}`);
  const c = Float64Array.from(mc.between);
  members.forEach((obs, m) => {
    const nd = obs.detections.length;
    const block = mc.blocks[m];
    for (let a = 0; a < nd; a++) for (let b = 0; b < nd; b++) c[(offsets[m] + a) * d + offsets[m] + b] = block[a * nd + b];
  });
  const l = choleskyLower(c, d);
  if (l === undefined) throw new RangeError(`the covariance of the detections of the joint group (${members.map((o) => o.sightline).join(', ')}) with the realizations' model covariance is not positive definite`);
  const r = new Float64Array(d);
  for (let k = 0; k < total.length; k++) {
    if (!Number.isFinite(total[k])) continue;
    let limits = 0;
    for (let m = 0; m < members.length; m++) {
      const obs = members[m];
      const base = memberArg[m][k] * nTerms;
      const det = obs.detections;
      for (let a = 0; a < det.length; a++) r[offsets[m] + a] = values[base + det[a]] - obs.log10[det[a]];
      for (const j of obs.upperLimits) limits += censoredCost((obs.log10[j] - values[base + j]) * obs.inverseSigmaLimit[j]);
      for (const j of obs.lowerLimits) limits += censoredCost((values[base + j] - obs.log10[j]) * obs.inverseSigmaLimit[j]);
    }
    total[k] = whitenedChiSquare(r, l, d) + limits;
  }
}
