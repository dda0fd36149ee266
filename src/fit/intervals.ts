/**
 * The confidence interval of one parameter from its profile: the values
 * whose profiled chi^2 lies within a level's Delta chi^2 threshold of the
 * minimum (one parameter's own interval at p = 1; the projection onto this
 * axis of the joint region of p parameters at p > 1; Avni 1976; Numerical
 * Recipes 15.6), read between grid values by the sub-grid interpolation of
 * subgrid.ts. A region that reaches the first or last grid value open to the
 * sightline is flagged: the grid bounds the interval there, not the data, and
 * the truth may lie outside the grid. Values without a candidate (null:
 * excluded from the grid, or outside a held parameter's models) were never
 * tested, so the edges are the outermost values with a candidate, and a gap
 * of such values between two values inside the region does not split it.
 */
import { axisCoordinates, subgridInterval } from './subgrid.ts';
import type { ParameterInterval, Profile1D, RegionLevel } from './types.ts';

export function intervalFromProfile(profile: Profile1D, bestNode: number, level: RegionLevel): ParameterInterval {
  const n = profile.values.length;
  const chi2 = Float64Array.from(profile.chi2Min, (v) => (v === null ? NaN : v));
  const { u, log } = axisCoordinates(profile.values);
  const sub = subgridInterval(profile.values, u, log, chi2, 0, level.deltaChi2);
  if (sub === undefined) throw new RangeError(`profile of ${profile.parameter} has no value with a candidate`);
  const fixed = n === 1;
  return {
    parameter: profile.parameter,
    level: level.level,
    deltaChi2Threshold: level.deltaChi2,
    parametersOfInterest: level.parametersOfInterest,
    best: sub.best,
    bestNode,
    lo: sub.lo,
    hi: sub.hi,
    nodeLo: sub.nodeLo,
    nodeHi: sub.nodeHi,
    loAtEdge: !fixed && sub.loAtEdge,
    hiAtEdge: !fixed && sub.hiAtEdge,
    disjoint: sub.disjoint,
    fixed,
    unresolved: !fixed && sub.inside <= 1,
  };
}
