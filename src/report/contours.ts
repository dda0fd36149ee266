/**
 * Contour lines of a confidence region on a rectilinear grid of chi^2 values
 * by marching squares (the 2-D case of Lorensen & Cline 1987, "Marching
 * cubes"): each cell of four neighbouring grid values is cut where the value
 * crosses the threshold, the crossing placed by linear interpolation along
 * the cell edge. Saddle cells are resolved by the mean of their corners.
 * Coordinates are in the plot's scale space (log10 for log axes), so the
 * lines are straight in the figure.
 */

export interface Segment {
  x: number;
  y: number;
  x2: number;
  y2: number;
}

/** Stands in for a grid point without a candidate: outside every region. */
const NO_VALUE = Number.POSITIVE_INFINITY;

/**
 * Segments of the boundary {value <= threshold} of values[iy * nx + ix]
 * (null: no value) over grid coordinates xs (length nx) and ys (length ny).
 */
export function contourSegments(xs: readonly number[], ys: readonly number[], values: readonly (number | null)[], threshold: number): Segment[] {
  const nx = xs.length;
  const ny = ys.length;
  const out: Segment[] = [];
  const v = (ix: number, iy: number): number => values[iy * nx + ix] ?? NO_VALUE;
  /** Crossing point between corner a (value va at pa) and corner b along one coordinate. */
  const cut = (pa: number, pb: number, va: number, vb: number): number => {
    // Next to a grid point without a value, the boundary is put half-way.
    if (va === NO_VALUE || vb === NO_VALUE) return (pa + pb) / 2;
    return pa + ((threshold - va) / (vb - va)) * (pb - pa);
  };
  for (let iy = 0; iy + 1 < ny; iy++) {
    for (let ix = 0; ix + 1 < nx; ix++) {
      const x0 = xs[ix];
      const x1 = xs[ix + 1];
      const y0 = ys[iy];
      const y1 = ys[iy + 1];
      // Corners: a = (x0, y0), b = (x1, y0), c = (x1, y1), d = (x0, y1).
      const va = v(ix, iy);
      const vb = v(ix + 1, iy);
      const vc = v(ix + 1, iy + 1);
      const vd = v(ix, iy + 1);
      const code = (va <= threshold ? 1 : 0) | (vb <= threshold ? 2 : 0) | (vc <= threshold ? 4 : 0) | (vd <= threshold ? 8 : 0);
      if (code === 0 || code === 15) continue;
      // Edge crossing points: bottom (a-b), right (b-c), top (d-c), left (a-d).
      const bottom = (): [number, number] => [cut(x0, x1, va, vb), y0];
      const right = (): [number, number] => [x1, cut(y0, y1, vb, vc)];
      const top = (): [number, number] => [cut(x0, x1, vd, vc), y1];
      const left = (): [number, number] => [x0, cut(y0, y1, va, vd)];
      const add = (p: [number, number], q: [number, number]): void => {
        out.push({ x: p[0], y: p[1], x2: q[0], y2: q[1] });
      };
      // A code and its complement (15 - code) give the same segments.
      switch (code) {
        case 1: case 14: add(left(), bottom()); break;
        case 2: case 13: add(bottom(), right()); break;
        case 4: case 11: add(right(), top()); break;
        case 8: case 7: add(top(), left()); break;
        case 3: case 12: add(left(), right()); break;
        case 6: case 9: add(bottom(), top()); break;
        default: {
          // Saddles (5: a and c inside; 10: b and d inside): the mean of the corners decides whether the centre is inside.
          const finite = va < NO_VALUE && vb < NO_VALUE && vc < NO_VALUE && vd < NO_VALUE;
          const centreInside = finite && (va + vb + vc + vd) / 4 <= threshold;
          const acInside = code === 5;
          if (acInside === centreInside) {
            // a and c joined through the centre: cut off the b and d corners.
            add(bottom(), right());
            add(top(), left());
          } else {
            add(left(), bottom());
            add(right(), top());
          }
        }
      }
    }
  }
  return out;
}
