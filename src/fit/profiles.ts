/**
 * Profiles: chi^2 minimised over every other parameter (and time) as a
 * function of one parameter's grid values, or of a pair's (docs/statistics.md
 * section 5; the profile-likelihood form of Avni's projection).
 */
import type { Axis } from './axes.ts';
import type { Profile1D, Profile2D } from './types.ts';

/** chi^2_min per bin of one axis, written into `out` (length axis.values.length; Infinity where no candidate). */
export function minimumByBin(chi2: Float64Array, bins: Int32Array, out: Float64Array): void {
  out.fill(Infinity);
  for (let c = 0; c < chi2.length; c++) {
    const b = bins[c];
    const v = chi2[c];
    if (v < out[b]) out[b] = v;
  }
}

export function profile1D(chi2: Float64Array, axis: Axis, chi2Best: number): Profile1D {
  const mins = new Float64Array(axis.values.length);
  minimumByBin(chi2, axis.binOfCandidate, mins);
  return profileFromMinima(axis.name, axis.values, mins, chi2Best);
}

/** A Profile1D from per-value minima already reduced (joint fits sum them first). */
export function profileFromMinima(parameter: string, values: Float64Array, mins: Float64Array, chi2Best: number): Profile1D {
  const chi2Min = Array.from(mins, finiteOrNull);
  return { parameter, values: Array.from(values), chi2Min, deltaChi2: chi2Min.map((v) => (v === null ? null : v - chi2Best)) };
}

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

export function profile2D(chi2: Float64Array, x: Axis, y: Axis, chi2Best: number): Profile2D {
  const nx = x.values.length;
  const cells = new Float64Array(nx * y.values.length).fill(Infinity);
  const bx = x.binOfCandidate;
  const by = y.binOfCandidate;
  for (let c = 0; c < chi2.length; c++) {
    const k = by[c] * nx + bx[c];
    if (chi2[c] < cells[k]) cells[k] = chi2[c];
  }
  const chi2Min = Array.from(cells, finiteOrNull);
  return {
    x: x.name,
    y: y.name,
    xValues: Array.from(x.values),
    yValues: Array.from(y.values),
    chi2Min,
    deltaChi2: chi2Min.map((v) => (v === null ? null : v - chi2Best)),
  };
}
