/**
 * Cautions every report shows beside its results, after physics.md section 8
 * (in our words): what a best fit from a model grid does and does not say.
 */
export const DEFAULT_CAUTIONS: readonly string[] = [
  'Model abundances carry the uncertainties of the rate coefficients and binding energies behind them, typically factors of a few; the fit allows for this with a model-uncertainty floor, which does not make the model exact.',
  'A best fit is a statement about this grid of models: the grid point that explains the observations best, not a measurement of the cloud. Conditions outside the grid, or physics the model leaves out, may explain the data as well or better.',
  'Degeneracies are the rule: a denser cloud at a younger age often fits as well as a thinner, older one. Read the chi-square maps and the confidence intervals, not the single best value.',
  'An interval that reaches the edge of the grid bounds the parameter only on one side; the true value may lie beyond the grid.',
];

/** The cautions a report shows: the caller's, else the fit stage's, else the defaults above. */
export function cautionsFor(input: { cautions?: readonly string[]; fit: { cautions: readonly string[] } }): readonly string[] {
  if (input.cautions && input.cautions.length > 0) return input.cautions;
  if (input.fit.cautions.length > 0) return input.fit.cautions;
  return DEFAULT_CAUTIONS;
}
