/** What a reader of any fit must be told (docs/physics.md section 8), printed with every fit and written to fit.json. */
export const MODEL_CAUTIONS: readonly string[] = [
  'Model abundances inherit the uncertainties of rate coefficients and binding energies (factors of a few); the model floor in the errors stands for them only roughly.',
  'A best fit is a statement about this model grid, not a measurement of the cloud: a parameter the grid does not vary, or a process the network lacks, is not tested.',
  'Degeneracies are the rule (density against age, notably): read the profiles and the 2-D regions, not the best values alone.',
  'An interval that reaches the edge of the grid bounds the parameter on one side only; the true value may lie beyond the grid.',
];
