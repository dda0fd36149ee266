/**
 * chi^2 of every candidate against one sightline (docs/statistics.md section 3):
 * chi^2 = sum over detections of (d_j / sigma_j)^2, d_j = log10 X_model,j -
 * log10 X_obs,j, sigma_j from the observational error on the side of d
 * (upper error when the model lies above) combined with the model floor,
 * plus the censored cost of every limit. The loop runs on typed arrays and
 * allocates nothing. Detections that share a measurement (ratios to one
 * reference, the reference's abundance beside them) are scored with their
 * covariance, chi^2 = r^T C^-1 r (covariance.ts), when the observation vector
 * carries its Cholesky factor; otherwise as the plain sum above.
 */
import { censoredCost } from './censored.ts';
import { whitenedChiSquare } from './covariance.ts';
import type { ModelQuantities } from './model-quantities.ts';
import type { ObservationVector } from './observation-vector.ts';
import type { QuantityScore } from './types.ts';

/**
 * Writes chi^2 of every candidate into `out` (length nCandidates); candidates
 * of models outside the sightline's model mask get Infinity.
 */
export function scoreCandidates(model: ModelQuantities, obs: ObservationVector, nTimes: number, out: Float64Array): void {
  const nTerms = model.terms.length;
  const values = model.values;
  const det = obs.detections;
  const up = obs.upperLimits;
  const low = obs.lowerLimits;
  const o = obs.log10;
  const wLo = obs.inverseVarianceLo;
  const wHi = obs.inverseVarianceHi;
  const wLim = obs.inverseSigmaLimit;
  const mask = obs.modelMask;
  const whiten = obs.whiten;
  const r = obs.residualScratch!;
  const nDet = det.length;
  const nUp = up.length;
  const nLow = low.length;
  const nModels = model.nCandidates / nTimes;
  for (let m = 0, c = 0; m < nModels; m++) {
    if (mask !== undefined && mask[m] === 0) {
      for (let t = 0; t < nTimes; t++, c++) out[c] = Infinity;
      continue;
    }
    for (let t = 0; t < nTimes; t++, c++) {
      const base = c * nTerms;
      let chi2 = 0;
      if (whiten !== undefined) {
        for (let k = 0; k < nDet; k++) r[k] = values[base + det[k]] - o[det[k]];
        chi2 = whitenedChiSquare(r, whiten, nDet);
      } else {
        for (let k = 0; k < nDet; k++) {
          const j = det[k];
          const d = values[base + j] - o[j];
          chi2 += d * d * (d > 0 ? wHi[j] : wLo[j]);
        }
      }
      for (let k = 0; k < nUp; k++) {
        const j = up[k];
        chi2 += censoredCost((o[j] - values[base + j]) * wLim[j]);
      }
      for (let k = 0; k < nLow; k++) {
        const j = low[k];
        chi2 += censoredCost((values[base + j] - o[j]) * wLim[j]);
      }
      out[c] = chi2;
    }
  }
}

/**
 * The per-quantity breakdown of one candidate's score (for residual tables
 * and figures); `agreementDex` is log10 of the agreement factor.
 */
export function scoreBreakdown(model: ModelQuantities, obs: ObservationVector, candidate: number, agreementDex: number): QuantityScore[] {
  const nTerms = model.terms.length;
  const rows: QuantityScore[] = [];
  // With correlated detections each one's share is its whitened residual squared, so the rows still add up to chi^2.
  const share = new Map<number, number>();
  if (obs.whiten !== undefined) {
    const r = Float64Array.from(obs.detections, (j) => model.values[candidate * nTerms + j] - obs.log10[j]);
    whitenedChiSquare(r, obs.whiten, r.length);
    obs.detections.forEach((j, k) => share.set(j, r[k] * r[k]));
  }
  for (let j = 0; j < nTerms; j++) {
    const q = obs.quantities[j];
    if (q === undefined) continue;
    const m = model.values[candidate * nTerms + j];
    const d = m - q.log10;
    let sigma: number;
    let chi2: number;
    let agrees: boolean;
    if (q.kind === 'detection' && obs.whiten !== undefined) {
      sigma = Math.sqrt(obs.correlatedVariance![obs.detections.indexOf(j)]);
      chi2 = share.get(j)!;
      agrees = Math.abs(d) < agreementDex;
    } else if (q.kind === 'detection') {
      sigma = 1 / Math.sqrt(d > 0 ? obs.inverseVarianceHi[j] : obs.inverseVarianceLo[j]);
      chi2 = (d / sigma) ** 2;
      agrees = Math.abs(d) < agreementDex;
    } else {
      const w = obs.inverseSigmaLimit[j];
      sigma = 1 / w;
      // As the scoring loop forms it, so that the rows add up to its chi^2.
      chi2 = censoredCost(q.kind === 'upper' ? (q.log10 - m) * w : (m - q.log10) * w);
      agrees = q.kind === 'upper' ? m <= q.log10 : m >= q.log10;
    }
    rows.push({
      label: q.label,
      numerator: q.numerator,
      ...(q.denominator !== undefined ? { denominator: q.denominator } : {}),
      kind: q.kind,
      observedLog10: q.log10,
      sigmaLoDex: q.sigmaLoDex,
      sigmaHiDex: q.sigmaHiDex,
      modelLog10: m,
      residualDex: d,
      sigmaDex: sigma,
      chi2,
      agrees,
    });
  }
  return rows;
}
