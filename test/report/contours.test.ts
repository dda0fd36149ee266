/**
 * Contour lines of confidence regions (marching squares): crossing points
 * lie where the linear interpolation along each cell edge meets the
 * threshold, an interior region is a closed loop, and a region cut by the
 * grid edge stays open there (the region goes on beyond the grid).
 */
import { describe, expect, it } from 'vitest';
import { contourSegments, type Segment } from '../../src/report/contours.ts';

const AXIS = [-2, -1, 0, 1, 2];

function grid(f: (x: number, y: number) => number | null): (number | null)[] {
  return AXIS.flatMap((y) => AXIS.map((x) => f(x, y)));
}

/** Each endpoint, rounded, with how many segments meet there. */
function endpointDegrees(segments: Segment[]): Map<string, number> {
  const deg = new Map<string, number>();
  for (const s of segments) {
    for (const key of [`${s.x.toFixed(9)},${s.y.toFixed(9)}`, `${s.x2.toFixed(9)},${s.y2.toFixed(9)}`]) deg.set(key, (deg.get(key) ?? 0) + 1);
  }
  return deg;
}

describe('contourSegments', () => {
  const bowl = (x: number, y: number) => x * x + y * y;

  it('puts every crossing where the edge interpolation equals the threshold', () => {
    const threshold = 1.5;
    const segs = contourSegments(AXIS, AXIS, grid(bowl), threshold);
    expect(segs.length).toBeGreaterThan(0);
    for (const s of segs) {
      for (const [x, y] of [[s.x, s.y], [s.x2, s.y2]]) {
        // A crossing lies on a grid line: interpolate the bowl linearly between the two grid points around it.
        const onVertical = AXIS.includes(x);
        const t = onVertical ? y : x;
        const a = Math.floor(t);
        const va = onVertical ? bowl(x, a) : bowl(a, y);
        const vb = onVertical ? bowl(x, a + 1) : bowl(a + 1, y);
        expect(va + (vb - va) * (t - a)).toBeCloseTo(threshold, 12);
      }
    }
    // On the x axis the crossing is at 1 + (1.5 - 1) / (4 - 1), by hand.
    const onAxis = segs.flatMap((s) => [[s.x, s.y], [s.x2, s.y2]]).filter(([, y]) => y === 0).map(([x]) => x).sort((p, q) => p - q);
    expect(onAxis[0]).toBeCloseTo(-(1 + 0.5 / 3), 12);
    expect(onAxis[onAxis.length - 1]).toBeCloseTo(1 + 0.5 / 3, 12);
  });

  it('closes a region inside the grid: every endpoint joins two segments', () => {
    const deg = endpointDegrees(contourSegments(AXIS, AXIS, grid(bowl), 2.5));
    expect([...deg.values()].every((d) => d === 2)).toBe(true);
  });

  it('leaves a region open where it meets the grid edge', () => {
    // A valley along y = 0 through the whole grid: the region crosses the left and right edges.
    const deg = endpointDegrees(contourSegments(AXIS, AXIS, grid((_x, y) => y * y), 0.5));
    expect([...deg.values()].filter((d) => d === 1)).toHaveLength(4);
  });

  it('treats a missing value as outside and finds nothing when all is inside or outside', () => {
    const withHole = contourSegments(AXIS, AXIS, grid((x, y) => (x === 0 && y === 0 ? null : 0)), 1);
    expect(endpointDegrees(withHole).size).toBe(4);
    expect(contourSegments(AXIS, AXIS, grid(() => 0), 1)).toEqual([]);
    expect(contourSegments(AXIS, AXIS, grid(() => 5), 1)).toEqual([]);
  });
});
