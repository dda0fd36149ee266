/**
 * Dense LU factorisation with partial (row) pivoting, PA = LU, in place on a
 * row-major Float64Array (Golub & Van Loan, Matrix Computations, alg. 3.4.1).
 * Used for small systems, where the bookkeeping of a sparse factorisation
 * costs more than the arithmetic it saves.
 */
export class DenseLU {
  readonly n: number;
  /** Row-major n x n matrix; the caller fills it, factor() overwrites it with L and U. */
  readonly lu: Float64Array;
  /** pivotRow[k] = row swapped with row k at elimination step k. */
  private readonly pivotRow: Int32Array;

  constructor(n: number) {
    this.n = n;
    this.lu = new Float64Array(n * n);
    this.pivotRow = new Int32Array(n);
  }

  /** Factors `lu` in place; returns false if a pivot is zero or not finite. */
  factor(): boolean {
    const { n, lu, pivotRow } = this;
    for (let k = 0; k < n; k++) {
      let p = k;
      let best = Math.abs(lu[k * n + k]);
      for (let i = k + 1; i < n; i++) {
        const a = Math.abs(lu[i * n + k]);
        if (a > best) {
          best = a;
          p = i;
        }
      }
      pivotRow[k] = p;
      if (!(best > 0) || !Number.isFinite(best)) return false;
      if (p !== k) {
        const rk = k * n;
        const rp = p * n;
        for (let j = 0; j < n; j++) {
          const tmp = lu[rk + j];
          lu[rk + j] = lu[rp + j];
          lu[rp + j] = tmp;
        }
      }
      const rk = k * n;
      const inv = 1 / lu[rk + k];
      for (let i = k + 1; i < n; i++) {
        const ri = i * n;
        const lik = lu[ri + k] * inv;
        lu[ri + k] = lik;
        if (lik !== 0) {
          for (let j = k + 1; j < n; j++) lu[ri + j] -= lik * lu[rk + j];
        }
      }
    }
    return true;
  }

  /** Solves A x = b in place (b becomes x), using the last factorisation; x occupies b[offset .. offset + n). */
  solve(b: Float64Array, offset = 0): void {
    const { n, lu, pivotRow } = this;
    for (let k = 0; k < n; k++) {
      const p = pivotRow[k];
      if (p !== k) {
        const tmp = b[offset + k];
        b[offset + k] = b[offset + p];
        b[offset + p] = tmp;
      }
    }
    for (let i = 1; i < n; i++) {
      const ri = i * n;
      let s = b[offset + i];
      for (let j = 0; j < i; j++) s -= lu[ri + j] * b[offset + j];
      b[offset + i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      const ri = i * n;
      let s = b[offset + i];
      for (let j = i + 1; j < n; j++) s -= lu[ri + j] * b[offset + j];
      b[offset + i] = s / lu[ri + i];
    }
  }
}
