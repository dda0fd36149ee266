/**
 * The sparse LU against the dense LU with partial pivoting, and both against
 * the definition: the residual of a solve, |A x - b|, relative to |A| |x|
 * (the backward error of Rigal & Gaches 1967, Higham, Accuracy and Stability
 * of Numerical Algorithms, thm 7.3).
 */
import { describe, expect, it } from 'vitest';
import { DenseLU } from '../../src/solve/dense-lu.ts';
import { minimumDegreeOrdering } from '../../src/solve/ordering.ts';
import { SparseLU } from '../../src/solve/sparse-lu.ts';
import type { SparsityPattern } from '../../src/solve/index.ts';
import { patternFromRows, seededRandom } from './problems.ts';

interface RandomMatrix {
  n: number;
  pattern: SparsityPattern;
  values: Float64Array;
}

/** Random sparse matrix with about `perRow` off-diagonal entries per row; diagonal optional. */
function randomSparse(n: number, perRow: number, seed: number, diagonal: 'strong' | 'weak' | 'none'): RandomMatrix {
  const random = seededRandom(seed);
  const rows: Set<number>[] = [];
  for (let i = 0; i < n; i++) {
    const row = new Set<number>();
    if (diagonal !== 'none') row.add(i);
    for (let m = 0; m < perRow; m++) {
      const j = Math.floor(random() * n);
      if (diagonal === 'none' && j === i) continue;
      row.add(j);
    }
    // A structurally zero diagonal needs another entry in each row and column to stay non-singular.
    if (diagonal === 'none') row.add((i + 1) % n);
    rows.push(row);
  }
  const pattern = patternFromRows(rows);
  const values = new Float64Array(pattern.rowPtr[n]);
  for (let i = 0; i < n; i++) {
    for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) {
      const j = pattern.colIdx[p];
      let v = 2 * random() - 1;
      if (i === j) v = diagonal === 'strong' ? perRow + 1 + random() : 1e-6 * v;
      values[p] = v;
    }
  }
  return { n, pattern, values };
}

function toDense(m: RandomMatrix): Float64Array {
  const a = new Float64Array(m.n * m.n);
  for (let i = 0; i < m.n; i++) {
    for (let p = m.pattern.rowPtr[i]; p < m.pattern.rowPtr[i + 1]; p++) a[i * m.n + m.pattern.colIdx[p]] = m.values[p];
  }
  return a;
}

/** max_i |A x - b|_i / (max_i sum_j |a_ij| |x_j| + |b|_inf). */
function relativeResidual(m: RandomMatrix, x: Float64Array, b: Float64Array): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < m.n; i++) {
    let r = -b[i];
    let s = Math.abs(b[i]);
    for (let p = m.pattern.rowPtr[i]; p < m.pattern.rowPtr[i + 1]; p++) {
      const term = m.values[p] * x[m.pattern.colIdx[p]];
      r += term;
      s += Math.abs(term);
    }
    worst = Math.max(worst, Math.abs(r));
    scale = Math.max(scale, s);
  }
  return worst / scale;
}

function solveBoth(m: RandomMatrix, seed: number): { sparse: Float64Array; dense: Float64Array; b: Float64Array; lu: SparseLU } {
  const random = seededRandom(seed);
  const b = Float64Array.from({ length: m.n }, () => 2 * random() - 1);
  const lu = new SparseLU(m.n, m.pattern);
  expect(lu.factor(m.values)).toBe(true);
  const sparse = Float64Array.from(b);
  lu.solve(sparse);
  const dense = new DenseLU(m.n);
  dense.lu.set(toDense(m));
  expect(dense.factor()).toBe(true);
  const x = Float64Array.from(b);
  dense.solve(x);
  return { sparse, dense: x, b, lu };
}

function maxRelativeDifference(a: Float64Array, b: Float64Array): number {
  let norm = 0;
  let diff = 0;
  for (let i = 0; i < a.length; i++) {
    norm = Math.max(norm, Math.abs(b[i]));
    diff = Math.max(diff, Math.abs(a[i] - b[i]));
  }
  return diff / norm;
}

describe('sparse LU', () => {
  it('matches the dense LU on diagonally dominant random sparse matrices', () => {
    for (const [n, perRow, seed] of [
      [50, 3, 1],
      [200, 6, 2],
      [400, 10, 3],
    ]) {
      const m = randomSparse(n, perRow, seed, 'strong');
      const { sparse, dense, b, lu } = solveBoth(m, seed + 100);
      expect(relativeResidual(m, sparse, b)).toBeLessThan(1e-12);
      expect(relativeResidual(m, dense, b)).toBeLessThan(1e-12);
      expect(maxRelativeDifference(sparse, dense)).toBeLessThan(1e-10);
      expect(lu.stats.pivotingFactorizations).toBe(1);
    }
  });

  it('pivots off the diagonal when the diagonal is tiny or structurally zero', () => {
    for (const diagonal of ['weak', 'none'] as const) {
      // Odd order, so the dense LU's two-column sweep ends on a single column.
      const m = randomSparse(121, 4, 11, diagonal);
      const { sparse, dense, b } = solveBoth(m, 12);
      expect(relativeResidual(m, sparse, b)).toBeLessThan(1e-12);
      expect(relativeResidual(m, dense, b)).toBeLessThan(1e-12);
      expect(maxRelativeDifference(sparse, dense)).toBeLessThan(1e-8);
    }
  });

  it('refactors on the stored pivot sequence, and pivots again when a pivot fails the threshold', () => {
    const m = randomSparse(150, 5, 21, 'strong');
    const lu = new SparseLU(m.n, m.pattern);
    expect(lu.factor(m.values)).toBe(true);
    const random = seededRandom(22);
    const b = Float64Array.from({ length: m.n }, () => 2 * random() - 1);

    // Same pattern, new values: numeric refactorisation only.
    const second: RandomMatrix = { ...m, values: m.values.map((v) => v * (1 + 0.3 * (random() - 0.5))) };
    expect(lu.factor(second.values)).toBe(true);
    expect(lu.stats).toMatchObject({ pivotingFactorizations: 1, refactorizations: 1 });
    const x2 = Float64Array.from(b);
    lu.solve(x2);
    expect(relativeResidual(second, x2, b)).toBeLessThan(1e-12);

    // Shrink every diagonal entry: the old pivots fail the threshold test.
    const third: RandomMatrix = { ...m, values: Float64Array.from(m.values) };
    for (let i = 0; i < m.n; i++) {
      for (let p = m.pattern.rowPtr[i]; p < m.pattern.rowPtr[i + 1]; p++) {
        if (m.pattern.colIdx[p] === i) third.values[p] *= 1e-9;
      }
    }
    expect(lu.factor(third.values)).toBe(true);
    expect(lu.stats.pivotingFactorizations).toBe(2);
    const x3 = Float64Array.from(b);
    lu.solve(x3);
    expect(relativeResidual(third, x3, b)).toBeLessThan(1e-12);
  });

  it('gives the same solution with and without the dense tail, also after refactorisation', () => {
    // Fairly full rows: the cost model hands the last steps to the dense LU.
    const m = randomSparse(200, 25, 41, 'strong');
    const random = seededRandom(42);
    const b = Float64Array.from({ length: m.n }, () => 2 * random() - 1);
    const withTail = new SparseLU(m.n, m.pattern);
    const withoutTail = new SparseLU(m.n, m.pattern, { denseTail: false });
    for (const values of [m.values, m.values.map((v) => v * (1 + 0.2 * (random() - 0.5)))]) {
      expect(withTail.factor(values)).toBe(true);
      expect(withoutTail.factor(values)).toBe(true);
      const x1 = Float64Array.from(b);
      const x2 = Float64Array.from(b);
      withTail.solve(x1);
      withoutTail.solve(x2);
      expect(relativeResidual({ ...m, values }, x1, b)).toBeLessThan(1e-12);
      expect(relativeResidual({ ...m, values }, x2, b)).toBeLessThan(1e-12);
      expect(maxRelativeDifference(x1, x2)).toBeLessThan(1e-10);
    }
    expect(withTail.stats.denseTail).toBeGreaterThan(0);
    expect(withTail.stats.denseTail).toBeLessThan(m.n);
    expect(withoutTail.stats.denseTail).toBe(0);
    expect(withTail.stats.refactorizations).toBe(1);
  });

  it('reports a singular matrix instead of dividing by zero', () => {
    // Rows 0 and 1 are equal.
    const pattern = patternFromRows([new Set([0, 1]), new Set([0, 1]), new Set([2])]);
    const lu = new SparseLU(3, pattern);
    expect(lu.factor(Float64Array.from([1, 2, 1, 2, 5]))).toBe(false);
    expect(lu.factor(Float64Array.from([1, 2, 3, 4, Number.NaN]))).toBe(false);
    expect(lu.factor(Float64Array.from([1, 2, 3, 4, 5]))).toBe(true);
  });
});

describe('minimum-degree ordering', () => {
  it('returns a permutation', () => {
    const m = randomSparse(300, 8, 31, 'strong');
    const q = minimumDegreeOrdering(m.n, m.pattern);
    expect([...q].sort((a, b) => a - b)).toEqual(Array.from({ length: m.n }, (_, i) => i));
  });

  it('orders an arrowhead matrix so that it factors without fill (George & Liu 1981, sec. 2.1)', () => {
    // Dense first row and column: the natural order fills the whole matrix,
    // eliminating the hub last gives no fill at all.
    const n = 60;
    const rows: Set<number>[] = [];
    for (let i = 0; i < n; i++) rows.push(i === 0 ? new Set(Array.from({ length: n }, (_, j) => j)) : new Set([0, i]));
    const pattern = patternFromRows(rows);
    const values = new Float64Array(pattern.rowPtr[n]);
    for (let i = 0; i < n; i++) {
      for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) values[p] = pattern.colIdx[p] === i ? n : 1;
    }
    const q = minimumDegreeOrdering(n, pattern);
    // The hub goes last (ties with the final spoke are broken by index).
    expect([...q].indexOf(0)).toBeGreaterThanOrEqual(n - 2);
    const ordered = new SparseLU(n, pattern, { ordering: 'minimum-degree' });
    const natural = new SparseLU(n, pattern, { ordering: 'natural' });
    expect(ordered.factor(values)).toBe(true);
    expect(natural.factor(values)).toBe(true);
    // No fill: L and U hold exactly the entries of A (diagonal counted in both).
    expect(ordered.stats.nnzL + ordered.stats.nnzU).toBe(pattern.rowPtr[n] + n);
    expect(natural.stats.nnzL).toBe((n * (n + 1)) / 2);
  });
});
