/**
 * Types of the fit stage: what it reads (CandidateTable, from the grid
 * store) and what it writes (FitStageResult and its parts, to OUT/fit/).
 *
 * Every result type here is JSON-serialisable as it stands: plain numbers,
 * strings, booleans and plain arrays (no typed arrays, no Maps). A value that
 * does not exist (a profile cell with no candidate, an interval with no
 * grid value inside it) is `null`, never Infinity or NaN, so `JSON.stringify`
 * keeps it. Map images are the one exception inside the engine (typed arrays,
 * see MapFitImages); their JSON form (MapFitJson) uses plain arrays with null
 * for a pixel without a fit.
 */

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

/**
 * Files the fit stage writes, relative to the pipeline's output folder.
 * - best_fits.csv: one row per fitted sightline: columns `sightline, density,
 *   age_yr, chi2, dof, reduced_chi2, p_value, agreement, density_lo,
 *   density_hi, age_lo_yr, age_hi_yr`, then for every other grid parameter
 *   `<param>` (and `<param>_lo, <param>_hi` when the grid varies it), then
 *   `density_at_edge, age_at_edge, poor_fit, detections, upper_limits,
 *   lower_limits, model_id, density_unresolved, age_unresolved,
 *   density_disjoint, age_disjoint, delta_chi2, parameters_of_interest`; the
 *   bounds are the 68.3% level, read between grid values. For a map, one
 *   row per fitted pixel: `sightline, x, y, density, age_yr, chi2, dof,
 *   reduced_chi2, p_value, density_lo, density_hi, age_lo_yr, age_hi_yr`,
 *   every other grid parameter's best value, `at_edge, model_id, unresolved,
 *   density_subgrid, age_subgrid_yr`.
 * - intervals.csv: one row per sightline (or joint group) x parameter x level.
 * - residuals.csv: one row per sightline x quantity at the best fit.
 * - joint_fits.csv: one row per joint group member at the group's shared best values.
 * - fit.json: FitStageResult (best fits, residuals, runner-ups, intervals,
 *   joint fits, warnings, cautions; the profiles are in profiles.json).
 * - profiles.json: ProfilesJson (1-D and 2-D profiles per sightline and joint group).
 * - map.json and map_<image>.fits: for a map, MapFitJson and one FITS image per MapImageName.
 */
export const FIT_OUTPUT_FILES = {
  folder: 'fit',
  bestFitsCsv: 'fit/best_fits.csv',
  intervalsCsv: 'fit/intervals.csv',
  residualsCsv: 'fit/residuals.csv',
  jointFitsCsv: 'fit/joint_fits.csv',
  fitJson: 'fit/fit.json',
  profilesJson: 'fit/profiles.json',
  mapJson: 'fit/map.json',
  /** FITS image file of one map image: `fit/map_<name>.fits`. */
  mapImagePrefix: 'fit/map_',
} as const;

/** Time is a fit parameter like any grid condition, named as in every output. */
export const AGE_PARAMETER = 'age_yr';

/** One observed quantity scored against one candidate (the best fit's residuals). */
export interface QuantityScore {
  /** Display label, e.g. `CO(s)/H2O(s)` or `X(CO)`. */
  label: string;
  numerator: string;
  denominator?: string;
  kind: 'detection' | 'upper' | 'lower';
  /** log10 of the observed value or limit. */
  observedLog10: number;
  /** Observational errors, dex (0 for limits). */
  sigmaLoDex: number;
  sigmaHiDex: number;
  /** log10 of the model's abundance or ratio. */
  modelLog10: number;
  /** d = log10 X_model - log10 X_obs, dex. */
  residualDex: number;
  /** Width used: the observational error on the side of d combined in quadrature with the model floor, dex. */
  sigmaDex: number;
  /** This quantity's share of chi^2 ((d/sigma)^2, or -2 ln Phi for a limit). */
  chi2: number;
  /** |d| < 1 dex for a detection; the limit satisfied for a limit. */
  agrees: boolean;
}

/** One (model, output time) candidate. */
export interface CandidateRef {
  modelId: string;
  /** Row of the model in the CandidateTable. */
  modelIndex: number;
  timeIndex: number;
  ageYr: number;
  /** Every grid parameter of the model by condition name (without age_yr). */
  parameters: Record<string, number>;
  chi2: number;
  /** chi2 - chi2 of the best fit. */
  deltaChi2: number;
}

/** Number of quantities of each kind that entered a fit. */
export interface QuantityCounts {
  detections: number;
  upperLimits: number;
  lowerLimits: number;
  /** Quantities asked for but without a measurement for this sightline (skipped, listed in warnings). */
  skipped: number;
}

/**
 * A 1-D profile: chi^2 minimised over every other parameter (and time) at each
 * distinct grid value of one parameter (or of age_yr).
 */
export interface Profile1D {
  parameter: string;
  /** Distinct grid values, ascending. */
  values: number[];
  /** null where no candidate open to this sightline has that value (grid exclusions, held parameters). */
  chi2Min: (number | null)[];
  /** chi2Min - global chi2 minimum, null where chi2Min is null. */
  deltaChi2: (number | null)[];
}

/** A 2-D profile over a pair of parameters: chi^2 minimised over the rest at each pair of grid values. */
export interface Profile2D {
  x: string;
  y: string;
  /** Distinct grid values of x and of y, ascending. */
  xValues: number[];
  yValues: number[];
  /** chi2Min[iy * xValues.length + ix]; null where no candidate has that pair of values. */
  chi2Min: (number | null)[];
  /** chi2Min - global minimum, null where chi2Min is null. */
  deltaChi2: (number | null)[];
}

/** Delta chi^2 threshold of one confidence level (Avni 1976). */
export interface RegionLevel {
  /** Confidence level, e.g. 0.683. */
  level: number;
  /** Number of parameters of interest the threshold is for. */
  parametersOfInterest: number;
  /** Delta chi^2 threshold: the chi-square quantile at `level` for that many degrees of freedom. */
  deltaChi2: number;
}

/**
 * Confidence interval of one parameter at one level: the range of values
 * whose profile lies within the level's Delta chi^2 threshold: one
 * parameter's own interval at p = 1, the projection of the joint region of p
 * parameters onto this axis at p > 1.
 */
export interface ParameterInterval {
  parameter: string;
  level: number;
  deltaChi2Threshold: number;
  /** p of the threshold: 1 one-parameter, more a projection (absent in files written before it was stated). */
  parametersOfInterest?: number;
  /** Sub-grid best value: the vertex of the profile interpolated between grid values (docs/statistics.md section 5). */
  best: number;
  /** The grid value of the best candidate (absent in files written before sub-grid reading). */
  bestNode?: number;
  /** Bounds of the region, interpolated between grid values (sub-grid reading). */
  lo: number;
  hi: number;
  /** The open grid values just outside the region (the edge value where it reaches the edge): the bounds the grid itself resolves. */
  nodeLo?: number;
  nodeHi?: number;
  /** The region reaches the smallest (largest) grid value with a candidate open to the sightline: the truth may lie outside the grid. */
  loAtEdge: boolean;
  hiAtEdge: boolean;
  /** Grid values between lo and hi lie outside the region (the region has several parts); values without a candidate do not count. */
  disjoint: boolean;
  /** The grid has one value of this parameter: it was not fitted. */
  fixed: boolean;
  /** At most one grid value lies inside: the region is narrower than the grid spacing; its bounds come from the interpolation alone, and nodeLo..nodeHi is what the grid resolves. */
  unresolved: boolean;
}

/** Credible interval of one parameter from its marginal posterior (docs/statistics.md section 8). */
export interface CredibleInterval {
  parameter: string;
  level: number;
  /** Equal-tailed: (1 - level)/2 of the mass below lo and above hi. */
  lo: number;
  hi: number;
  /** Highest-density interval: the densest cells holding the level's mass (cell edges). */
  hdiLo: number;
  hdiHi: number;
  /** The highest-density cells are not contiguous. */
  hdiDisjoint: boolean;
  /** The first (last) grid cell holds more than half a tail's mass: the grid cuts the posterior off there. */
  loAtEdge: boolean;
  hiAtEdge: boolean;
}

/** Marginal posterior of one parameter: probability of each grid value's cell. */
export interface MarginalPosterior {
  parameter: string;
  /** The prior, in words: `uniform in log10 density`. */
  prior: string;
  values: number[];
  probability: number[];
  /** Posterior mean and standard deviation of log10 of the parameter (null for an axis with values <= 0). */
  meanLog: number | null;
  sdLog: number | null;
}

/** The posterior reading of one fit. */
export interface PosteriorSummary {
  priors: string[];
  marginals: MarginalPosterior[];
  intervals: CredibleInterval[];
  /** 2-D marginals of the fit's pairs: probability[iy * xValues.length + ix]. */
  pairs: { x: string; y: string; xValues: number[]; yValues: number[]; probability: number[] }[];
}

/** Everything known about the fit of one sightline. */
export interface SightlineFit {
  sightline: string;
  best: CandidateRef;
  dof: number;
  reducedChi2: number;
  /** Upper-tail probability of chi2 for dof degrees of freedom. */
  pValue: number;
  /** Share of the used quantities the best fit matches within a factor of 10 (limits satisfied count as agreeing). */
  agreementFraction: number;
  counts: QuantityCounts;
  /** Number of fitted parameters counted in dof: independent grid parameters with more than one value (ties and held parameters excluded), plus age when there are several times. */
  fittedParameters: number;
  /**
   * Grid parameters held at one value for this sightline (model A_V tied to
   * the sightline's own A_V): only candidates with these values were scored,
   * and these parameters have no profile or interval here.
   */
  heldParameters: Record<string, number>;
  residuals: QuantityScore[];
  /** Candidates other than the best within the first level's threshold, by ascending chi2 (at most fit.runner_ups). */
  runnerUps: CandidateRef[];
  /** How many candidates lie within the first level's threshold in all (the best included). */
  candidatesInRegion: number;
  intervals: ParameterInterval[];
  /** The posterior reading (fit.method profile+posterior; absent otherwise and in files written before it). */
  posterior?: PosteriorSummary;
  /** Poor fit, interval at the grid edge, skipped quantities, dof floored. */
  warnings: string[];
}

/** Profiles of one sightline or joint group (written to profiles.json). */
export interface SightlineProfiles {
  /** Sightline id, or the joint group name. */
  sightline: string;
  chi2Best: number;
  profiles: Profile1D[];
  pairs: Profile2D[];
}

/** Per member of a joint group: its best candidate at the group's shared values. */
export interface JointMember {
  sightline: string;
  best: CandidateRef;
  chi2: number;
  counts: QuantityCounts;
}

/**
 * A group of sightlines fitted as one with some parameters shared (one age,
 * one density): chi^2 summed over members at each shared value, every other
 * parameter profiled per member.
 */
export interface JointFit {
  name: string;
  members: string[];
  /** Shared parameter names (age_yr or grid conditions). */
  shared: string[];
  /** Best shared values by name. */
  sharedBest: Record<string, number>;
  chi2: number;
  dof: number;
  reducedChi2: number;
  pValue: number;
  fittedParameters: number;
  memberFits: JointMember[];
  /** Profiles of each shared parameter: summed chi^2 minimised over the other shared parameters. */
  profiles: Profile1D[];
  intervals: ParameterInterval[];
  /** The posterior over the shared values, each member's own parameters profiled (fit.method profile+posterior). */
  posterior?: PosteriorSummary;
  warnings: string[];
}

/** What fit.json holds. */
export interface FitStageResult {
  /** Format of this file, for readers. */
  format: 'hoarfrost-fit/1';
  /** Grid parameter names with more than one value (fitted), then age_yr. */
  fittedParameters: string[];
  /** Grid parameter names with one value (held fixed) and that value. */
  fixedParameters: Record<string, number>;
  /** Levels and thresholds of the intervals (p = fit.parameters_of_interest). */
  levels: RegionLevel[];
  /** Levels and thresholds of the 2-D regions of the pair profiles (p = 2); absent in files written before they were stated. */
  regionLevels?: RegionLevel[];
  modelSigmaDex: number;
  /**
   * The grid's own step of each fitted parameter (the median spacing of its
   * grid values, in dex, before any refinement): the unit of the lock file's
   * default tolerances (absent in files written before it).
   */
  gridStepsDex?: Record<string, number>;
  /** The sub-grid refinement of the models (absent when off, for maps, and in files written before it). */
  interpolation?: InterpolationSummary;
  /** p-value below which a fit is reported as poor. */
  poorFitP: number;
  nCandidates: number;
  fits: SightlineFit[];
  joint: JointFit[];
  /** Every warning of the stage: the observations', the stage's, and each fit's and joint group's (also kept in that fit). */
  warnings: string[];
  /** Model cautions to show the reader (docs/physics.md section 8). */
  cautions: string[];
}

/** How the models were refined between grid values (docs/statistics.md section 5). */
export interface InterpolationSummary {
  /** Steps each grid interval was cut into. */
  factor: number;
  /** Refined axes (grid conditions, then age_yr). */
  axes: string[];
  /** Candidates of the grid and of the refined mesh. */
  gridCandidates: number;
  refinedCandidates: number;
  /** Per quantity label: the interpolation error at the grid spacing, dex, added in quadrature to the model floor. */
  errorDex: Record<string, number>;
  /** Per quantity label: the leave-one-out error measured at held-out grid values (twice the spacing), dex. */
  leaveOneOutDex: Record<string, number>;
}

/** What profiles.json holds. */
export interface ProfilesJson {
  format: 'hoarfrost-fit-profiles/1';
  levels: RegionLevel[];
  sightlines: SightlineProfiles[];
  joint: SightlineProfiles[];
}

/** Images produced for a map, one value per pixel, row-major (index y * nx + x). */
export const MAP_IMAGE_NAMES = [
  'best_density',
  'best_age_yr',
  'best_chi2',
  'reduced_chi2',
  'p_value',
  'dof',
  /** Bounds of the 68.3% intervals, read between grid values (sub-grid). */
  'density_lo',
  'density_hi',
  'age_lo_yr',
  'age_hi_yr',
  /** log10(hi/lo) of the 68.3% interval, dex. */
  'density_width_dex',
  'age_width_dex',
  /** 1 where the 68.3% density or age interval reaches the grid edge, else 0. */
  'at_edge',
  /** 1 where the 68.3% density or age interval holds at most one grid value (narrower than the grid spacing), else 0. */
  'unresolved',
  /** Sub-grid best density and age: the vertices of the interpolated profiles (docs/statistics.md section 5). */
  'density_subgrid',
  'age_subgrid_yr',
  'used_quantities',
] as const;
export type MapImageName = (typeof MAP_IMAGE_NAMES)[number];

/** Engine form of map results: NaN marks a pixel without a fit. */
export interface MapFitImages {
  nx: number;
  ny: number;
  images: Record<MapImageName, Float64Array>;
  /** Best candidate (model * nTimes + time) of every pixel, -1 where none. */
  bestCandidate: Int32Array;
  /** Pixels with at least one usable quantity. */
  fittedPixels: number;
  level: RegionLevel;
  warnings: string[];
}

/** What map.json holds: the images as plain arrays, null for a pixel without a fit. */
export interface MapFitJson {
  format: 'hoarfrost-fit-map/1';
  nx: number;
  ny: number;
  fittedPixels: number;
  level: RegionLevel;
  images: Record<MapImageName, (number | null)[]>;
  warnings: string[];
}
