/**
 * The Newton matrix with a rank-one Jacobian part, I - c (J + u w^T), solved
 * by the Sherman-Morrison formula (Golub & Van Loan, Matrix Computations, 4th
 * ed., sec. 2.1.4), against a dense LU of the whole matrix.
 */
import { describe, expect, it } from 'vitest';
import { DenseLU } from '../../src/solve/dense-lu.ts';
import { createNewtonMatrix, RankOneNewtonMatrix } from '../../src/solve/newton-matrix.ts';
import type { SparsityPattern } from '../../src/solve/types.ts';

function random(seed: number): () => number {
  let s = seed;
  return () => (s = (s * 16807) % 2147483647) / 2147483647 - 0.5;
}

/** A sparse pattern: the diagonal and a few entries per row. */
function sparsePattern(n: number, rand: () => number): SparsityPattern {
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) {
    const cols = new Set([i, (i + 1) % n, Math.floor((rand() + 0.5) * n) % n]);
    rows.push([...cols].sort((a, b) => a - b));
  }
  const rowPtr = new Int32Array(n + 1);
  rows.forEach((r, i) => (rowPtr[i + 1] = rowPtr[i] + r.length));
  return { rowPtr, colIdx: Int32Array.from(rows.flat()) };
}

describe('rank-one Newton matrix', () => {
  for (const n of [12, 40]) {
    it(`solves (I - c (J + u w^T)) x = b like a dense LU of the whole matrix (n = ${n}, ${n > 24 ? 'sparse' : 'dense'} inner LU)`, () => {
      const rand = random(n);
      const pattern = sparsePattern(n, rand);
      const values = Float64Array.from({ length: pattern.rowPtr[n] }, () => rand());
      const u = Float64Array.from({ length: n }, () => rand());
      const w = Float64Array.from({ length: n }, () => rand());
      const c = 0.7;
      const matrix = new RankOneNewtonMatrix(createNewtonMatrix(n, pattern), n);
      matrix.setRankOne(u, w);
      expect(matrix.factor(values, c)).toBe(true);
      const b = Float64Array.from({ length: n }, () => rand());
      const x = Float64Array.from(b);
      matrix.solve(x);

      const dense = new DenseLU(n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) dense.lu[i * n + j] = (i === j ? 1 : 0) - c * u[i] * w[j];
        for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) dense.lu[i * n + pattern.colIdx[p]] -= c * values[p];
      }
      expect(dense.factor()).toBe(true);
      const expected = Float64Array.from(b);
      dense.solve(expected);
      for (let i = 0; i < n; i++) expect(x[i]).toBeCloseTo(expected[i], 10);
    });
  }

  it('reports a singular matrix when the update makes it so (1 - c w^T A^-1 u = 0)', () => {
    const n = 30;
    const pattern = sparsePattern(n, random(3));
    const values = new Float64Array(pattern.rowPtr[n]);
    // J = 0, so A = I and w^T A^-1 u = w^T u: w = u / (c |u|^2) makes the whole matrix singular.
    const u = Float64Array.from({ length: n }, (_, i) => 1 + i);
    const c = 2;
    const norm = u.reduce((s, x) => s + x * x, 0);
    const w = Float64Array.from(u, (x) => x / (c * norm));
    const matrix = new RankOneNewtonMatrix(createNewtonMatrix(n, pattern), n);
    matrix.setRankOne(u, w);
    expect(matrix.factor(values, c)).toBe(false);
    matrix.setRankOne(u, Float64Array.from(w, (x) => 0.5 * x));
    expect(matrix.factor(values, c)).toBe(true);
  });
});
