/**
 * One sightline's (or pixel's) observed quantities aligned to the fit's
 * quantity terms, with the widths of docs/statistics.md section 2 folded in:
 * sigma^2 = sigma_obs^2 + sigma_model^2 for detections (the lower or upper
 * observational error chosen later by the sign of d), and
 * sigma^2 = sigma_limit^2 + sigma_model^2 for limits.
 */
import type { ObservedQuantity } from '../obs/types.ts';
import { choleskyLower, hasCorrelation, type ModelCovariance } from './covariance.ts';
import { termKey, type QuantityTerm } from './model-quantities.ts';

export interface ScoringWidths {
  /** Model-uncertainty floor, dex. */
  modelSigmaDex: number;
  /** Floors of single terms by term key where a quantity sets its own (fit.quantities[].model_sigma_dex). */
  termModelSigmaDex?: ReadonlyMap<string, number>;
  /** Width of a limit, dex (added in quadrature to the floor). */
  limitSigmaDex: number;
  /** Score detections that share a measurement with their covariance (fit.correlated_errors; default on). */
  correlatedErrors?: boolean;
  /** A model covariance between quantity terms, dex^2, in place of the diagonal floor of the terms it names (covariance.ts). */
  modelCovariance?: ModelCovariance;
}

export interface ObservationVector {
  sightline: string;
  /** Term indices of detections, of upper limits and of lower limits. */
  detections: Int32Array;
  upperLimits: Int32Array;
  lowerLimits: Int32Array;
  /** Per term: observed log10 value (or limit), 1/sigma^2 below and above (detections), 1/sigma (limits). */
  log10: Float64Array;
  inverseVarianceLo: Float64Array;
  inverseVarianceHi: Float64Array;
  inverseSigmaLimit: Float64Array;
  /** The quantity behind each used term, for residual tables. */
  quantities: (ObservedQuantity | undefined)[];
  /** Labels of terms without a measurement for this sightline. */
  skipped: string[];
  /** Models open to this sightline (1) or not (0); undefined: every model. Set by holdParameters. */
  modelMask?: Uint8Array;
  /** Parameters held at one value for this sightline, by name. */
  held: Record<string, number>;
  /**
   * Correlated detections (covariance.ts): the lower Cholesky factor of their
   * covariance, row-major over `detections` in order, and a scratch vector of
   * their residuals; undefined when the covariance is diagonal (the plain sum).
   */
  whiten?: Float64Array;
  residualScratch?: Float64Array;
  /** Diagonal of that covariance, dex^2 (the width shown in residual tables). */
  correlatedVariance?: Float64Array;
}

/**
 * Aligns quantities to terms. A limit's confidence (0.997 for 3 sigma) stays
 * with the quantity but does not set its width: a confidence in linear column
 * density does not fix a width in dex, so every limit's width is the model
 * floor with limit_sigma_dex in quadrature. Throws a RangeError on a zero
 * total width (the stage validates the widths first, so a user never meets it).
 */
export function buildObservationVector(sightline: string, quantities: readonly ObservedQuantity[], terms: readonly QuantityTerm[], widths: ScoringWidths): ObservationVector {
  const index = new Map(terms.map((t, i) => [t.key, i]));
  const n = terms.length;
  const v: ObservationVector = {
    sightline,
    detections: new Int32Array(0),
    upperLimits: new Int32Array(0),
    lowerLimits: new Int32Array(0),
    log10: new Float64Array(n),
    inverseVarianceLo: new Float64Array(n),
    inverseVarianceHi: new Float64Array(n),
    inverseSigmaLimit: new Float64Array(n),
    quantities: new Array(n).fill(undefined),
    skipped: [],
    held: {},
  };
  const det: number[] = [];
  const up: number[] = [];
  const low: number[] = [];
  for (const q of quantities) {
    const j = index.get(termKey(q.numerator, q.denominator));
    if (j === undefined) throw new RangeError(`quantity ${q.label} of ${sightline} has no model term`);
    if (v.quantities[j] !== undefined) throw new RangeError(`quantity ${q.label} of ${sightline} is given twice`);
    if (!Number.isFinite(q.log10)) continue;
    v.quantities[j] = q;
    v.log10[j] = q.log10;
    const mc = widths.modelCovariance;
    const mcIndex = mc ? mc.keys.indexOf(terms[j].key) : -1;
    // A model covariance names its terms' model variance itself (also when it has no off-diagonal part).
    const floor2 = mc && mcIndex >= 0 ? mc.matrix[mcIndex * (mc.keys.length + 1)] : (widths.termModelSigmaDex?.get(terms[j].key) ?? widths.modelSigmaDex) ** 2;
    if (q.kind === 'detection') {
      const lo2 = q.sigmaLoDex ** 2 + floor2;
      const hi2 = q.sigmaHiDex ** 2 + floor2;
      if (!(lo2 > 0 && hi2 > 0)) throw new RangeError(`quantity ${q.label} of ${sightline} has zero width`);
      v.inverseVarianceLo[j] = 1 / lo2;
      v.inverseVarianceHi[j] = 1 / hi2;
      det.push(j);
    } else {
      const s = Math.sqrt(widths.limitSigmaDex ** 2 + floor2);
      if (!(s > 0)) throw new RangeError(`limit ${q.label} of ${sightline} has zero width`);
      v.inverseSigmaLimit[j] = 1 / s;
      (q.kind === 'upper' ? up : low).push(j);
    }
  }
  for (let j = 0; j < n; j++) if (v.quantities[j] === undefined) v.skipped.push(terms[j].label);
  v.detections = Int32Array.from(det);
  if (widths.correlatedErrors !== false || widths.modelCovariance !== undefined) correlate(v, terms, widths);
  v.upperLimits = Int32Array.from(up);
  v.lowerLimits = Int32Array.from(low);
  return v;
}

export function usedCount(v: ObservationVector): number {
  return v.detections.length + v.upperLimits.length + v.lowerLimits.length;
}

/**
 * The covariance of a sightline's detections, dex^2, row-major over
 * `detections` in order (covariance.ts): shared error parts off the diagonal,
 * the symmetrised observational variance plus the model floor (or the model
 * covariance) on it.
 */
export function detectionCovariance(v: ObservationVector, terms: readonly QuantityTerm[], widths: ScoringWidths): Float64Array {
  const det = v.detections;
  const nd = det.length;
  const c = new Float64Array(nd * nd);
  const mc = widths.modelCovariance;
  const mcIndex = mc ? new Map(mc.keys.map((k, i) => [k, i])) : undefined;
  const modelIndex = Array.from(det, (j) => mcIndex?.get(terms[j].key) ?? -1);
  for (let a = 0; a < nd; a++) {
    const qa = v.quantities[det[a]]!;
    for (let b = 0; b < a; b++) {
      const qb = v.quantities[det[b]]!;
      let cov = 0;
      if (widths.correlatedErrors !== false) {
        for (const pa of qa.errorParts ?? []) for (const pb of qb.errorParts ?? []) if (pa.source === pb.source) cov += pa.sign * pb.sign * pa.dex * pb.dex;
      }
      if (mc && modelIndex[a] >= 0 && modelIndex[b] >= 0) cov += mc.matrix[modelIndex[a] * mc.keys.length + modelIndex[b]];
      c[a * nd + b] = cov;
      c[b * nd + a] = cov;
    }
    const floor2 = mc && modelIndex[a] >= 0 ? mc.matrix[modelIndex[a] * (mc.keys.length + 1)] : (widths.termModelSigmaDex?.get(terms[det[a]].key) ?? widths.modelSigmaDex) ** 2;
    c[a * nd + a] = 0.5 * (qa.sigmaLoDex ** 2 + qa.sigmaHiDex ** 2) + floor2;
  }
  return c;
}

/**
 * Whitening for a sightline whose detections covary; left diagonal (no
 * whitening) when nothing is shared, so the plain sum stays as it was to the
 * last bit.
 */
function correlate(v: ObservationVector, terms: readonly QuantityTerm[], widths: ScoringWidths): void {
  const nd = v.detections.length;
  if (nd < 2) return;
  const c = detectionCovariance(v, terms, widths);
  if (!hasCorrelation(c, nd)) return;
  const l = choleskyLower(c, nd);
  if (l === undefined) throw new RangeError(`the covariance of the detections of ${v.sightline} is not positive definite`);
  v.whiten = l;
  v.residualScratch = new Float64Array(nd);
  v.correlatedVariance = Float64Array.from({ length: nd }, (_, a) => c[a * nd + a]);
}
