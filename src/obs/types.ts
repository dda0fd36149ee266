/** A typed observation set: what every reader produces and the fit stage reads. */

export type MeasurementKind = 'detection' | 'upper' | 'lower';

/** A column density (cm^-2) or a derived quantity in linear units. */
export interface Measurement {
  kind: MeasurementKind;
  value: number;
  /** Lower and upper 1-sigma errors in the same units (equal for symmetric errors); absent for limits. */
  errLo?: number;
  errHi?: number;
  /** Confidence level of a limit, as a fraction (0.997 for a 3-sigma limit). */
  confidence?: number;
  /** Set when the column came from an integrated optical depth: N = tau_int / A. */
  fromTau?: { tauInt: number; tauIntErr?: number; band: string; bandStrength: number };
}

export interface Sightline {
  /** Name from the file (a star, a position) or `x,y` for a map pixel. */
  id: string;
  /** Observed line-of-sight A_V, mag. */
  av?: number;
  avErr?: number;
  /** Set when A_V was derived from a K-band extinction (A_V = A_K / (A_K/A_V)). */
  ak?: number;
  akErr?: number;
  ra?: number;
  dec?: number;
  /** Map pixel coordinates, 0-based. */
  pixel?: { x: number; y: number };
  /** Species name (network syntax) -> column density, cm^-2. */
  columns: Record<string, Measurement>;
  /** Where it came from, for error messages. */
  source: { file: string; row?: number; line?: number };
}

export interface MapGeometry {
  nx: number;
  ny: number;
  /** WCS and other header cards to carry to the outputs (keyword -> value). */
  wcs: Record<string, string | number | boolean>;
}

export interface ObservationSet {
  file: string;
  kind: 'table' | 'map';
  sightlines: Sightline[];
  map?: MapGeometry;
  warnings: string[];
  /** Reader that produced the set. */
  format?: 'csv' | 'tsv' | 'yaml' | 'votable' | 'fits';
  /** Every species with a column in the file, in file order. */
  species?: string[];
  /** Species read from the file that the network given to the reader lacks: carried and shown, never fitted. */
  outsideNetwork?: string[];
}

/**
 * One observed quantity ready for scoring: an abundance relative to H nuclei
 * (denominator undefined) or a ratio numerator/denominator, in log10 with
 * errors in dex.
 */
export interface ObservedQuantity {
  sightline: string;
  /** Display label, e.g. `CO(s)/H2O(s)` or `X(CO)`. */
  label: string;
  numerator: string;
  denominator?: string;
  kind: MeasurementKind;
  /** log10 of the value (or of the limit). */
  log10: number;
  /** Errors in dex below and above; 0 for limits. */
  sigmaLoDex: number;
  sigmaHiDex: number;
  /** Confidence of a limit, when it was given. */
  confidence?: number;
  /**
   * The parts of a detection's error by the measurement they come from, in
   * dex (symmetric: the mean of the lower and upper relative errors), with the
   * sign the measurement enters log10 of the quantity: `+1` for a numerator
   * column, `-1` for a ratio's reference and for the A_V of N_H. Two quantities
   * of one sightline that share a source share that part of their error
   * (docs/statistics.md section 2): the fit's covariance is built from these.
   */
  errorParts?: ErrorPart[];
}

/** One measurement's share of a quantity's error (see ObservedQuantity.errorParts). */
export interface ErrorPart {
  /** The column (species name) or `A_V`. */
  source: string;
  dex: number;
  sign: 1 | -1;
}
