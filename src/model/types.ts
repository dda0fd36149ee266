/** One model run: conditions in, abundance time series out. */
import type { GrainOptions, PhysicalConditions } from '../config/conditions.ts';
import type { Network } from '../chem/network-types.ts';
import type { SolverStats } from '../solve/index.ts';

export interface SolverSettings {
  rtol: number;
  /** Absolute tolerance in fractional abundance. */
  atol: number;
  maxSteps?: number;
}

export interface ModelInput {
  network: Network;
  conditions: PhysicalConditions;
  grain: GrainOptions;
  /** Initial fractional abundances x_i = n_i/n_H, by species name; others start at 0. */
  initial: Readonly<Record<string, number>>;
  /** Output times, years (Julian, 3.15576e7 s), increasing, > 0. */
  timesYr: Float64Array;
  solver: SolverSettings;
  /**
   * Leave out the reactions whose terms are not mass-action: every photodesorption
   * reaction (its monolayer treatment is one term, below a monolayer too), the
   * self-shielded H2 photodissociation and the parametric H2 formation rate.
   */
  massActionOnly?: boolean;
  /** Shield H2 photodissociation by the H2 column (Draine & Bertoldi 1996); default true. */
  selfShielding?: boolean;
}

export interface ConservationReport {
  /** Largest relative drift of any element total or of the charge balance (relative to the total positive charge). */
  maxRelativeDrift: number;
  /** What drifted most: an element symbol or 'charge'. */
  worst: string;
  perElement: Record<string, number>;
  chargeDrift: number;
}

/** The integrator's work counts that the model store keeps (the order histogram stays with the solver). */
export type ModelStats = Omit<SolverStats, 'orderHistogram'>;

export interface ModelResult {
  /**
   * Output columns: the network's species, and with the mantle on each ice
   * species three times, `X(s)` (surface + mantle, the whole ice),
   * `X(surface)` and `X(mantle)` (src/chem/mantle.ts outputColumns).
   */
  species: string[];
  timesYr: Float64Array;
  /** Row-major [time][species] fractional abundances; rows after a solver failure are NaN. */
  abundances: Float64Array;
  status: 'ok' | 'failed';
  /** Reason and time of a failure, as a sentence. */
  failure?: string;
  conservation: ConservationReport;
  stats: ModelStats;
  /**
   * Values used outside their valid range, once each: gas-temperature clamps of
   * reactions, and an H2 formation treatment beyond the dust temperatures where it holds.
   */
  clampNotes: string[];
  /** Reactions of the network left out for these options (the other H2 route, helium accretion), each with why. */
  skippedNotes?: string[];
  wallMs: number;
}
