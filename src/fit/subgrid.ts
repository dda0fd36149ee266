/**
 * Sub-grid reading of a profile (docs/statistics.md section 5): the profile
 * chi^2 is known at grid values only, and on a coarse grid an interval
 * snapped to them is one value wide, or misplaced (issue 13: 50 of 80
 * density intervals on a 0.5 dex grid were one node and held the truth in 30
 * of 80 fits). Between values the profile is interpolated in the coordinate
 * u = log10(value) (or the value itself for an axis with values <= 0):
 *
 * - the minimum: the vertex of the parabola through the lowest value and its
 *   two neighbours (successive parabolic interpolation, Numerical Recipes
 *   10.2, eq. 10.2.1), when both neighbours are open (not at an edge, not
 *   beside a value the grid left out) and the next value on the vertex's side
 *   agrees with the parabola (PARABOLA_HOLDS), else the lowest grid value;
 * - the bounds: the signed root s(u) = sign(u - u*) sqrt(chi^2(u) - chi^2*)
 *   is interpolated linearly between neighbouring values, and the bound is
 *   where |s| = sqrt(threshold). For a parabolic profile (a Gaussian
 *   likelihood, linear model) s is linear in u, so the bounds are exact there;
 *   elsewhere they are second order in the spacing.
 *
 * An interval with at most one grid value inside is still narrower than the
 * grid resolves: it is flagged `unresolved`, and `nodeLo`/`nodeHi`, the open
 * grid values just outside it, are the bounds the grid itself vouches for.
 * A value whose chi^2 is not known exactly but is known to lie at least
 * `unknownDelta` above the minimum (a map's candidates cut short) is taken at
 * that lower bound: the widest reading the data allow.
 */

/**
 * A parabola through three values holds where the next value on the vertex's
 * side rises at least this share of what the parabola predicts there (an
 * exact parabola: all of it).
 */
const PARABOLA_HOLDS = 0.5;

export interface SubgridInterval {
  /** Sub-grid minimum (vertex), in the axis's own units. */
  best: number;
  /** Profile chi^2 at the vertex (at most the lowest grid value's). */
  minimum: number;
  lo: number;
  hi: number;
  /** Open grid values just outside the region (or the edge value when the region reaches it). */
  nodeLo: number;
  nodeHi: number;
  loAtEdge: boolean;
  hiAtEdge: boolean;
  /** Open grid values inside the region. */
  inside: number;
  /** Open grid values between the outermost inside ones lie outside. */
  disjoint: boolean;
}

/** log10 coordinates for an axis of positive values, the values themselves otherwise. */
export function axisCoordinates(values: ArrayLike<number>): { u: Float64Array; log: boolean } {
  let log = true;
  for (let i = 0; i < values.length; i++) if (!(values[i] > 0)) log = false;
  return { u: Float64Array.from(values as ArrayLike<number>, (v) => (log ? Math.log10(v) : v)), log };
}

/**
 * The sub-grid interval of a profile. `chi2[offset + i]` is the profile at
 * `values[i]` (i < n); `open[i]` (when given) says whether the value has a
 * candidate at all; a non-finite chi^2 at an open value means "beyond the
 * threshold, not known". Returns undefined when no value is open.
 */
export function subgridInterval(
  values: ArrayLike<number>,
  u: ArrayLike<number>,
  log: boolean,
  chi2: ArrayLike<number>,
  offset: number,
  threshold: number,
  open?: (i: number) => boolean,
  unknownDelta = threshold,
): SubgridInterval | undefined {
  const n = values.length;
  const isOpen = (i: number) => (open ? open(i) : Number.isFinite(chi2[offset + i]));
  let k = -1;
  let firstOpen = -1;
  let lastOpen = -1;
  for (let i = 0; i < n; i++) {
    if (!isOpen(i)) continue;
    if (firstOpen < 0) firstOpen = i;
    lastOpen = i;
    const v = chi2[offset + i];
    if (Number.isFinite(v) && (k < 0 || v < chi2[offset + k])) k = i;
  }
  if (k < 0) return undefined;
  const prev = (i: number) => {
    for (let j = i - 1; j >= 0; j--) if (isOpen(j)) return j;
    return -1;
  };
  const next = (i: number) => {
    for (let j = i + 1; j < n; j++) if (isOpen(j)) return j;
    return -1;
  };
  const fromU = (x: number) => (log ? Math.pow(10, x) : x);

  // The vertex of the parabola through the lowest value and its open neighbours.
  let uStar = u[k];
  let minimum = chi2[offset + k];
  const a = prev(k);
  const b = next(k);
  // Only across neighbouring grid values: a parabola across a value never computed (a hole) would guess.
  if (a === k - 1 && b === k + 1 && a >= 0 && Number.isFinite(chi2[offset + a]) && Number.isFinite(chi2[offset + b])) {
    const [x0, x1, x2] = [u[a], u[k], u[b]];
    const [f0, f1, f2] = [chi2[offset + a], chi2[offset + k], chi2[offset + b]];
    const p = (x1 - x0) * (f1 - f2);
    const q = (x1 - x2) * (f1 - f0);
    const denominator = 2 * (p - q);
    if (denominator !== 0) {
      const step = -((x1 - x0) * p - (x1 - x2) * q) / denominator;
      const vertex = x1 + step;
      if (vertex > x0 && vertex < x2) {
        // Lagrange form of the parabola at the vertex.
        const l0 = ((vertex - x1) * (vertex - x2)) / ((x0 - x1) * (x0 - x2));
        const l1 = ((vertex - x0) * (vertex - x2)) / ((x1 - x0) * (x1 - x2));
        const l2 = ((vertex - x0) * (vertex - x1)) / ((x2 - x0) * (x2 - x1));
        const fv = f0 * l0 + f1 * l1 + f2 * l2;
        // The parabola must hold one value further on the vertex's side where there is one: a profile that
        // flattens there (a parameter bounded on one side only) is not parabolic, and its vertex would dip
        // far below every value and push the flat values out of the region.
        const near = vertex > x1 ? b : a;
        const beyond = vertex > x1 ? near + 1 : near - 1;
        let parabolic = true;
        if (beyond >= 0 && beyond < n && isOpen(beyond) && Number.isFinite(chi2[offset + beyond])) {
          const xb = u[beyond];
          const predicted = f0 * (((xb - x1) * (xb - x2)) / ((x0 - x1) * (x0 - x2))) + f1 * (((xb - x0) * (xb - x2)) / ((x1 - x0) * (x1 - x2))) + f2 * (((xb - x0) * (xb - x1)) / ((x2 - x0) * (x2 - x1)));
          parabolic = chi2[offset + beyond] - fv >= PARABOLA_HOLDS * (predicted - fv);
        }
        if (fv <= f1 && parabolic) {
          uStar = vertex;
          minimum = fv;
        }
      }
    }
  }

  const root = Math.sqrt(threshold);
  /** Signed root of Delta chi^2 at value i; an open value of unknown chi^2 sits at its known lower bound. */
  const signedRoot = (i: number) => {
    const v = chi2[offset + i];
    const delta = Number.isFinite(v) ? Math.max(0, v - minimum) : unknownDelta;
    return (u[i] < uStar ? -1 : 1) * Math.sqrt(delta);
  };
  const inside = (i: number) => Number.isFinite(chi2[offset + i]) && chi2[offset + i] - minimum <= threshold;

  let first = -1;
  let last = -1;
  let count = 0;
  for (let i = firstOpen; i <= lastOpen; i++) {
    if (!isOpen(i) || !inside(i)) continue;
    if (first < 0) first = i;
    last = i;
    count++;
  }
  let tested = 0;
  if (first >= 0) for (let i = first; i <= last; i++) if (isOpen(i)) tested++;
  // The vertex lies within the threshold of itself even when no grid value does (a minimum between two values).
  if (first < 0) first = last = k;

  const crossing = (outsideIndex: number, insideIndex: number, target: number) => {
    const s0 = signedRoot(outsideIndex);
    const s1 = signedRoot(insideIndex);
    const t = s1 === s0 ? 1 : (target - s0) / (s1 - s0);
    return fromU(u[outsideIndex] + Math.min(1, Math.max(0, t)) * (u[insideIndex] - u[outsideIndex]));
  };
  const below = prev(first);
  const above = next(last);
  const lo = below < 0 ? values[first] : crossing(below, first, -root);
  const hi = above < 0 ? values[last] : crossing(above, last, root);
  return {
    best: fromU(uStar),
    minimum,
    lo: Math.min(lo, fromU(uStar)),
    hi: Math.max(hi, fromU(uStar)),
    nodeLo: below < 0 ? values[first] : values[below],
    nodeHi: above < 0 ? values[last] : values[above],
    loAtEdge: below < 0,
    hiAtEdge: above < 0,
    inside: count,
    disjoint: count < tested,
  };
}
