/**
 * Sparse LU factorisation P A Q = L U of a square matrix with a fixed pattern.
 *
 * - Symbolic analysis once per pattern (constructor): a fill-reducing column
 *   order Q from the minimum-degree heuristic on A + A^T (ordering.ts), and
 *   the map from the caller's compressed rows to compressed columns.
 * - Pivoting factorisation: the left-looking algorithm of Gilbert & Peierls
 *   (SIAM J. Sci. Stat. Comput. 9, 1988), column by column, with a sparse
 *   triangular solve whose pattern comes from a depth-first search, written
 *   after CSparse's cs_lu (T. A. Davis, Direct Methods for Sparse Linear
 *   Systems, SIAM 2006, ch. 6). Threshold partial pivoting prefers the
 *   diagonal: the diagonal entry is kept when it is at least PIVOT_THRESHOLD
 *   times the largest candidate in its column, so the fill-reducing order
 *   survives for the near-diagonally-dominant Newton matrices of a BDF step.
 * - Refactorisation: later matrices with the same pattern reuse the pivot
 *   sequence and the patterns of L and U (as KLU's refactor does, Davis &
 *   Palamadai Natarajan, ACM TOMS 37, 2010), doing numeric work only. Each
 *   pivot is checked against the same threshold; if one fails, the matrix is
 *   factored again with pivoting, and that new sequence is reused from then on.
 *
 * Storage of L and U is allocated once and grows only when a pivoting
 * factorisation produces more fill than any before it.
 */
import { computeOrdering, type OrderingName } from './ordering.ts';
import type { SparsityPattern } from './types.ts';

/** A pivot is acceptable when |pivot| >= PIVOT_THRESHOLD * (largest |candidate| in its column) (UMFPACK's default 0.1). */
export const PIVOT_THRESHOLD = 0.1;
/** First guess of the room for L and U, in multiples of nnz(A). */
const INITIAL_FILL_FACTOR = 4;

export interface SparseLUStats {
  /** Factorisations that chose pivots (the first, and any after a failed pivot check). */
  pivotingFactorizations: number;
  /** Numeric refactorisations that reused the pivot sequence. */
  refactorizations: number;
  /** Entries of L (including its unit diagonal) and of U, after the last factorisation. */
  nnzL: number;
  nnzU: number;
}

export class SparseLU {
  readonly n: number;
  readonly stats: SparseLUStats = { pivotingFactorizations: 0, refactorizations: 0, nnzL: 0, nnzU: 0 };
  /** Column order: column q[k] of A is eliminated at step k. */
  readonly q: Int32Array;
  private readonly pivotThreshold: number;

  // A in compressed columns; cscOfCsr[p] = position in Ax of the p-th pattern entry.
  private readonly Ap: Int32Array;
  private readonly Ai: Int32Array;
  private readonly Ax: Float64Array;
  private readonly cscOfCsr: Int32Array;

  // L (unit diagonal stored first in each column) and U (diagonal stored last), by columns.
  private Lp: Int32Array;
  private Li: Int32Array;
  private Lx: Float64Array;
  private Up: Int32Array;
  private Ui: Int32Array;
  private Ux: Float64Array;
  /** pinv[row] = elimination step of that row. */
  private readonly pinv: Int32Array;
  private hasPivots = false;
  private valid = false;

  // Workspace.
  private readonly x: Float64Array;
  private readonly xi: Int32Array;
  private readonly pstack: Int32Array;
  private readonly mark: Int32Array;
  private stamp = 0;

  constructor(
    n: number,
    pattern: SparsityPattern,
    options: { ordering?: OrderingName; pivotThreshold?: number } = {},
  ) {
    this.n = n;
    this.pivotThreshold = options.pivotThreshold ?? PIVOT_THRESHOLD;
    this.q = computeOrdering(n, pattern, options.ordering ?? 'minimum-degree');
    const { rowPtr, colIdx } = pattern;
    const nnz = rowPtr[n];
    this.Ap = new Int32Array(n + 1);
    for (let p = 0; p < nnz; p++) this.Ap[colIdx[p] + 1]++;
    for (let j = 0; j < n; j++) this.Ap[j + 1] += this.Ap[j];
    this.Ai = new Int32Array(nnz);
    this.Ax = new Float64Array(nnz);
    this.cscOfCsr = new Int32Array(nnz);
    const next = this.Ap.slice(0, n);
    for (let i = 0; i < n; i++) {
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
        const dest = next[colIdx[p]]++;
        this.Ai[dest] = i;
        this.cscOfCsr[p] = dest;
      }
    }
    const capacity = INITIAL_FILL_FACTOR * nnz + n;
    this.Lp = new Int32Array(n + 1);
    this.Li = new Int32Array(capacity);
    this.Lx = new Float64Array(capacity);
    this.Up = new Int32Array(n + 1);
    this.Ui = new Int32Array(capacity);
    this.Ux = new Float64Array(capacity);
    this.pinv = new Int32Array(n);
    this.x = new Float64Array(n);
    this.xi = new Int32Array(2 * n);
    this.pstack = new Int32Array(n);
    this.mark = new Int32Array(n);
  }

  /**
   * Factors the matrix whose entries are `values`, in the order of the
   * pattern given to the constructor. Returns false if it is singular (or
   * has non-finite entries); solve() must not be called then.
   */
  factor(values: Float64Array): boolean {
    const { Ax, cscOfCsr } = this;
    for (let p = 0; p < cscOfCsr.length; p++) Ax[cscOfCsr[p]] = values[p];
    if (this.hasPivots && this.refactor()) {
      this.stats.refactorizations++;
      this.valid = true;
      return true;
    }
    this.stats.pivotingFactorizations++;
    this.valid = this.factorWithPivoting();
    this.hasPivots = this.valid;
    return this.valid;
  }

  /** Solves A x = b in place (b becomes x). */
  solve(b: Float64Array): void {
    if (!this.valid) throw new Error('SparseLU.solve called without a successful factorisation');
    const { n, x, pinv, Lp, Li, Lx, Up, Ui, Ux, q } = this;
    for (let i = 0; i < n; i++) x[pinv[i]] = b[i];
    for (let k = 0; k < n; k++) {
      const xk = x[k];
      if (xk === 0) continue;
      for (let p = Lp[k] + 1; p < Lp[k + 1]; p++) x[Li[p]] -= Lx[p] * xk;
    }
    for (let k = n - 1; k >= 0; k--) {
      const last = Up[k + 1] - 1;
      const xk = x[k] / Ux[last];
      x[k] = xk;
      if (xk === 0) continue;
      for (let p = Up[k]; p < last; p++) x[Ui[p]] -= Ux[p] * xk;
    }
    for (let k = 0; k < n; k++) {
      b[q[k]] = x[k];
      x[k] = 0;
    }
  }

  /** Numeric factorisation on the stored pivot sequence and patterns; false if a pivot fails the threshold. */
  private refactor(): boolean {
    const { n, Ap, Ai, Ax, pinv, Lp, Li, Lx, Up, Ui, Ux, x, q } = this;
    const tol = this.pivotThreshold;
    for (let k = 0; k < n; k++) {
      const col = q[k];
      for (let p = Ap[col]; p < Ap[col + 1]; p++) x[pinv[Ai[p]]] = Ax[p];
      const uEnd = Up[k + 1] - 1;
      // U's rows are stored in the topological order of the original sparse solve.
      for (let p = Up[k]; p < uEnd; p++) {
        const j = Ui[p];
        const ujk = x[j];
        Ux[p] = ujk;
        x[j] = 0;
        if (ujk === 0) continue;
        for (let r = Lp[j] + 1; r < Lp[j + 1]; r++) x[Li[r]] -= Lx[r] * ujk;
      }
      const pivot = x[k];
      x[k] = 0;
      let largest = 0;
      for (let r = Lp[k] + 1; r < Lp[k + 1]; r++) {
        const a = Math.abs(x[Li[r]]);
        if (a > largest) largest = a;
      }
      const size = Math.abs(pivot);
      if (!(size > 0) || !(size >= tol * largest) || !Number.isFinite(size)) {
        for (let r = Lp[k] + 1; r < Lp[k + 1]; r++) x[Li[r]] = 0;
        return false;
      }
      Ux[uEnd] = pivot;
      const inv = 1 / pivot;
      for (let r = Lp[k] + 1; r < Lp[k + 1]; r++) {
        const i = Li[r];
        Lx[r] = x[i] * inv;
        x[i] = 0;
      }
    }
    return true;
  }

  /** Left-looking LU with threshold partial pivoting (CSparse's cs_lu). */
  private factorWithPivoting(): boolean {
    const { n, Ap, Ai, Ax, pinv, x, xi, q } = this;
    const tol = this.pivotThreshold;
    pinv.fill(-1);
    x.fill(0);
    let lnz = 0;
    let unz = 0;
    for (let k = 0; k < n; k++) {
      this.Lp[k] = lnz;
      this.Up[k] = unz;
      if (lnz + n > this.Li.length) this.growL(2 * this.Li.length + n);
      if (unz + n > this.Ui.length) this.growU(2 * this.Ui.length + n);
      const { Lp, Li, Lx, Ui, Ux } = this;
      const col = q[k];
      const top = this.reach(col);
      for (let p = top; p < n; p++) x[xi[p]] = 0;
      for (let p = Ap[col]; p < Ap[col + 1]; p++) x[Ai[p]] = Ax[p];
      // x = L \ A(:, col), over the reach in topological order.
      for (let px = top; px < n; px++) {
        const j = xi[px];
        const J = pinv[j];
        if (J < 0) continue;
        const xj = x[j];
        if (xj === 0) continue;
        for (let p = Lp[J] + 1; p < Lp[J + 1]; p++) x[Li[p]] -= Lx[p] * xj;
      }
      let ipiv = -1;
      let largest = -1;
      for (let px = top; px < n; px++) {
        const i = xi[px];
        if (pinv[i] < 0) {
          const a = Math.abs(x[i]);
          if (a > largest) {
            largest = a;
            ipiv = i;
          }
        } else {
          Ui[unz] = pinv[i];
          Ux[unz++] = x[i];
        }
      }
      if (ipiv < 0 || !(largest > 0) || !Number.isFinite(largest)) {
        x.fill(0);
        return false;
      }
      if (pinv[col] < 0 && Math.abs(x[col]) >= tol * largest) ipiv = col;
      const pivot = x[ipiv];
      Ui[unz] = k;
      Ux[unz++] = pivot;
      pinv[ipiv] = k;
      Li[lnz] = ipiv;
      Lx[lnz++] = 1;
      for (let px = top; px < n; px++) {
        const i = xi[px];
        if (pinv[i] < 0) {
          Li[lnz] = i;
          Lx[lnz++] = x[i] / pivot;
        }
        x[i] = 0;
      }
    }
    this.Lp[n] = lnz;
    this.Up[n] = unz;
    for (let p = 0; p < lnz; p++) this.Li[p] = pinv[this.Li[p]];
    this.stats.nnzL = lnz;
    this.stats.nnzU = unz;
    return true;
  }

  /**
   * Nonzero pattern of L \ A(:, col): rows reachable in the graph of L from
   * the rows of A(:, col), left in xi[top..n) in topological order (cs_reach).
   */
  private reach(col: number): number {
    const { n, Ap, Ai, xi, pstack, mark, pinv, Lp, Li } = this;
    const stamp = ++this.stamp;
    let top = n;
    for (let p = Ap[col]; p < Ap[col + 1]; p++) {
      const start = Ai[p];
      if (mark[start] === stamp) continue;
      // Iterative depth-first search from start (cs_dfs); the stack lives in xi[0..head].
      let head = 0;
      xi[0] = start;
      while (head >= 0) {
        const j = xi[head];
        const J = pinv[j];
        if (mark[j] !== stamp) {
          mark[j] = stamp;
          pstack[head] = J < 0 ? 0 : Lp[J];
        }
        let done = true;
        const end = J < 0 ? 0 : Lp[J + 1];
        for (let r = pstack[head]; r < end; r++) {
          const i = Li[r];
          if (mark[i] === stamp) continue;
          pstack[head] = r;
          xi[++head] = i;
          done = false;
          break;
        }
        if (done) {
          head--;
          xi[--top] = j;
        }
      }
    }
    return top;
  }

  private growL(capacity: number): void {
    const Li = new Int32Array(capacity);
    const Lx = new Float64Array(capacity);
    Li.set(this.Li);
    Lx.set(this.Lx);
    this.Li = Li;
    this.Lx = Lx;
  }

  private growU(capacity: number): void {
    const Ui = new Int32Array(capacity);
    const Ux = new Float64Array(capacity);
    Ui.set(this.Ui);
    Ux.set(this.Ux);
    this.Ui = Ui;
    this.Ux = Ux;
  }
}
