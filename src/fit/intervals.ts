/**
 * The confidence interval of one parameter from its profile: the grid values
 * whose profiled chi^2 lies within a level's Delta chi^2 threshold of the
 * minimum, i.e. the projection onto this axis of the joint region of p
 * parameters of interest (Avni 1976; Numerical Recipes 15.6). A region that
 * reaches the first or last grid value open to the sightline is flagged: the
 * grid bounds the interval there, not the data, and the truth may lie outside
 * the grid. Values without a candidate (null: excluded from the grid, or
 * outside a held parameter's models) were never tested, so the edges are the
 * outermost values with a candidate, and a gap of such values between two
 * values inside the region does not split it.
 */
import type { ParameterInterval, Profile1D, RegionLevel } from './types.ts';

export function intervalFromProfile(profile: Profile1D, best: number, level: RegionLevel): ParameterInterval {
  const n = profile.values.length;
  let first = -1;
  let last = -1;
  let firstOpen = -1;
  let lastOpen = -1;
  let inside = 0;
  let tested = 0;
  for (let i = 0; i < n; i++) {
    const delta = profile.deltaChi2[i];
    if (delta === null) continue;
    if (firstOpen < 0) firstOpen = i;
    lastOpen = i;
    if (delta <= level.deltaChi2) {
      if (first < 0) first = i;
      last = i;
      inside++;
    }
  }
  if (first < 0) throw new RangeError(`profile of ${profile.parameter} has no value inside its own minimum`);
  for (let i = first; i <= last; i++) if (profile.deltaChi2[i] !== null) tested++;
  const fixed = n === 1;
  return {
    parameter: profile.parameter,
    level: level.level,
    deltaChi2Threshold: level.deltaChi2,
    parametersOfInterest: level.parametersOfInterest,
    best,
    lo: profile.values[first],
    hi: profile.values[last],
    loAtEdge: !fixed && first === firstOpen,
    hiAtEdge: !fixed && last === lastOpen,
    disjoint: inside < tested,
    fixed,
    unresolved: !fixed && inside === 1,
  };
}
