/**
 * Variable-order (1 to 5), variable-step backward differentiation formulas in
 * the fixed-leading-coefficient, difference-array form of the numerical
 * differentiation formulas, ported from SciPy's `scipy/integrate/_ivp/bdf.py`.
 *
 * References:
 *  1. L. F. Shampine, M. W. Reichelt, "The MATLAB ODE Suite", SIAM J. Sci.
 *     Comput. 18 (1997) 1-22: the NDF coefficients (kappa), the difference
 *     form, the change of step by the matrices R and U, and the error estimates.
 *  2. G. D. Byrne, A. C. Hindmarsh, "A Polyalgorithm for the Numerical
 *     Solution of Ordinary Differential Equations", ACM Trans. Math. Softw. 1
 *     (1975) 71-96: order and step selection, modified Newton iteration.
 *  3. A. C. Hindmarsh et al., "SUNDIALS: Suite of nonlinear and
 *     differential/algebraic equation solvers", ACM Trans. Math. Softw. 31
 *     (2005) 363-396: weighted RMS norm, Jacobian reuse, failure limits.
 *  4. C. W. Gear, "Numerical Initial Value Problems in Ordinary Differential
 *     Equations", Prentice-Hall (1971): the BDF family.
 *  5. E. Hairer, S. P. Norsett, G. Wanner, "Solving Ordinary Differential
 *     Equations I", sec. II.4: the starting step size.
 *
 * Where this departs from SciPy, it follows CVODE (ref. 3): the LU of
 * I - c J is kept while c changes by under LU_REUSE_RATIO (increments scaled
 * by 2 / (1 + c / c')) instead of refactoring at every step change; a step
 * increase below STEP_INCREASE_THRESHOLD is not taken; the Newton rate is
 * carried between steps; the Jacobian is renewed after JACOBIAN_MAX_AGE
 * steps; a step fails for good after MAX_NEWTON_FAILURES_PER_STEP Newton
 * or MAX_ERROR_FAILURES_PER_STEP error-test failures, and three error-test
 * failures in a row drop the order to 1; after a Newton failure the retry at
 * the smaller step evaluates the Jacobian afresh at its own prediction; an
 * iteration that stops contracting with its increment already within the
 * Newton tolerance has converged (CVODE's test, where SciPy rejects it). With
 * `nonNegative`, negative components of each accepted solution (the newest
 * row of the difference array) and of every output are set to zero, the
 * usual remedy for the round-off negatives of abundances far below atol.
 * Each step attempt first hands its prediction to the problem's optional
 * `beginStep`, where a switched right-hand side fixes its form for the
 * attempt (the usual treatment of switches: smooth within a step, each step
 * still judged by the error test).
 *
 * The integration always starts at t = 0 from y0 and runs forward to the last
 * output time; outputs are interpolated from the BDF polynomial, the last one
 * is stepped onto exactly. The first step comes from the size of f(0, y0)
 * (ref. 5), so spans of 1e-6 s to 1e14 s and more need no hint; steps grow
 * by at most MAX_FACTOR per change. No allocation happens inside the step loop.
 */
import { createNewtonMatrix, RankOneNewtonMatrix, type NewtonMatrix } from './newton-matrix.ts';
import type { IntegrateOptions, IntegrateResult, OdeProblem, SolverStats } from './types.ts';

/** Highest BDF order. */
export const MAX_ORDER = 5;
/** Newton iterations per attempt before the attempt counts as failed. */
const NEWTON_MAXITER = 4;
/**
 * Newton stops when its estimated remaining error is below this, in the
 * weighted RMS norm of the error test. SciPy uses min(0.03, sqrt(rtol));
 * CVODE is looser still (0.1 of the error-test bound). 0.03 at every rtol
 * keeps the iteration error a few per cent of the local error and saves
 * about a tenth of the work at rtol 1e-6 (measured on the default network).
 */
const NEWTON_TOLERANCE = 0.03;
/** Smallest and largest step-size ratio after an error test. */
const MIN_FACTOR = 0.2;
const MAX_FACTOR = 10;
/** Step-size ratio after a Newton failure. */
const NEWTON_FAILURE_FACTOR = 0.5;
/** NDF coefficients kappa_k, k = 0..5 (Shampine & Reichelt 1997, table 1; kappa_5 = 0 is plain BDF5). */
const KAPPA = [0, -0.185, -1 / 9, -0.0823, -0.0415, 0];
/** Safety factor on predicted step ratios (SciPy's 0.9). */
const SAFETY = 0.9;
/** Default limit on accepted steps. */
export const DEFAULT_MAX_STEPS = 100_000;
/** A Jacobian is re-evaluated after this many accepted steps even if Newton still converges (CVODE's MSBJ). */
const JACOBIAN_MAX_AGE = 50;
/**
 * The factorisation of I - c' J is reused for I - c J while |c / c' - 1| stays
 * below this (CVODE's DGMAX, Hindmarsh et al. 2005), with the Newton
 * increments scaled by 2 / (1 + c / c') ...
 */
const LU_REUSE_RATIO = 0.3;
/** ... and for at most this many accepted steps (CVODE's MSBP). */
const LU_MAX_AGE = 20;
/** A step increase below this factor is not worth a new factorisation: keep h (CVODE's THRESH). */
const STEP_INCREASE_THRESHOLD = 1.5;
/** Largest fall of the carried Newton rate per iteration (CVODE's CRDOWN). */
const RATE_DECAY = 0.3;
/** Give up after this many successive Newton failures on one step (CVODE's maxncf). */
const MAX_NEWTON_FAILURES_PER_STEP = 10;
/** Give up after this many successive error-test failures on one step. */
const MAX_ERROR_FAILURES_PER_STEP = 20;
/** After this many error-test failures on one step, drop to order 1 (as CVODE does). */
const ERROR_FAILURES_BEFORE_ORDER_ONE = 3;
/** The smallest step is this many units in the last place of t (SciPy's 10 * nextafter). */
const MIN_STEP_ULPS = 10;
/** Starting step when the state or its derivative is negligible (Hairer, Norsett & Wanner). */
const FALLBACK_FIRST_STEP = 1e-6;

/** gamma_k = sum_{j=1..k} 1/j; alpha_k = (1 - kappa_k) gamma_k; error constants kappa_k gamma_k + 1/(k+1). */
const GAMMA = new Float64Array(MAX_ORDER + 1);
const ALPHA = new Float64Array(MAX_ORDER + 1);
const ERROR_CONST = new Float64Array(MAX_ORDER + 2);
for (let k = 1; k <= MAX_ORDER; k++) GAMMA[k] = GAMMA[k - 1] + 1 / k;
for (let k = 0; k <= MAX_ORDER; k++) {
  ALPHA[k] = (1 - KAPPA[k]) * GAMMA[k];
  ERROR_CONST[k] = KAPPA[k] * GAMMA[k] + 1 / (k + 1);
}
ERROR_CONST[MAX_ORDER + 1] = 1 / (MAX_ORDER + 2);

const enum Outcome {
  Accepted,
  TooManySteps,
  StepUnderflow,
  NewtonFailure,
  ErrorTestFailure,
  NonFiniteJacobian,
}

/** Weighted RMS norm sqrt(mean((x_i / scale_i)^2)) (Hindmarsh et al. 2005). */
function rmsNorm(x: Float64Array, scale: Float64Array, offset: number, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) {
    const v = x[offset + i] / scale[i];
    s += v * v;
  }
  return Math.sqrt(s / n);
}

function allFinite(x: Float64Array): boolean {
  for (let i = 0; i < x.length; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}

/**
 * R(order, factor) of Shampine & Reichelt (1997), eq. 2.4: row-major
 * (order+1) x (order+1), R[i][j] = prod_{m=1..i} (m - 1 - factor j) / m.
 */
function computeR(order: number, factor: number, out: Float64Array): void {
  const m = order + 1;
  for (let j = 0; j < m; j++) out[j] = 1;
  for (let i = 1; i < m; i++) {
    out[i * m] = 0;
    for (let j = 1; j < m; j++) out[i * m + j] = (out[(i - 1) * m + j] * (i - 1 - factor * j)) / i;
  }
}

/** Integrator state for one problem; every buffer is allocated once. */
class BdfIntegrator {
  private readonly n: number;
  private readonly problem: OdeProblem;
  private readonly rtol: number;
  private readonly atol: Float64Array;
  private readonly maxSteps: number;
  private readonly maxStep: number;
  private readonly nonNegative: boolean;
  private readonly tEnd: number;
  private readonly newtonTol: number;
  readonly stats: SolverStats;

  /** Difference array, row k (k = 0..MAX_ORDER+2) at D[k*n .. (k+1)*n). */
  readonly D: Float64Array;
  /** Row 0 of D: the solution at the last accepted step. */
  private readonly current: Float64Array;
  private readonly changeBuffer: Float64Array;
  private readonly R = new Float64Array((MAX_ORDER + 1) * (MAX_ORDER + 1));
  private readonly U = new Float64Array((MAX_ORDER + 1) * (MAX_ORDER + 1));
  private readonly RU = new Float64Array((MAX_ORDER + 1) * (MAX_ORDER + 1));
  private readonly yPredict: Float64Array;
  private readonly yNew: Float64Array;
  private readonly correction: Float64Array;
  private readonly psi: Float64Array;
  private readonly f: Float64Array;
  private readonly dy: Float64Array;
  private readonly scale: Float64Array;
  private readonly jac: Float64Array;
  private readonly matrix: NewtonMatrix;
  /** The same matrix when the problem's Jacobian has a rank-one part (OdeProblem.rankOne). */
  private readonly rankOneMatrix: RankOneNewtonMatrix | undefined;

  t = 0;
  hAbs = 0;
  order = 1;
  private nEqualSteps = 0;
  /** c = h / alpha for which the factorisation holds; NaN when none does. */
  private factoredC = Number.NaN;
  /** Accepted steps since the last factorisation. */
  private factorizationAge = 0;
  /**
   * Newton contraction rate carried from step to step (CVODE's crate): it
   * may fall by at most RATE_DECAY per iteration, and is 1 after any new
   * factorisation or rejected step, so a first iterate is accepted only
   * while the iteration has been contracting strongly on this matrix.
   */
  private newtonRate = 1;
  private jacobianAge = 0;
  private newtonIterations = 0;
  /** Whether the last right-hand side evaluated in a Newton iteration held NaN or infinity. */
  private rhsNonFinite = false;

  constructor(problem: OdeProblem, y0: Float64Array, tEnd: number, options: IntegrateOptions) {
    const n = problem.n;
    this.n = n;
    this.problem = problem;
    this.rtol = options.rtol;
    this.atol =
      typeof options.atol === 'number' ? new Float64Array(n).fill(options.atol) : Float64Array.from(options.atol);
    this.maxSteps = options.maxSteps ?? DEFAULT_MAX_STEPS;
    this.maxStep = options.maxStep ?? Number.POSITIVE_INFINITY;
    this.nonNegative = options.nonNegative ?? false;
    this.tEnd = tEnd;
    this.newtonTol = Math.max((10 * Number.EPSILON) / this.rtol, NEWTON_TOLERANCE);
    this.stats = {
      steps: 0,
      failedSteps: 0,
      rhsEvals: 0,
      jacobianEvals: 0,
      factorizations: 0,
      newtonFailures: 0,
      orderHistogram: new Array<number>(MAX_ORDER).fill(0),
    };
    this.D = new Float64Array((MAX_ORDER + 3) * n);
    this.changeBuffer = new Float64Array((MAX_ORDER + 1) * n);
    this.yPredict = new Float64Array(n);
    this.yNew = new Float64Array(n);
    this.correction = new Float64Array(n);
    this.psi = new Float64Array(n);
    this.f = new Float64Array(n);
    this.dy = new Float64Array(n);
    this.scale = new Float64Array(n);
    this.jac = new Float64Array(problem.pattern.rowPtr[n]);
    const matrix = createNewtonMatrix(n, problem.pattern);
    this.rankOneMatrix = problem.rankOne ? new RankOneNewtonMatrix(matrix, n) : undefined;
    this.matrix = this.rankOneMatrix ?? matrix;
    this.D.set(y0, 0);
    this.current = this.D.subarray(0, n);
  }

  /** Evaluates f(0, y0), picks the first step and fills D[1]; false if f is not finite. */
  start(initialStep: number | undefined): boolean {
    const { n, f, D } = this;
    const y0 = this.current;
    this.problem.rhs(0, y0, f);
    this.stats.rhsEvals++;
    if (!allFinite(f)) return false;
    let h = initialStep ?? this.selectInitialStep(y0);
    h = Math.min(h, this.maxStep, this.tEnd);
    this.hAbs = h;
    for (let i = 0; i < n; i++) D[n + i] = f[i] * h;
    return this.evaluateJacobian(0, y0);
  }

  /** Hairer, Norsett & Wanner, Solving ODEs I, sec. II.4, as in SciPy's select_initial_step (order 1). */
  private selectInitialStep(y0: Float64Array): number {
    const { n, f, scale, yNew, dy } = this;
    for (let i = 0; i < n; i++) scale[i] = this.atol[i] + Math.abs(y0[i]) * this.rtol;
    const d0 = rmsNorm(y0, scale, 0, n);
    const d1 = rmsNorm(f, scale, 0, n);
    let h0 = d0 < 1e-5 || d1 < 1e-5 ? FALLBACK_FIRST_STEP : (0.01 * d0) / d1;
    h0 = Math.min(h0, this.tEnd);
    for (let i = 0; i < n; i++) yNew[i] = y0[i] + h0 * f[i];
    this.problem.rhs(h0, yNew, dy);
    this.stats.rhsEvals++;
    for (let i = 0; i < n; i++) dy[i] -= f[i];
    const d2 = rmsNorm(dy, scale, 0, n) / h0;
    let h1: number;
    if (!Number.isFinite(d2)) h1 = h0 * 1e-3;
    else if (d1 <= 1e-15 && d2 <= 1e-15) h1 = Math.max(FALLBACK_FIRST_STEP, h0 * 1e-3);
    else h1 = Math.sqrt(0.01 / Math.max(d1, d2));
    return Math.min(100 * h0, h1);
  }

  private evaluateJacobian(t: number, y: Float64Array): boolean {
    this.problem.jacobian(t, y, this.jac);
    this.stats.jacobianEvals++;
    this.jacobianAge = 0;
    this.factoredC = Number.NaN;
    const rankOne = this.problem.rankOne;
    if (rankOne && this.rankOneMatrix) {
      this.rankOneMatrix.setRankOne(rankOne.u, rankOne.w);
      if (!allFinite(rankOne.u) || !allFinite(rankOne.w)) return false;
    }
    return allFinite(this.jac);
  }

  /** Rescales D from step h to factor * h at the given order (Shampine & Reichelt 1997, eq. 2.5). */
  private changeD(order: number, factor: number): void {
    if (factor === 1) return;
    const { n, D, R, U, RU, changeBuffer } = this;
    const m = order + 1;
    computeR(order, factor, R);
    computeR(order, 1, U);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        let s = 0;
        for (let k = 0; k < m; k++) s += R[i * m + k] * U[k * m + j];
        RU[i * m + j] = s;
      }
    }
    // New D[j] = sum_i RU[i][j] D[i].
    for (let j = 0; j < m; j++) {
      const out = j * n;
      for (let x = 0; x < n; x++) changeBuffer[out + x] = 0;
      for (let i = 0; i < m; i++) {
        const w = RU[i * m + j];
        if (w === 0) continue;
        const row = i * n;
        for (let x = 0; x < n; x++) changeBuffer[out + x] += w * D[row + x];
      }
    }
    for (let x = 0; x < m * n; x++) D[x] = changeBuffer[x];
  }

  /**
   * Modified Newton iteration for the corrector (SciPy's solve_bdf_system):
   * solves (I - c J) dy = c f(t, y) - psi - d, accumulating d = y - yPredict.
   * Returns true when the iteration converged.
   */
  private newton(tNew: number, c: number): boolean {
    const { n, f, dy, yNew, correction, psi, scale, yPredict } = this;
    yNew.set(yPredict);
    correction.fill(0);
    // A factorisation for another c' gives increments too large by about c / c' in stiff directions.
    const ratio = c / this.factoredC;
    const increment = ratio === 1 ? 1 : 2 / (1 + ratio);
    let dyNormOld = 0;
    for (let k = 0; k < NEWTON_MAXITER; k++) {
      this.newtonIterations = k + 1;
      this.problem.rhs(tNew, yNew, f);
      this.stats.rhsEvals++;
      this.rhsNonFinite = !allFinite(f);
      if (this.rhsNonFinite) return false;
      for (let i = 0; i < n; i++) dy[i] = c * f[i] - psi[i] - correction[i];
      this.matrix.solve(dy);
      if (increment !== 1) for (let i = 0; i < n; i++) dy[i] *= increment;
      const dyNorm = rmsNorm(dy, scale, 0, n);
      if (!Number.isFinite(dyNorm)) return false;
      if (k > 0) this.newtonRate = Math.max(RATE_DECAY * this.newtonRate, dyNorm / dyNormOld);
      const rate = this.newtonRate;
      // An iteration that has stopped contracting but whose increment is already
      // within the tolerance has converged, as in CVODE's test (del min(1, crate)
      // <= tol, Hindmarsh et al. 2005). Where the right-hand side has a kink
      // under the state (the surface-mantle transfer switching forms at zero net
      // growth, src/chem/mantle.ts), the iterates straddle it at a rate near 1
      // with increments that shrink with h; SciPy's rejection of any rate >= 1
      // fails such a step at every smaller h.
      const stalledWithinTolerance = k > 0 && rate >= 1 && dyNorm <= this.newtonTol;
      if (!stalledWithinTolerance && k > 0 && (rate >= 1 || (rate ** (NEWTON_MAXITER - k) / (1 - rate)) * dyNorm > this.newtonTol)) {
        this.newtonRate = 1;
        return false;
      }
      for (let i = 0; i < n; i++) {
        yNew[i] += dy[i];
        correction[i] += dy[i];
      }
      if (dyNorm === 0 || stalledWithinTolerance || (rate < 1 && (rate / (1 - rate)) * dyNorm < this.newtonTol)) return true;
      dyNormOld = dyNorm;
    }
    return false;
  }

  /** Factors I - c J unless the current factorisation is close enough (or `exact` asks for c itself). */
  private ensureFactored(c: number, exact: boolean): boolean {
    const current = this.factoredC;
    if (c === current) return true;
    if (!exact && Math.abs(c / current - 1) < LU_REUSE_RATIO && this.factorizationAge < LU_MAX_AGE) return true;
    this.stats.factorizations++;
    const ok = this.matrix.factor(this.jac, c);
    this.factoredC = ok ? c : Number.NaN;
    this.factorizationAge = 0;
    this.newtonRate = 1;
    return ok;
  }

  /** One accepted step (SciPy's BDF._step_impl), or the reason none could be taken. */
  step(): Outcome {
    const { n, D, yPredict, psi, scale, yNew, correction, stats } = this;
    if (stats.steps >= this.maxSteps) return Outcome.TooManySteps;
    const t = this.t;
    const minStep = MIN_STEP_ULPS * Math.max(Math.abs(t) * Number.EPSILON, Number.MIN_VALUE);
    let order = this.order;
    let hAbs = this.hAbs;
    if (hAbs > this.maxStep) {
      this.changeD(order, this.maxStep / hAbs);
      hAbs = this.maxStep;
      this.nEqualSteps = 0;
    } else if (hAbs < minStep) {
      this.changeD(order, minStep / hAbs);
      hAbs = minStep;
      this.nEqualSteps = 0;
    }
    if (this.jacobianAge >= JACOBIAN_MAX_AGE) {
      if (!this.evaluateJacobian(t, this.current)) return Outcome.NonFiniteJacobian;
    }
    let jacobianCurrent = this.jacobianAge === 0 && stats.steps > 0;
    /** Set after a Newton failure: the retry at the smaller step evaluates the Jacobian at its own prediction. */
    let refreshJacobian = false;
    let newtonFailures = 0;
    let errorFailures = 0;
    let tNew = t;
    let errorNorm = 0;

    for (;;) {
      if (hAbs < minStep) return Outcome.StepUnderflow;
      tNew = t + hAbs;
      if (tNew >= this.tEnd) {
        tNew = this.tEnd;
        this.changeD(order, (tNew - t) / hAbs);
        this.nEqualSteps = 0;
      }
      const h = tNew - t;
      hAbs = h;

      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let k = 0; k <= order; k++) s += D[k * n + i];
        yPredict[i] = s;
        scale[i] = this.atol[i] + this.rtol * Math.abs(s);
        let p = 0;
        for (let k = 1; k <= order; k++) p += D[k * n + i] * GAMMA[k];
        psi[i] = p / ALPHA[order];
      }

      const c = h / ALPHA[order];
      // A switched right-hand side fixes its form for this attempt at the
      // prediction; a Jacobian taken on the other form would only fail Newton.
      if (this.problem.beginStep && this.problem.beginStep(tNew, yPredict)) refreshJacobian = true;
      if (refreshJacobian) {
        if (!this.evaluateJacobian(tNew, yPredict)) return Outcome.NonFiniteJacobian;
        jacobianCurrent = true;
        refreshJacobian = false;
      }
      // Newton on the current factorisation; on failure, a fresh Jacobian and
      // a factorisation for this very c, then a smaller step.
      let converged = this.ensureFactored(c, false) && this.newton(tNew, c);
      if (!converged && !(jacobianCurrent && this.factoredC === c)) {
        stats.newtonFailures++;
        if (!jacobianCurrent) {
          if (!this.evaluateJacobian(tNew, yPredict)) return Outcome.NonFiniteJacobian;
          jacobianCurrent = true;
        }
        converged = this.ensureFactored(c, true) && this.newton(tNew, c);
      }

      if (!converged) {
        stats.newtonFailures++;
        stats.failedSteps++;
        if (++newtonFailures >= MAX_NEWTON_FAILURES_PER_STEP) return Outcome.NewtonFailure;
        hAbs *= NEWTON_FAILURE_FACTOR;
        // The Jacobian in hand was taken at the failed step's prediction; where it
        // changes fast with the state (H(s) titrated by its partners, issue 17)
        // it stays wrong by tens of per cent in directions where h |lambda| >> 1,
        // and Newton diverges at every smaller step. CVODE re-evaluates it after
        // such a failure (convfail CV_FAIL_OTHER, Hindmarsh et al. 2005).
        refreshJacobian = true;
        this.changeD(order, NEWTON_FAILURE_FACTOR);
        this.nEqualSteps = 0;
        continue;
      }

      for (let i = 0; i < n; i++) scale[i] = this.atol[i] + this.rtol * Math.abs(yNew[i]);
      errorNorm = ERROR_CONST[order] * rmsNorm(correction, scale, 0, n);
      if (errorNorm <= 1) break;

      stats.failedSteps++;
      this.newtonRate = 1;
      if (++errorFailures >= MAX_ERROR_FAILURES_PER_STEP) return Outcome.ErrorTestFailure;
      const safety = (SAFETY * (2 * NEWTON_MAXITER + 1)) / (2 * NEWTON_MAXITER + this.newtonIterations);
      let factor = Number.isFinite(errorNorm)
        ? Math.max(MIN_FACTOR, safety * errorNorm ** (-1 / (order + 1)))
        : MIN_FACTOR;
      if (errorFailures >= ERROR_FAILURES_BEFORE_ORDER_ONE && order > 1) {
        this.changeD(order, factor);
        hAbs *= factor;
        factor = 1;
        order = 1;
        this.order = 1;
      }
      hAbs *= factor;
      this.changeD(order, factor);
      this.nEqualSteps = 0;
    }

    stats.steps++;
    stats.orderHistogram[order - 1]++;
    this.nEqualSteps++;
    this.jacobianAge++;
    this.factorizationAge++;
    this.t = tNew;
    this.hAbs = hAbs;

    // D^{j+1} y_n = D^j y_n - D^j y_{n-1}; before the update D holds the
    // differences of the previous polynomial and d = D^{k+1} y_n.
    const o1 = (order + 1) * n;
    const o2 = (order + 2) * n;
    for (let i = 0; i < n; i++) {
      D[o2 + i] = correction[i] - D[o1 + i];
      D[o1 + i] = correction[i];
    }
    for (let k = order; k >= 0; k--) {
      const row = k * n;
      const next = row + n;
      for (let i = 0; i < n; i++) D[row + i] += D[next + i];
    }
    if (this.nonNegative) {
      for (let i = 0; i < n; i++) if (D[i] < 0) D[i] = 0;
    }

    if (this.nEqualSteps < order + 1) return Outcome.Accepted;

    const errorM = order > 1 ? ERROR_CONST[order - 1] * rmsNorm(D, scale, order * n, n) : Number.POSITIVE_INFINITY;
    const errorP =
      order < MAX_ORDER ? ERROR_CONST[order + 1] * rmsNorm(D, scale, (order + 2) * n, n) : Number.POSITIVE_INFINITY;
    const factorM = errorM ** (-1 / order);
    const factorSame = errorNorm ** (-1 / (order + 1));
    const factorP = errorP ** (-1 / (order + 2));
    let best = factorM;
    let delta = -1;
    if (factorSame > best) {
      best = factorSame;
      delta = 0;
    }
    if (factorP > best) {
      best = factorP;
      delta = 1;
    }
    const safety = (SAFETY * (2 * NEWTON_MAXITER + 1)) / (2 * NEWTON_MAXITER + this.newtonIterations);
    const factor = Math.min(MAX_FACTOR, safety * best);
    if (delta === 0 && factor >= 1 && factor < STEP_INCREASE_THRESHOLD) {
      this.nEqualSteps = 0;
      return Outcome.Accepted;
    }
    order += delta;
    this.order = order;
    this.hAbs *= factor;
    this.changeD(order, factor);
    this.nEqualSteps = 0;
    return Outcome.Accepted;
  }

  /** Evaluates the current interpolating polynomial at t into out (SciPy's BdfDenseOutput). */
  interpolate(tOut: number, out: Float64Array): void {
    const { n, D, order } = this;
    const h = this.hAbs;
    for (let i = 0; i < n; i++) out[i] = D[i];
    let p = 1;
    for (let j = 1; j <= order; j++) {
      // Factor (t - (t_n - (j-1) h)) / (j h) of the product formula.
      p *= (tOut - (this.t - (j - 1) * h)) / (j * h);
      const row = j * n;
      for (let i = 0; i < n; i++) out[i] += D[row + i] * p;
    }
    if (this.nonNegative) {
      for (let i = 0; i < n; i++) if (out[i] < 0) out[i] = 0;
    }
  }

  failureMessage(outcome: Outcome): string {
    const at = `t = ${this.t.toPrecision(6)}`;
    switch (outcome) {
      case Outcome.TooManySteps:
        return `too many steps: ${this.maxSteps} steps taken before reaching t = ${this.tEnd.toPrecision(6)} (stopped at ${at}); raise maxSteps or loosen the tolerances`;
      case Outcome.StepUnderflow:
        if (this.rhsNonFinite) {
          return `non-finite values in the right-hand side just after ${at}: steps shrank until the step size underflowed`;
        }
        return `step size underflow at ${at}: the step fell below ${MIN_STEP_ULPS} units in the last place of t`;
      case Outcome.NewtonFailure:
        if (this.rhsNonFinite) {
          return `non-finite values in the right-hand side after ${at}: ${MAX_NEWTON_FAILURES_PER_STEP} successive attempts with smaller steps met NaN or infinity`;
        }
        return `repeated Newton failure at ${at}: the corrector did not converge in ${MAX_NEWTON_FAILURES_PER_STEP} successive attempts (non-finite right-hand side or a poor Jacobian)`;
      case Outcome.ErrorTestFailure:
        return `repeated error test failure at ${at}: ${MAX_ERROR_FAILURES_PER_STEP} successive step attempts failed the local error test`;
      case Outcome.NonFiniteJacobian:
        return `non-finite values in the Jacobian at ${at}`;
      default:
        return 'ok';
    }
  }
}

/**
 * Integrates y' = f(t, y) from t = 0, y(0) = y0, and returns y at each
 * output time. Output times must be finite, non-negative and increasing
 * (strictly, except that any number of leading zeros is allowed); an output
 * at 0 is y0 itself.
 *
 * A solver failure never throws: the status says why and where it stopped,
 * `failureTime` is the time reached, and `y`/`t` hold only the outputs
 * reached before the failure. Malformed arguments (lengths, times, tolerances)
 * are programming errors and throw a RangeError.
 */
export function integrate(
  problem: OdeProblem,
  y0: Float64Array,
  outputTimes: ArrayLike<number>,
  options: IntegrateOptions,
): IntegrateResult {
  validateArguments(problem, y0, outputTimes, options);
  const n = problem.n;
  const nOut = outputTimes.length;
  const outY: Float64Array[] = [];
  let reached = 0;
  while (reached < nOut && outputTimes[reached] === 0) {
    const copy = Float64Array.from(y0);
    if (options.nonNegative) for (let i = 0; i < n; i++) if (copy[i] < 0) copy[i] = 0;
    outY.push(copy);
    reached++;
  }
  const emptyStats: SolverStats = {
    steps: 0,
    failedSteps: 0,
    rhsEvals: 0,
    jacobianEvals: 0,
    factorizations: 0,
    newtonFailures: 0,
    orderHistogram: new Array<number>(MAX_ORDER).fill(0),
  };
  const times = Float64Array.from(outputTimes);
  const finish = (status: string, stats: SolverStats, failureTime?: number): IntegrateResult => {
    const result: IntegrateResult = { y: outY, t: times.slice(0, outY.length), stats, status };
    if (failureTime !== undefined) result.failureTime = failureTime;
    return result;
  };
  if (reached === nOut) return finish('ok', emptyStats);
  if (!allFinite(y0)) return finish('non-finite values in the initial state y0', emptyStats, 0);

  const solver = new BdfIntegrator(problem, y0, times[nOut - 1], options);
  if (!solver.start(options.initialStep)) {
    return finish('non-finite values in the right-hand side or the Jacobian at t = 0', solver.stats, 0);
  }
  while (reached < nOut) {
    const outcome = solver.step();
    if (outcome !== Outcome.Accepted) return finish(solver.failureMessage(outcome), solver.stats, solver.t);
    while (reached < nOut && times[reached] <= solver.t) {
      const out = new Float64Array(n);
      solver.interpolate(times[reached], out);
      outY.push(out);
      reached++;
    }
  }
  return finish('ok', solver.stats);
}

function validateArguments(
  problem: OdeProblem,
  y0: Float64Array,
  outputTimes: ArrayLike<number>,
  options: IntegrateOptions,
): void {
  const n = problem.n;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`problem.n must be a positive integer, got ${n}`);
  if (y0.length !== n) throw new RangeError(`y0 has length ${y0.length}, expected problem.n = ${n}`);
  const { rowPtr, colIdx } = problem.pattern;
  if (rowPtr.length !== n + 1 || rowPtr[0] !== 0 || colIdx.length < rowPtr[n]) {
    throw new RangeError(`pattern.rowPtr must have n + 1 = ${n + 1} entries from 0 to colIdx.length`);
  }
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const j = colIdx[p];
      if (j < 0 || j >= n || (p > rowPtr[i] && j <= colIdx[p - 1])) {
        throw new RangeError(`pattern row ${i}: columns must be in 0..${n - 1}, sorted and without repeats`);
      }
    }
  }
  let previous = 0;
  for (let k = 0; k < outputTimes.length; k++) {
    const tk = outputTimes[k];
    if (!Number.isFinite(tk) || tk < 0 || (tk <= previous && !(tk === 0 && previous === 0))) {
      throw new RangeError(`outputTimes must be finite, non-negative and increasing; entry ${k} is ${tk}`);
    }
    previous = tk;
  }
  if (!(options.rtol > 0)) throw new RangeError(`rtol must be positive, got ${options.rtol}`);
  const atol = options.atol;
  if (typeof atol === 'number') {
    if (!(atol > 0)) throw new RangeError(`atol must be positive, got ${atol}`);
  } else {
    if (atol.length !== n) throw new RangeError(`atol has length ${atol.length}, expected ${n}`);
    for (let i = 0; i < n; i++) if (!(atol[i] > 0)) throw new RangeError(`atol[${i}] must be positive`);
  }
  if (options.maxSteps !== undefined && !(options.maxSteps >= 1)) throw new RangeError('maxSteps must be at least 1');
  if (options.maxStep !== undefined && !(options.maxStep > 0)) throw new RangeError('maxStep must be positive');
  if (options.initialStep !== undefined && !(options.initialStep > 0)) {
    throw new RangeError('initialStep must be positive');
  }
}
