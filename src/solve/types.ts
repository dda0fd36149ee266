/**
 * Public types of the stiff integrator. The integrator knows nothing of
 * chemistry: a problem is a right-hand side, an analytic Jacobian and the
 * Jacobian's fixed sparsity pattern.
 */

/**
 * Compressed sparse rows: row i holds the columns
 * colIdx[rowPtr[i] .. rowPtr[i + 1]), sorted increasing, without repeats.
 */
export interface SparsityPattern {
  rowPtr: Int32Array;
  colIdx: Int32Array;
}

export interface OdeProblem {
  /** Number of unknowns. */
  n: number;
  /** Writes dy/dt at (t, y) into dydt. Must not keep references to y or dydt. */
  rhs(t: number, y: Float64Array, dydt: Float64Array): void;
  /** Writes df_i/dy_j at (t, y) into values, in the order of `pattern` (and `rankOne`, when there is one). */
  jacobian(t: number, y: Float64Array, values: Float64Array): void;
  pattern: SparsityPattern;
  /** A dense rank-one part of the Jacobian, J = J(pattern) + u w^T, that the pattern would carry only with much fill. */
  rankOne?: RankOneJacobian;
  /**
   * Called once per step attempt, at the predicted state, before the
   * corrector's Newton iteration. A problem whose right-hand side switches
   * between smooth forms on a condition of the state picks its form here and
   * keeps it in `rhs` and `jacobian` until the next call, so that within a
   * step it is smooth and Newton converges as on any smooth problem; the
   * error test still judges the step. Returns true when the form changed,
   * since a Jacobian taken on the other form is then stale.
   */
  beginStep?(t: number, yPredicted: Float64Array): boolean;
}

/** Vectors of length n that every `jacobian` call rewrites beside the pattern's values. */
export interface RankOneJacobian {
  u: Float64Array;
  w: Float64Array;
}

export interface IntegrateOptions {
  /** Relative tolerance of the local error test. */
  rtol: number;
  /** Absolute tolerance, one for all unknowns or one per unknown. */
  atol: number | Float64Array;
  /** Most accepted steps before giving up (default DEFAULT_MAX_STEPS). */
  maxSteps?: number;
  /** Largest step size (default unbounded). */
  maxStep?: number;
  /** First step size (default: chosen from the size of the right-hand side). */
  initialStep?: number;
  /** Clip negative values to zero after each accepted step and in every output. */
  nonNegative?: boolean;
}

export interface SolverStats {
  /** Accepted steps. */
  steps: number;
  /** Rejected step attempts (error test failures and Newton failures). */
  failedSteps: number;
  rhsEvals: number;
  jacobianEvals: number;
  /** LU factorisations of the Newton matrix I - c J. */
  factorizations: number;
  /** Newton iterations that failed to converge (each leads to a new Jacobian or a smaller step). */
  newtonFailures: number;
  /** orderHistogram[k - 1] = accepted steps taken at order k, k = 1..5. */
  orderHistogram: number[];
}

export interface IntegrateResult {
  /**
   * One state per output time reached, in order. On failure this holds only
   * the outputs reached before the failure, and `t` has the same length.
   */
  y: Float64Array[];
  /** The output times reached (a prefix of the requested output times). */
  t: Float64Array;
  stats: SolverStats;
  /** 'ok', or a sentence saying why and where the integration stopped. */
  status: 'ok' | string;
  /** Time of the last accepted step when the integration failed. */
  failureTime?: number;
}
