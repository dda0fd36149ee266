/**
 * The Newton matrix M = I - c J of a BDF step, formed from the Jacobian values
 * (in the problem's sparsity order), factored, and solved against. A dense
 * path serves small systems; larger ones use the sparse LU, whose symbolic
 * analysis is done once per integration, when the matrix is made (0.5 ms for
 * the default network, 1.6 ms for 300 species: under 1% of a run), and
 * reused by every factorisation.
 */
import { DenseLU } from './dense-lu.ts';
import type { OrderingName } from './ordering.ts';
import { SparseLU } from './sparse-lu.ts';
import type { SparsityPattern } from './types.ts';

/**
 * Systems up to this size use the dense LU. Measured (factorisation plus ten
 * solves): on the fairly full patterns of small random mass-action networks
 * dense is 1.6 times faster at n = 8, 1.25 at 24 and even at 64, while on
 * sparse patterns the sparse LU wins by far at such sizes; above this size
 * the sparse LU's dense tail keeps it close to dense even for full patterns.
 */
export const DENSE_MAX_N = 24;

export interface NewtonMatrix {
  /** Forms I - c J from `jacobianValues` and factors it; false if it is singular. */
  factor(jacobianValues: Float64Array, c: number): boolean;
  /** Solves (I - c J) x = b in place, with the last factorisation. */
  solve(b: Float64Array): void;
}

/** I - c J stored and factored densely. */
export class DenseNewtonMatrix implements NewtonMatrix {
  private readonly n: number;
  private readonly lu: DenseLU;
  /** Position in the row-major matrix of each pattern entry. */
  private readonly denseIndex: Int32Array;

  constructor(n: number, pattern: SparsityPattern) {
    this.n = n;
    this.lu = new DenseLU(n);
    const nnz = pattern.rowPtr[n];
    this.denseIndex = new Int32Array(nnz);
    for (let i = 0; i < n; i++) {
      for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) {
        this.denseIndex[p] = i * n + pattern.colIdx[p];
      }
    }
  }

  factor(jacobianValues: Float64Array, c: number): boolean {
    const { n, denseIndex } = this;
    const a = this.lu.lu;
    a.fill(0);
    for (let i = 0; i < n; i++) a[i * n + i] = 1;
    for (let p = 0; p < denseIndex.length; p++) a[denseIndex[p]] -= c * jacobianValues[p];
    return this.lu.factor();
  }

  solve(b: Float64Array): void {
    this.lu.solve(b);
  }
}

/** I - c J on the pattern of J plus its diagonal, factored by the sparse LU. */
export class SparseNewtonMatrix implements NewtonMatrix {
  readonly lu: SparseLU;
  private readonly values: Float64Array;
  /** Position in `values` of each entry of J, and of each diagonal entry. */
  private readonly jacobianIndex: Int32Array;
  private readonly diagonalIndex: Int32Array;

  constructor(n: number, pattern: SparsityPattern, ordering: OrderingName = 'minimum-degree') {
    const { rowPtr, colIdx } = pattern;
    const withDiagonal = new Int32Array(n + 1);
    for (let i = 0; i < n; i++) {
      let hasDiagonal = false;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) if (colIdx[p] === i) hasDiagonal = true;
      withDiagonal[i + 1] = withDiagonal[i] + (rowPtr[i + 1] - rowPtr[i]) + (hasDiagonal ? 0 : 1);
    }
    const columns = new Int32Array(withDiagonal[n]);
    this.jacobianIndex = new Int32Array(rowPtr[n]);
    this.diagonalIndex = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      let dest = withDiagonal[i];
      let diagonalPlaced = false;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
        const j = colIdx[p];
        if (!diagonalPlaced && j >= i) {
          if (j > i) columns[dest++] = i;
          this.diagonalIndex[i] = dest - (j > i ? 1 : 0);
          diagonalPlaced = true;
        }
        this.jacobianIndex[p] = dest;
        columns[dest++] = j;
      }
      if (!diagonalPlaced) {
        this.diagonalIndex[i] = dest;
        columns[dest++] = i;
      }
    }
    this.values = new Float64Array(columns.length);
    this.lu = new SparseLU(n, { rowPtr: withDiagonal, colIdx: columns }, { ordering });
  }

  factor(jacobianValues: Float64Array, c: number): boolean {
    const { values, jacobianIndex, diagonalIndex } = this;
    values.fill(0);
    for (let i = 0; i < diagonalIndex.length; i++) values[diagonalIndex[i]] = 1;
    for (let p = 0; p < jacobianIndex.length; p++) values[jacobianIndex[p]] -= c * jacobianValues[p];
    return this.lu.factor(values);
  }

  solve(b: Float64Array): void {
    this.lu.solve(b);
  }
}

/** Below this |1 - c w^T A^-1 u| the rank-one update leaves the Newton matrix singular. */
const RANK_ONE_SINGULAR = 1e-12;

/**
 * I - c (J + u w^T), with J on its pattern, by the Sherman-Morrison formula
 * (Golub & Van Loan, Matrix Computations, 4th ed., sec. 2.1.4): with
 * A = I - c J factored, z = A^-1 u and s = 1 - c w^T z,
 * (A - c u w^T)^-1 b = A^-1 b + (c / s) z (w^T A^-1 b).
 * One extra solve per factorisation and two n-vector products per solve, in
 * place of the fill that a dense rank-one block brings to the LU.
 */
export class RankOneNewtonMatrix implements NewtonMatrix {
  private readonly u: Float64Array;
  private readonly w: Float64Array;
  private readonly z: Float64Array;
  private scale = 0;

  constructor(private readonly inner: NewtonMatrix, n: number) {
    this.u = new Float64Array(n);
    this.w = new Float64Array(n);
    this.z = new Float64Array(n);
  }

  /** Takes the rank-one part that goes with the Jacobian values of the next factorisations. */
  setRankOne(u: Float64Array, w: Float64Array): void {
    this.u.set(u);
    this.w.set(w);
  }

  factor(jacobianValues: Float64Array, c: number): boolean {
    if (!this.inner.factor(jacobianValues, c)) return false;
    const { z, w } = this;
    z.set(this.u);
    this.inner.solve(z);
    let wz = 0;
    for (let i = 0; i < z.length; i++) wz += w[i] * z[i];
    const s = 1 - c * wz;
    if (!(Math.abs(s) > RANK_ONE_SINGULAR)) return false;
    this.scale = c / s;
    return true;
  }

  solve(b: Float64Array): void {
    this.inner.solve(b);
    const { z, w } = this;
    let wb = 0;
    for (let i = 0; i < b.length; i++) wb += w[i] * b[i];
    const k = this.scale * wb;
    for (let i = 0; i < b.length; i++) b[i] += k * z[i];
  }
}

/** Picks the dense or the sparse Newton matrix for a pattern. */
export function createNewtonMatrix(n: number, pattern: SparsityPattern): NewtonMatrix {
  return n <= DENSE_MAX_N ? new DenseNewtonMatrix(n, pattern) : new SparseNewtonMatrix(n, pattern);
}
