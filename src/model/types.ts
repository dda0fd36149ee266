/** One model run: conditions in, abundance time series out. */
import type { GrainOptions, PhotochemistryOptions, PhysicalConditions } from '../config/conditions.ts';
import type { Network } from '../chem/network-types.ts';
import type { RateDraw } from '../chem/uncertainty.ts';
import type { SolverStats } from '../solve/index.ts';
import type { PhysicalTrack } from './physical-track.ts';

export interface SolverSettings {
  rtol: number;
  /** Absolute tolerance in fractional abundance. */
  atol: number;
  maxSteps?: number;
}

/**
 * Everything besides the network and the point's physical conditions that
 * changes a model's result. The model setup (setup.ts) holds one, built once
 * from a pipeline; the model content hash covers every field of it
 * generically (src/grid/hash.ts), so a field added here is hashed unasked.
 */
export interface ModelOptions {
  grain: GrainOptions;
  photochemistry: PhotochemistryOptions;
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
  massActionOnly: boolean;
  /**
   * One Monte Carlo realization of the rate coefficients (docs/uncertainty.md):
   * every reaction's k drawn once from its log-normal factor. Absent: the
   * nominal coefficients (and the model hash of before).
   */
  rateDraw?: RateDraw;
  /** Conditions that change with time, from the point's conditions at age 0 (src/model/physical-track.ts); absent for static conditions. */
  track?: PhysicalTrack;
}

/** One model's input: a setup's network and options with one point's conditions (the switches default to off / shielded). */
export interface ModelInput extends Omit<ModelOptions, 'massActionOnly' | 'photochemistry'>, Partial<Pick<ModelOptions, 'massActionOnly' | 'photochemistry'>> {
  network: Network;
  conditions: PhysicalConditions;
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
  /**
   * The solver's state at the last output time reached, by the model
   * network's species (with the mantle twins when the three-phase ice is
   * on): what a second stage starts from.
   */
  finalState?: { species: string[]; values: Float64Array };
  /** With a physical track: the conditions it changes (density, visual_extinction or the temperatures) at each output time. */
  trackConditions?: Partial<Record<keyof PhysicalConditions, number[]>>;
  /** Reactions of the network left out for these options (the other H2 route, helium accretion), each with why. */
  skippedNotes?: string[];
  wallMs: number;
}
