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
 * - Dense tail: a fill-reducing order leaves the last elimination steps
 *   (the species that react with everything) nearly full. Refactorisation
 *   can form the Schur complement of a trailing block and factor it with the
 *   dense LU (partial pivoting inside the block), as multifrontal and
 *   supernodal codes hand their dense fronts to dense kernels (Davis,
 *   Rajamanickam & Sid-Lakhdar, Acta Numerica 25, 2016, sec. 9-10). The
 *   block is the one that minimises a cost model counted from the structure:
 *   sparse multiply-adds of the factorisation and of SOLVES_PER_FACTORIZATION
 *   solves, against the dense ones weighted by their measured speed-up.
 *
 * Storage of L and U is allocated once and grows only when a pivoting
 * factorisation produces more fill than any before it.
 */
import { DenseLU } from './dense-lu.ts';
import { computeOrdering, type OrderingName } from './ordering.ts';
import type { SparsityPattern } from './types.ts';

/** A pivot is acceptable when |pivot| >= PIVOT_THRESHOLD * (largest |candidate| in its column) (UMFPACK's default 0.1). */
export const PIVOT_THRESHOLD = 0.1;
/** First guess of the room for L and U, in multiples of nnz(A). */
const INITIAL_FILL_FACTOR = 4;
/** A dense multiply-add in the factorisation costs about 1/DENSE_FACTOR_SPEEDUP of a sparse one (measured on Node 20). */
const DENSE_FACTOR_SPEEDUP = 4;
/** In triangular solves a dense entry costs about 1/DENSE_SOLVE_SPEEDUP of a sparse one (measured). */
const DENSE_SOLVE_SPEEDUP = 1.5;
/** Newton solves per factorisation in a BDF run, to weigh solve cost against factorisation cost (measured: 10 to 20). */
const SOLVES_PER_FACTORIZATION = 10;

export interface SparseLUStats {
  /** Factorisations that chose pivots (the first, and any after a failed pivot check). */
  pivotingFactorizations: number;
  /** Numeric refactorisations that reused the pivot sequence. */
  refactorizations: number;
  /** Entries of L (including its unit diagonal) and of U, after the last pivoting factorisation. */
  nnzL: number;
  nnzU: number;
  /** Order of the trailing block factored densely (0 when there is none). */
  denseTail: number;
}

export class SparseLU {
  readonly n: number;
  readonly stats: SparseLUStats = { pivotingFactorizations: 0, refactorizations: 0, nnzL: 0, nnzU: 0, denseTail: 0 };
  /** Column order: column q[k] of A is eliminated at step k. */
  readonly q: Int32Array;
  private readonly pivotThreshold: number;
  private readonly allowDenseTail: boolean;

  // A in compressed columns; cscOfCsr[p] = position in Ax of the p-th pattern entry.
  private readonly Ap: Int32Array;
  private readonly Ai: Int32Array;
  private readonly Ax: Float64Array;
  private readonly cscOfCsr: Int32Array;

  // L (unit diagonal stored first in each column) and U (diagonal stored last), by columns.
  private readonly Lp: Int32Array;
  private Li: Int32Array;
  private Lx: Float64Array;
  private readonly Up: Int32Array;
  private Ui: Int32Array;
  private Ux: Float64Array;
  /** pinv[row] = elimination step of that row. */
  private readonly pinv: Int32Array;
  private hasPivots = false;
  private valid = false;
  /** Steps tailStart..n-1 form the dense tail; L and U hold only their coupling to earlier steps. */
  private tailStart: number;
  private tail: DenseLU | null = null;

  // Workspace.
  private readonly x: Float64Array;
  private readonly xi: Int32Array;
  private readonly pstack: Int32Array;
  private readonly mark: Int32Array;
  private stamp = 0;

  constructor(
    n: number,
    pattern: SparsityPattern,
    options: { ordering?: OrderingName; pivotThreshold?: number; denseTail?: boolean } = {},
  ) {
    this.n = n;
    this.tailStart = n;
    this.pivotThreshold = options.pivotThreshold ?? PIVOT_THRESHOLD;
    this.allowDenseTail = options.denseTail ?? true;
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
    this.hasPivots = this.factorWithPivoting();
    if (this.hasPivots && this.planDenseTail()) {
      // The tail's values are formed by the refactorisation on the new layout.
      this.hasPivots = this.refactor();
    }
    this.valid = this.hasPivots;
    return this.valid;
  }

  /** Solves A x = b in place (b becomes x). */
  solve(b: Float64Array): void {
    if (!this.valid) throw new Error('SparseLU.solve called without a successful factorisation');
    const { n, x, pinv, Lp, Li, Lx, Up, Ui, Ux, q, tailStart, tail } = this;
    for (let i = 0; i < n; i++) x[pinv[i]] = b[i];
    for (let k = 0; k < tailStart; k++) {
      const xk = x[k];
      if (xk === 0) continue;
      for (let p = Lp[k] + 1; p < Lp[k + 1]; p++) x[Li[p]] -= Lx[p] * xk;
    }
    if (tail) {
      tail.solve(x, tailStart);
      for (let k = n - 1; k >= tailStart; k--) {
        const xk = x[k];
        if (xk === 0) continue;
        for (let p = Up[k]; p < Up[k + 1]; p++) x[Ui[p]] -= Ux[p] * xk;
      }
    }
    for (let k = tailStart - 1; k >= 0; k--) {
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
    const { n, Ap, Ai, Ax, pinv, Lp, Li, Lx, Up, Ui, Ux, x, q, tailStart } = this;
    const tol = this.pivotThreshold;
    for (let k = 0; k < tailStart; k++) {
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
    if (!this.tail) return true;
    // Schur complement of the tail, column by column, into the dense block.
    const m = n - tailStart;
    const S = this.tail.lu;
    for (let k = tailStart; k < n; k++) {
      const col = q[k];
      for (let p = Ap[col]; p < Ap[col + 1]; p++) x[pinv[Ai[p]]] = Ax[p];
      for (let p = Up[k]; p < Up[k + 1]; p++) {
        const j = Ui[p];
        const ujk = x[j];
        Ux[p] = ujk;
        x[j] = 0;
        if (ujk === 0) continue;
        for (let r = Lp[j] + 1; r < Lp[j + 1]; r++) x[Li[r]] -= Lx[r] * ujk;
      }
      const c = k - tailStart;
      for (let i = 0; i < m; i++) {
        S[i * m + c] = x[tailStart + i];
        x[tailStart + i] = 0;
      }
    }
    return this.tail.factor();
  }

  /**
   * Picks the dense tail from the structure of the last pivoting
   * factorisation and compacts L and U to their sparse part; false when
   * there is no tail worth having.
   */
  private planDenseTail(): boolean {
    const { n, Lp, Up, Ui } = this;
    if (!this.allowDenseTail) return false;
    // uInRow[j] = entries of U in row j (diagonal included).
    const uInRow = this.xi;
    uInRow.fill(0, 0, n);
    for (let p = 0; p < Up[n]; p++) uInRow[Ui[p]]++;
    // With the tail from step s: every U entry (j, k) with j < s costs |L(:, j)| - 1
    // multiply-adds, each pivot |L(:, j)| - 1 divisions; the solves touch L(:, j) and
    // U's row j for j < s. Prefix sums over j give the sparse costs for every s.
    let bestStart = n;
    let bestCost = Number.POSITIVE_INFINITY;
    let sparseFactor = 0;
    let sparseSolve = 0;
    for (let start = 0; start <= n; start++) {
      const m = n - start;
      const dense = (m * m * m) / 3 / DENSE_FACTOR_SPEEDUP + (SOLVES_PER_FACTORIZATION * m * m) / DENSE_SOLVE_SPEEDUP;
      const cost = sparseFactor + SOLVES_PER_FACTORIZATION * sparseSolve + dense;
      if (cost < bestCost) {
        bestCost = cost;
        bestStart = start;
      }
      if (start < n) {
        const below = Lp[start + 1] - Lp[start] - 1;
        sparseFactor += (uInRow[start] - 1) * below + below;
        sparseSolve += below + uInRow[start];
      }
    }
    uInRow.fill(0, 0, n);
    const tailStart = bestStart;
    this.tailStart = tailStart;
    this.stats.denseTail = n - tailStart;
    if (tailStart === n) {
      this.tail = null;
      return false;
    }
    if (!this.tail || this.tail.n !== n - tailStart) this.tail = new DenseLU(n - tailStart);
    // L keeps columns before the tail; U keeps, in the tail columns, only rows before it (order kept: it is topological).
    for (let k = tailStart + 1; k <= n; k++) Lp[k] = Lp[tailStart];
    let write = Up[tailStart];
    for (let k = tailStart; k < n; k++) {
      const start = Up[k];
      const end = Up[k + 1];
      Up[k] = write;
      for (let p = start; p < end; p++) {
        if (Ui[p] < tailStart) {
          Ui[write] = Ui[p];
          write++;
        }
      }
    }
    Up[n] = write;
    return true;
  }

  /** Left-looking LU with threshold partial pivoting (CSparse's cs_lu). */
  private factorWithPivoting(): boolean {
    const { n, Ap, Ai, Ax, pinv, x, xi, q } = this;
    const tol = this.pivotThreshold;
    this.tailStart = n;
    this.stats.denseTail = 0;
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
    this.Li = grown(this.Li, new Int32Array(capacity));
    this.Lx = grown(this.Lx, new Float64Array(capacity));
  }

  private growU(capacity: number): void {
    this.Ui = grown(this.Ui, new Int32Array(capacity));
    this.Ux = grown(this.Ux, new Float64Array(capacity));
  }
}

/** A larger array holding the old one's entries first (factor storage grows only during the first, pivoting factorisation). */
function grown<T extends Int32Array | Float64Array>(old: T, larger: T): T {
  larger.set(old);
  return larger;
}
