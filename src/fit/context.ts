/**
 * What every fit of one stage shares: the candidate table, the model value
 * matrix, the grid axes, the thresholds and the options, plus a scratch chi^2
 * array reused for each sightline.
 */
import type { GridAxes } from './axes.ts';
import type { ModelQuantities } from './model-quantities.ts';
import type { ScoringWidths } from './observation-vector.ts';
import type { CandidateTable, RegionLevel } from './types.ts';

export interface FitOptions extends ScoringWidths {
  /** Ascending; the first is the level of runner-ups and warnings. */
  levels: RegionLevel[];
  pairs: [string, string][];
  /** log10 of the agreement factor. */
  agreementDex: number;
  runnerUps: number;
  limitsInDof: boolean;
  poorFitP: number;
  /** Compute the posterior reading beside the profile one. */
  posterior: boolean;
  /** Part of the model floor shared by the members of a joint group, dex (at most the floor). */
  sharedModelSigmaDex: number;
}

export interface FitContext {
  table: CandidateTable;
  model: ModelQuantities;
  axes: GridAxes;
  options: FitOptions;
  /** chi^2 of every candidate, overwritten by each sightline. */
  chi2: Float64Array;
}
