/**
 * The fit of every pixel of a map, streaming over candidates: candidates are
 * taken in blocks small enough to stay in cache, and each block is scored
 * against every pixel, keeping per pixel only the running best and the
 * running chi^2 minimum per density value and per age (the two 1-D profiles
 * the interval images need). Memory grows as pixels x (density values +
 * times), never as pixels x candidates. The inner loops run on typed arrays
 * and allocate nothing.
 */
import { UserError } from '../config/errors.ts';
import { chiSquarePValue } from './chi-square.ts';
import type { FitContext } from './context.ts';
import { censoredCost } from './censored.ts';
import { degreesOfFreedom } from './dof.ts';
import { usedCount, type ObservationVector } from './observation-vector.ts';
import type { Axis } from './axes.ts';
import { axisCoordinates, subgridInterval, type SubgridInterval } from './subgrid.ts';
import { AGE_PARAMETER, MAP_IMAGE_NAMES, type MapFitImages, type MapImageName, type RegionLevel } from './types.ts';

/** Candidates scored per block: their model values (block x terms doubles) stay in the L1/L2 cache while every pixel is visited. */
const CANDIDATE_BLOCK = 256;
const DENSITY_PARAMETER = 'density';
/** Candidates of the sparse first pass that seeds each pixel's best chi^2 (a few hundred cost little against 1e5 and find a good bound). */
const SEED_CANDIDATES = 512;
/** Relative widening of the cut-off bound, far above round-off in best + threshold and far below any chi^2 difference that matters. */
const PRUNE_MARGIN = 1 + 1e-12;
/**
 * Depth of the profiles kept exact, in units of the level's threshold: the
 * sub-grid bounds interpolate between the last value inside the region and
 * the first outside, so that one must be known too when it lies within this
 * depth (4 thresholds: 2 sigma beyond a 1-sigma bound); a deeper value is
 * taken at the depth, its known lower bound (subgrid.ts), the widest reading.
 */
const PROFILE_DEPTH = 4;

export interface MapPixel {
  x: number;
  y: number;
  obs: ObservationVector;
}

/** Flat per-pixel copies of the observation vectors: entries of pixel p are offsets[p] .. offsets[p + 1]. */
interface PackedEntries {
  offsets: Int32Array;
  term: Int32Array;
  log10: Float64Array;
  /** Detections: 1/sigma^2 below and above; limits: 1/sigma in weightLo, kind code in weightHi (1 upper, -1 lower). */
  weightLo: Float64Array;
  weightHi: Float64Array;
  /** Detections of correlated pixels: offset of the pixel's Cholesky factor in `whiten` (-1: the plain sum). */
  whitenOffset: Int32Array;
  whiten: Float64Array;
}

function pack(pixels: readonly MapPixel[], which: 'detections' | 'limits'): PackedEntries {
  const offsets = new Int32Array(pixels.length + 1);
  pixels.forEach((px, i) => {
    const n = which === 'detections' ? px.obs.detections.length : px.obs.upperLimits.length + px.obs.lowerLimits.length;
    offsets[i + 1] = offsets[i] + n;
  });
  const total = offsets[pixels.length];
  const whitenOffset = new Int32Array(pixels.length).fill(-1);
  let whitenSize = 0;
  if (which === 'detections') {
    pixels.forEach((px, i) => {
      if (px.obs.whiten === undefined) return;
      whitenOffset[i] = whitenSize;
      whitenSize += px.obs.whiten.length;
    });
  }
  const whiten = new Float64Array(whitenSize);
  pixels.forEach((px, i) => {
    if (whitenOffset[i] >= 0) whiten.set(px.obs.whiten!, whitenOffset[i]);
  });
  const packed: PackedEntries = { offsets, term: new Int32Array(total), log10: new Float64Array(total), weightLo: new Float64Array(total), weightHi: new Float64Array(total), whitenOffset, whiten };
  pixels.forEach((px, i) => {
    let k = offsets[i];
    const o = px.obs;
    if (which === 'detections') {
      for (const j of o.detections) {
        packed.term[k] = j;
        packed.log10[k] = o.log10[j];
        packed.weightLo[k] = o.inverseVarianceLo[j];
        packed.weightHi[k] = o.inverseVarianceHi[j];
        k++;
      }
    } else {
      for (const [list, code] of [[o.upperLimits, 1], [o.lowerLimits, -1]] as const) {
        for (const j of list) {
          packed.term[k] = j;
          packed.log10[k] = o.log10[j];
          packed.weightLo[k] = o.inverseSigmaLimit[j];
          packed.weightHi[k] = code;
          k++;
        }
      }
    }
  });
  return packed;
}

/**
 * Pixels whose model A_V is tied to their own A_V see only the candidates of
 * that A_V: each pixel gets the key of its held values (-1 when none) and
 * each candidate the key of its values on the same axes.
 */
function heldKeys(ctx: FitContext, pixels: readonly MapPixel[]): { pixelKey: Int32Array; candidateKey: Int32Array; nKeys: number } {
  const names = [...new Set(pixels.flatMap((p) => Object.keys(p.obs.held)))].sort();
  const nC = ctx.model.nCandidates;
  const pixelKey = new Int32Array(pixels.length).fill(-1);
  const candidateKey = new Int32Array(nC);
  if (names.length === 0) return { pixelKey, candidateKey, nKeys: 1 };
  const axes = names.map((n) => ctx.axes.byName.get(n)!);
  let stride = 1;
  for (const axis of axes) {
    for (let c = 0; c < nC; c++) candidateKey[c] += axis.binOfCandidate[c] * stride;
    pixels.forEach((px, i) => {
      const v = px.obs.held[axis.name];
      if (v === undefined) throw new RangeError(`pixel ${px.obs.sightline} does not hold ${axis.name} while others do`);
      pixelKey[i] = (pixelKey[i] < 0 ? 0 : pixelKey[i]) + axis.values.indexOf(v) * stride;
    });
    stride *= axis.values.length;
  }
  return { pixelKey, candidateKey, nKeys: stride };
}

/**
 * Which values of one axis have a candidate open to the pixels of each held
 * key: open[key * nValues + bin] is 1 or 0. Every value has a candidate when
 * nothing is held (the axes are built from the candidates' own values).
 */
function openValues(candidateKey: Int32Array, nKeys: number, axis: Axis): Uint8Array {
  const n = axis.values.length;
  const open = new Uint8Array(nKeys * n);
  const bins = axis.binOfCandidate;
  for (let c = 0; c < bins.length; c++) open[candidateKey[c] * n + bins[c]] = 1;
  return open;
}

/**
 * The sub-grid interval of one pixel's profile (subgrid.ts), as
 * intervalFromProfile reads it. Openness comes from `open`, not from the
 * minima, which are also Infinity where every candidate of a value was cut
 * short as beyond the kept depth: such a value lies at least PROFILE_DEPTH
 * thresholds above the minimum and is taken there (the widest reading).
 */
function pixelInterval(mins: Float64Array, offset: number, threshold: number, axis: Axis, coordinates: { u: Float64Array; log: boolean }, open: Uint8Array, openOffset: number): SubgridInterval {
  const sub = subgridInterval(axis.values, coordinates.u, coordinates.log, mins, offset, threshold, (i) => open[openOffset + i] === 1, PROFILE_DEPTH * threshold);
  if (sub === undefined) throw new RangeError(`a fitted pixel has no open value of ${axis.name}`);
  return sub;
}

export function fitMap(ctx: FitContext, nx: number, ny: number, pixels: readonly MapPixel[], level: RegionLevel, where: { file?: string } = {}): MapFitImages {
  const usable = pixels.filter((p) => usedCount(p.obs) > 0);
  if (usable.length === 0) {
    throw new UserError(
      `no pixel of the ${nx} x ${ny} map has a usable value of any fitted quantity (${ctx.model.terms.map((t) => t.label).join(', ')}): every pixel is blank (NaN) or missing. ` +
        'Check that the map planes hold the species named in fit.quantities and that blank pixels are not the whole image.',
      { file: where.file, field: 'fit.quantities' },
    );
  }
  const density = ctx.axes.byName.get(DENSITY_PARAMETER);
  const age = ctx.axes.byName.get(AGE_PARAMETER)!;
  if (density === undefined) throw new UserError(`the model store has no '${DENSITY_PARAMETER}' parameter, which the map images need.`, { file: where.file });

  const nPix = usable.length;
  const { pixelKey, candidateKey, nKeys } = heldKeys(ctx, usable);
  const nD = density.values.length;
  const nA = age.values.length;
  const det = pack(usable, 'detections');
  const lim = pack(usable, 'limits');
  const bestChi2 = new Float64Array(nPix).fill(Infinity);
  const bestCandidate = new Int32Array(nPix).fill(-1);
  const densityMin = new Float64Array(nPix * nD).fill(Infinity);
  const ageMin = new Float64Array(nPix * nA).fill(Infinity);
  const densityOpen = openValues(candidateKey, nKeys, density);
  const ageOpen = openValues(candidateKey, nKeys, age);
  const values = ctx.model.values;
  const nTerms = ctx.model.terms.length;
  const nC = ctx.model.nCandidates;
  const dBin = density.binOfCandidate;
  const aBin = age.binOfCandidate;
  const dOff = det.offsets;
  const dTerm = det.term;
  const dObs = det.log10;
  const dWLo = det.weightLo;
  const dWHi = det.weightHi;
  const lOff = lim.offsets;
  const lTerm = lim.term;
  const lObs = lim.log10;
  const lInverseSigma = lim.weightLo;
  const lKind = lim.weightHi;

  const delta = PROFILE_DEPTH * level.deltaChi2;
  const whiten = det.whiten;
  let maxDetections = 0;
  for (let p = 0; p < nPix; p++) maxDetections = Math.max(maxDetections, dOff[p + 1] - dOff[p]);
  const z = new Float64Array(maxDetections);
  /**
   * Scores candidates c0..c1 (step `stride`) against every pixel. A candidate
   * whose partial chi^2 already exceeds the pixel's best so far plus the
   * level's threshold can neither become the best nor bring a density or age
   * value inside the region (chi^2 only grows as terms are added, and the
   * best only falls), so its sum is cut short: the per-value minima are exact
   * inside the region and only bounded outside it, which is all the images use.
   * The cut is a little wider than the threshold (PRUNE_MARGIN), so that
   * round-off never cuts a candidate the per-sightline fit's test (chi^2 -
   * best against the threshold, applied to the minima afterwards) would keep;
   * and of equal chi^2 the lowest candidate index is the best, as there.
   */
  const scoreRange = (c0: number, c1: number, stride: number) => {
    for (let p = 0; p < nPix; p++) {
      const k0 = dOff[p];
      const k1 = dOff[p + 1];
      const l0 = lOff[p];
      const l1 = lOff[p + 1];
      const dRow = p * nD;
      const aRow = p * nA;
      let best = bestChi2[p];
      let bestC = bestCandidate[p];
      let bound = (best + delta) * PRUNE_MARGIN;
      const key = pixelKey[p];
      const w0 = det.whitenOffset[p];
      const nd = k1 - k0;
      candidates: for (let c = c0; c < c1; c += stride) {
        if (key >= 0 && candidateKey[c] !== key) continue;
        const base = c * nTerms;
        let chi2 = 0;
        if (w0 >= 0) {
          // Correlated detections: forward substitution with the pixel's Cholesky factor; each step adds a square.
          for (let i = 0; i < nd; i++) {
            let acc = values[base + dTerm[k0 + i]] - dObs[k0 + i];
            const row = w0 + i * nd;
            for (let k = 0; k < i; k++) acc -= whiten[row + k] * z[k];
            const zi = acc / whiten[row + i];
            z[i] = zi;
            chi2 += zi * zi;
            if (chi2 > bound) continue candidates;
          }
        } else {
          for (let k = k0; k < k1; k++) {
            const d = values[base + dTerm[k]] - dObs[k];
            chi2 += d * d * (d > 0 ? dWHi[k] : dWLo[k]);
            if (chi2 > bound) continue candidates;
          }
        }
        for (let k = l0; k < l1; k++) {
          const m = values[base + lTerm[k]];
          // (m - L) w is exactly -((L - m) w): the per-sightline loop's z for either kind.
          const z = (lObs[k] - m) * lInverseSigma[k];
          chi2 += censoredCost(lKind[k] > 0 ? z : -z);
          if (chi2 > bound) continue candidates;
        }
        if (chi2 < best || (chi2 === best && c < bestC)) {
          best = chi2;
          bestC = c;
          bound = (best + delta) * PRUNE_MARGIN;
        }
        const di = dRow + dBin[c];
        if (chi2 < densityMin[di]) densityMin[di] = chi2;
        const ai = aRow + aBin[c];
        if (chi2 < ageMin[ai]) ageMin[ai] = chi2;
      }
      bestChi2[p] = best;
      bestCandidate[p] = bestC;
    }
  };
  // A sparse first pass over the whole grid sets a good best for every pixel, so that the
  // full pass cuts most sums short from its first block on.
  const seedStride = Math.max(1, Math.floor(nC / SEED_CANDIDATES));
  for (let c0 = 0; c0 < nC; c0 += CANDIDATE_BLOCK * seedStride) scoreRange(c0, Math.min(nC, c0 + CANDIDATE_BLOCK * seedStride), seedStride);
  for (let c0 = 0; c0 < nC; c0 += CANDIDATE_BLOCK) scoreRange(c0, Math.min(nC, c0 + CANDIDATE_BLOCK), 1);

  const nTotal = nx * ny;
  const images = {} as Record<MapImageName, Float64Array>;
  for (const name of MAP_IMAGE_NAMES) images[name] = new Float64Array(nTotal).fill(NaN);
  const pixelBest = new Int32Array(nTotal).fill(-1);
  const fitted = ctx.axes.independent.filter((n) => !(n in usable[0].obs.held)).length;
  const warnings: string[] = [];
  let poor = 0;
  let floored = 0;
  let atEdge = 0;
  let unresolved = 0;
  const densityCoordinates = axisCoordinates(density.values);
  const ageCoordinates = axisCoordinates(age.values);
  usable.forEach((px, p) => {
    const i = px.y * nx + px.x;
    const c = bestCandidate[p];
    const chi2 = bestChi2[p];
    const counts = { detections: px.obs.detections.length, upperLimits: px.obs.upperLimits.length, lowerLimits: px.obs.lowerLimits.length, skipped: px.obs.skipped.length };
    const dofs = degreesOfFreedom(counts, fitted, ctx.options.limitsInDof);
    const dof = dofs.dof;
    if (dofs.floored) floored++;
    const key = Math.max(0, pixelKey[p]);
    // Minima above the final cut-off are not exact (a better candidate of that value may have been cut
    // against the tighter bound of a later best): they are known only to lie beyond it.
    const cutoff = (chi2 + delta) * PRUNE_MARGIN;
    for (let b = p * nD; b < (p + 1) * nD; b++) if (densityMin[b] > cutoff) densityMin[b] = Infinity;
    for (let b = p * nA; b < (p + 1) * nA; b++) if (ageMin[b] > cutoff) ageMin[b] = Infinity;
    const dr = pixelInterval(densityMin, p * nD, level.deltaChi2, density, densityCoordinates, densityOpen, key * nD);
    const ar = pixelInterval(ageMin, p * nA, level.deltaChi2, age, ageCoordinates, ageOpen, key * nA);
    const drEdge = nD > 1 && (dr.loAtEdge || dr.hiAtEdge);
    const arEdge = nA > 1 && (ar.loAtEdge || ar.hiAtEdge);
    const pValue = chiSquarePValue(chi2, dof);
    images.best_density[i] = density.values[dBin[c]];
    images.best_age_yr[i] = age.values[aBin[c]];
    images.best_chi2[i] = chi2;
    images.reduced_chi2[i] = chi2 / dof;
    images.p_value[i] = pValue;
    images.dof[i] = dof;
    images.density_lo[i] = dr.lo;
    images.density_hi[i] = dr.hi;
    images.age_lo_yr[i] = ar.lo;
    images.age_hi_yr[i] = ar.hi;
    pixelBest[i] = c;
    images.density_width_dex[i] = Math.log10(dr.hi / dr.lo);
    images.age_width_dex[i] = Math.log10(ar.hi / ar.lo);
    images.at_edge[i] = drEdge || arEdge ? 1 : 0;
    const narrow = (nD > 1 && dr.inside <= 1) || (nA > 1 && ar.inside <= 1);
    images.unresolved[i] = narrow ? 1 : 0;
    images.density_subgrid[i] = dr.best;
    images.age_subgrid_yr[i] = ar.best;
    images.used_quantities[i] = usedCount(px.obs);
    if (pValue < ctx.options.poorFitP) poor++;
    if (drEdge || arEdge) atEdge++;
    if (narrow) unresolved++;
  });
  if (usable.length < pixels.length) warnings.push(`${pixels.length - usable.length} of ${pixels.length} map pixels have no usable quantity and are left blank (NaN) in every image.`);
  if (floored > 0) {
    warnings.push(`${floored} of ${nPix} fitted pixels have fewer counted quantities than the ${fitted} fitted parameters plus one: their dof is raised to 1 (the dof image), so their p-values do not test the fit.`);
  }
  if (poor > 0) warnings.push(`${poor} of ${nPix} fitted pixels are poor fits (p < ${ctx.options.poorFitP}): see the p_value image.`);
  if (unresolved > 0) {
    warnings.push(`${unresolved} of ${nPix} fitted pixels have a ${(level.level * 100).toFixed(1)}% density or age interval narrower than the grid spacing (the unresolved image): their bounds come from interpolation between grid values alone.`);
  }
  if (atEdge > 0) warnings.push(`${atEdge} of ${nPix} fitted pixels have a ${(level.level * 100).toFixed(1)}% density or age interval reaching the grid's edge (the at_edge image): the truth may lie outside the grid there.`);
  return { nx, ny, images, bestCandidate: pixelBest, fittedPixels: nPix, level, warnings };
}
