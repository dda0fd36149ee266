/**
 * Model A_V tied to the observed sightlines: toward a background star the
 * model cloud's A_V is a fraction (about half: common practice) of the
 * observed line-of-sight A_V. Values are binned to a step so that a map with
 * thousands of pixels gives a short axis; a sightline is compared with the
 * models of its own bin (`sightlineModelAv`).
 */

/** Bin width of model A_V for sightline ties, mag: a choice, well inside the ~1 mag uncertainty of A_V toward background stars (memory). */
export const DEFAULT_SIGHTLINE_AV_STEP = 0.5;
const BIN_SIGNIFICANT_DIGITS = 12;

/** The model A_V a sightline is compared with: fraction * A_V rounded to the nearest multiple of step. */
export function sightlineModelAv(observedAv: number, fraction: number, step: number): number {
  return Number((Math.round((fraction * observedAv) / step) * step).toPrecision(BIN_SIGNIFICANT_DIGITS));
}

/** The distinct model A_V bins of a set of sightlines, increasing. */
export function binSightlineAv(observedAv: readonly number[], fraction: number, step: number): number[] {
  const bins = new Set<number>();
  for (const av of observedAv) bins.add(sightlineModelAv(Math.max(0, av), fraction, step));
  return [...bins].sort((a, b) => a - b);
}
