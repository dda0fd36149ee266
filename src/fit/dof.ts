/**
 * Degrees of freedom of a fit: the quantities used minus the fitted
 * parameters, floored at 1 (a chi-square distribution needs at least one).
 * Detections count one each. Limits count only when asked (fit.limits_in_dof):
 * a satisfied limit adds almost nothing to chi^2, so counting it by default
 * would make the p-value more favourable than the detections support.
 * Fitted parameters are the independent varied grid axes plus age (ties excluded).
 */
import type { QuantityCounts } from './types.ts';

export interface DegreesOfFreedom {
  dof: number;
  /** The count fell below 1 and was raised to 1: the p-value does not test the fit. */
  floored: boolean;
  /** Quantities counted. */
  counted: number;
}

export function degreesOfFreedom(counts: QuantityCounts, fittedParameters: number, limitsInDof: boolean): DegreesOfFreedom {
  const counted = counts.detections + (limitsInDof ? counts.upperLimits + counts.lowerLimits : 0);
  const raw = counted - fittedParameters;
  return { dof: Math.max(1, raw), floored: raw < 1, counted };
}
