/**
 * What the fit stage reads: every (model, output time) candidate's abundances
 * for the species the fit needs, as typed arrays (the grid store's query
 * returns this shape; the fit room does not import the grid room).
 */
export interface CandidateTable {
  /** Every condition name of the grid (varied and fixed), in a fixed order. */
  parameterNames: string[];
  nModels: number;
  nTimes: number;
  nSpecies: number;
  /** parameters[model * parameterNames.length + p] */
  parameters: Float64Array;
  modelIds: string[];
  /** Output times shared by every model, years. */
  timesYr: Float64Array;
  species: string[];
  /** abundances[(model * nTimes + t) * nSpecies + s]: fractional abundance relative to n_H. Failed models are not included. */
  abundances: Float64Array;
}
