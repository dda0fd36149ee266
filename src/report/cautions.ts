/**
 * Cautions every report shows beside its results (docs/physics.md section 8, in
 * our words): the fit stage's own list, which every fit result carries.
 */
import { MODEL_CAUTIONS } from '../fit/cautions.ts';

/** The cautions a report shows: the caller's, else the fit stage's, else the fit room's list. */
export function cautionsFor(input: { cautions?: readonly string[]; fit: { cautions: readonly string[] } }): readonly string[] {
  if (input.cautions && input.cautions.length > 0) return input.cautions;
  if (input.fit.cautions.length > 0) return input.fit.cautions;
  return MODEL_CAUTIONS;
}
