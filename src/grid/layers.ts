/**
 * Columns through a layered cloud (docs/cloud-structure.md section 1): a
 * background star is seen through the whole cloud, so its column of species
 * X is a sum over the layers the sightline crosses,
 *
 *   N(X) = sum over layers of x(X; A_V,layer) dN_H(layer),
 *
 * each layer a model of the grid at its own depth A_V (the extinction from
 * the layer to the nearest cloud surface, which sets its UV shielding).
 *
 * The depth is cut into cells of a fixed width `step` from the surface:
 * cell k spans [k step, (k + 1) step) and its model sits at the cell's
 * middle, (k + 1/2) step. Every sightline uses the same cells, so a cell's
 * model is computed once for all of them (the grid holds one point per
 * cell and the store caches it by content hash). A sightline's column is
 * then a weighted sum over cells, the weight of a cell being the share of
 * the sightline's N_H that lies in it:
 *
 *   N(X) = N_H(sightline) sum_k w_k x(X; (k + 1/2) step),   sum_k w_k = 1,
 *
 * and the column-averaged abundance <x> = N(X) / N_H is what the fit
 * compares with the observed N(X) / N_H (the conversion N_H/A_V cancels).
 *
 * Geometries (uniform density):
 * - slab, both faces lit: the sightline runs from one face to the other
 *   through depths 0 .. A_V/2 .. 0, w_k = (cell width inside 0 .. A_V/2) / (A_V/2).
 * - sphere of radius R seen at impact parameter b = beta R: the depth of a
 *   point at radius r is A_R (1 - r/R), with A_R the radial extinction of
 *   the sphere; the observed chord has A_V = 2 A_R sqrt(1 - beta^2); the
 *   path inside the shell of cell k is
 *   2 [sqrt(r_k^2 - b^2) - sqrt(max(r_{k+1}, b)^2 - b^2)], r_k = R (1 - k step / A_R),
 *   and w_k is that path over the chord. Through the centre (beta = 0) the
 *   path is linear in depth: the weights are those of the slab.
 *
 * A layer's model is evaluated at its cell's middle (the midpoint rule): a
 * smooth x(A_V) is integrated to O(step^2); a step in x that falls on a
 * cell edge is summed exactly.
 */

export type LayerGeometry = { kind: 'slab' } | { kind: 'sphere'; impactParameter: number };

/** Largest impact parameter allowed, as a fraction of the radius: past it the chord's deepest point nears the surface and the radial extinction A_V / (2 sqrt(1 - beta^2)) grows without bound. */
export const MAX_IMPACT_PARAMETER = 0.95;

/** Default cell width of the layers, mag: a choice, well inside the ~1 mag uncertainty of A_V toward background stars (memory). */
export const DEFAULT_LAYER_STEP = 0.5;

const SIGNIFICANT_DIGITS = 12;

function round(v: number): number {
  return Number(v.toPrecision(SIGNIFICANT_DIGITS));
}

/** The model A_V (depth) of cell k: its middle. */
export function cellAv(k: number, step: number): number {
  return round((k + 0.5) * step);
}

/** The line-of-sight A_V a sightline's column is computed for: its observed A_V rounded to the nearest multiple of step (at least one step). */
export function binLineOfSightAv(observedAv: number, step: number): number {
  return round(Math.max(1, Math.round(observedAv / step)) * step);
}

/** Radial extinction A_R of the sphere whose chord at impact parameter beta has extinction losAv; for the slab, the depth of its middle plane. */
export function centreDepth(geometry: LayerGeometry, losAv: number): number {
  if (geometry.kind === 'slab') return losAv / 2;
  return losAv / (2 * Math.sqrt(1 - geometry.impactParameter ** 2));
}

/** The deepest depth a sightline reaches: the slab's middle plane, or the sphere's depth at radius b. */
export function deepestDepth(geometry: LayerGeometry, losAv: number): number {
  const aR = centreDepth(geometry, losAv);
  return geometry.kind === 'slab' ? aR : aR * (1 - geometry.impactParameter);
}

export interface SightlineLayers {
  /** Cell indices crossed, increasing from the surface. */
  cells: Int32Array;
  /** Share of the sightline's N_H in each cell; they sum to 1. */
  weights: Float64Array;
}

/** The cells a sightline of line-of-sight extinction losAv crosses and their weights (see the module comment). */
export function sightlineLayers(geometry: LayerGeometry, losAv: number, step: number): SightlineLayers {
  if (!(losAv > 0) || !(step > 0)) throw new RangeError(`a layered column needs losAv > 0 and step > 0, got ${losAv} and ${step}`);
  const deepest = deepestDepth(geometry, losAv);
  const count = Math.max(1, Math.ceil(deepest / step - 1e-12));
  const cells = new Int32Array(count);
  const weights = new Float64Array(count);
  if (geometry.kind === 'slab') {
    for (let k = 0; k < count; k++) {
      cells[k] = k;
      weights[k] = (Math.min((k + 1) * step, deepest) - k * step) / deepest;
    }
    return { cells, weights };
  }
  const aR = centreDepth(geometry, losAv);
  const b = geometry.impactParameter;
  // Radius (R = 1) at depth a, and the half-chord inside it.
  const halfChord = (a: number) => {
    const r = Math.max(1 - a / aR, b);
    return Math.sqrt(Math.max(r * r - b * b, 0));
  };
  const total = halfChord(0);
  for (let k = 0; k < count; k++) {
    cells[k] = k;
    weights[k] = (halfChord(k * step) - halfChord(Math.min((k + 1) * step, deepest))) / total;
  }
  return { cells, weights };
}

/** The model A_V values (cell middles) that a set of sightlines needs, increasing. */
export function layerAxisValues(geometry: LayerGeometry, observedAv: readonly number[], step: number): number[] {
  let most = 0;
  for (const av of observedAv) {
    const { cells } = sightlineLayers(geometry, binLineOfSightAv(av, step), step);
    most = Math.max(most, cells[cells.length - 1] + 1);
  }
  return Array.from({ length: most }, (_, k) => cellAv(k, step));
}
