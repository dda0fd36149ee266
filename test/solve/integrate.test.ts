/**
 * The BDF integrator against published solutions and exact formulas.
 */
import { describe, expect, it } from 'vitest';
import { integrate, type OdeProblem } from '../../src/solve/index.ts';
import { DENSE_MAX_N } from '../../src/solve/newton-matrix.ts';
import { densePattern, massActionNetwork, patternFromRows, robertson, seededRandom } from './problems.ts';

/**
 * Global error bounds. The step control holds the local error per step below
 * rtol |y| + atol; the global error is a small multiple of that on the scale
 * of each component's peak (PEAK_FACTOR). Relative to the current value of a
 * decaying component the local errors add up over its e-foldings, so that
 * bound is looser (DECAY_FACTOR), yet it still holds down to 1e-30.
 */
const PEAK_FACTOR = 10;
const DECAY_FACTOR = 500;

const logSpaced = (from: number, to: number, count: number): number[] =>
  Array.from({ length: count }, (_, i) => from * (to / from) ** (i / (count - 1)));

describe('Robertson problem (Robertson 1966)', () => {
  it('matches the values at t = 40 tabulated by Hairer & Wanner, Solving ODEs II (memory, widely quoted)', () => {
    const { problem, y0 } = robertson();
    const times = [...logSpaced(1e-6, 40, 30), ...logSpaced(400, 4e10, 9)];
    const result = integrate(problem, y0, times, { rtol: 1e-8, atol: 1e-14 });
    expect(result.status).toBe('ok');
    expect(result.y.length).toBe(times.length);
    const at40 = result.y[29];
    expect(result.t[29]).toBe(40);
    // memory, widely quoted: y(40) = (0.7158271, 9.185535e-6, 0.2841637)
    const reference = [0.7158271, 9.185535e-6, 0.2841637];
    for (let i = 0; i < 3; i++) expect(Math.abs(at40[i] / reference[i] - 1)).toBeLessThan(1e-5);
    // y1 + y2 + y3 = 1 is an invariant of the problem.
    for (const y of result.y) expect(Math.abs(y[0] + y[1] + y[2] - 1)).toBeLessThan(1e-10);
    expect(result.stats.steps).toBeGreaterThan(0);
    expect(result.stats.orderHistogram.reduce((a, b) => a + b, 0)).toBe(result.stats.steps);
  });

  it('returns y0 for an output at t = 0 and accepts outputs starting later', () => {
    const { problem, y0 } = robertson();
    const withZero = integrate(problem, y0, [0, 1], { rtol: 1e-6, atol: 1e-12 });
    expect(Array.from(withZero.y[0])).toEqual([1, 0, 0]);
    const later = integrate(problem, y0, [1], { rtol: 1e-6, atol: 1e-12 });
    expect(later.y[0][0]).toBeCloseTo(withZero.y[1][0], 8);
  });
});

/**
 * Bateman (1910) solution of A -> B -> C with A(0) = 1, written without
 * cancellation: with a = k1 t, b = k2 t and g(x) = (1 - e^-x) / x,
 * B = k1 t e^-min(a,b) g(|b - a|), C = a b (g(a) - g(b)) / (b - a).
 */
function bateman(k1: number, k2: number, t: number): [number, number, number] {
  const a = k1 * t;
  const b = k2 * t;
  const g = (x: number): number => (x === 0 ? 1 : -Math.expm1(-x) / x);
  const A = Math.exp(-a);
  const B = a * Math.exp(-Math.min(a, b)) * g(Math.abs(b - a));
  let C: number;
  if (Math.max(a, b) < 0.5) {
    // g(a) - g(b) = sum_m (-1)^m (a^m - b^m) / (m+1)!, and (a^m - b^m) / (b - a) = -sum_j a^j b^(m-1-j).
    let sum = 0;
    let factorial = 1;
    for (let m = 1; m < 30; m++) {
      factorial *= m + 1;
      let h = 0;
      for (let j = 0; j < m; j++) h += a ** j * b ** (m - 1 - j);
      sum += ((-1) ** m * -h) / factorial;
    }
    C = a * b * sum;
  } else {
    C = (a * b * (g(a) - g(b))) / (b - a);
  }
  return [A, B, C];
}

function chainProblem(k1: number, k2: number): OdeProblem {
  return {
    n: 3,
    pattern: patternFromRows([new Set([0]), new Set([0, 1]), new Set([1])]),
    rhs(_t, y, d) {
      d[0] = -k1 * y[0];
      d[1] = k1 * y[0] - k2 * y[1];
      d[2] = k2 * y[1];
    },
    jacobian(_t, _y, v) {
      v[0] = -k1;
      v[1] = k1;
      v[2] = -k2;
      v[3] = k2;
    },
  };
}

describe('A -> B -> C against the Bateman (1910) solution', () => {
  const cases: [number, number, number][] = [
    // k1, k2, first output time; outputs cover 10 decades from there.
    [1e4, 1e-12, 1e-6],
    [1e-12, 1e4, 1e-6],
    [1e-2, 1e2, 1e-4],
    [1e-8, 1e-6, 1e2],
    [1e4, 1e3, 1e-7],
  ];
  it.each(cases)('k1 = %s, k2 = %s', (k1, k2, start) => {
    const rtol = 1e-8;
    const atol = 1e-30;
    const times = logSpaced(start, start * 1e10, 41);
    const result = integrate(chainProblem(k1, k2), Float64Array.from([1, 0, 0]), times, { rtol, atol });
    expect(result.status).toBe('ok');
    const exact = times.map((t) => bateman(k1, k2, t));
    const peak = [0, 1, 2].map((i) => Math.max(...exact.map((e) => Math.abs(e[i]))));
    for (let k = 0; k < times.length; k++) {
      for (let i = 0; i < 3; i++) {
        const error = Math.abs(result.y[k][i] - exact[k][i]);
        expect(error).toBeLessThanOrEqual(PEAK_FACTOR * (rtol * peak[i] + atol));
        expect(error).toBeLessThanOrEqual(DECAY_FACTOR * (rtol * Math.abs(exact[k][i]) + atol));
      }
      expect(Math.abs(result.y[k][0] + result.y[k][1] + result.y[k][2] - 1)).toBeLessThan(1e-10);
    }
  });
});

describe("random stiff linear system y' = A y, A = V D V^-1", () => {
  /**
   * V is block diagonal, blocks of BLOCK consecutive eigenvalues, applied to
   * a random permutation of the unknowns (so the pattern is sparse and
   * scattered). Each block is H (I + N) with H a Householder reflection
   * (H^-1 = H) and N strictly upper triangular, so V^-1 = (I - N + N^2 - ...) H
   * exactly, and y(t) = V exp(D t) V^-1 y0. Blocks keep the problem well posed
   * in double precision: a dense V would put round-off of eps |lambda_max| |y|
   * = 1e-10 |y| into f, which over t = 1e9 swamps the slow modes for any solver.
   */
  const BLOCK = 4;
  function linearSystem(n: number, seed: number) {
    const random = seededRandom(seed);
    const eigenvalues = Float64Array.from({ length: n }, (_, i) => -(10 ** (-8 + (14 * i) / (n - 1))));
    const unknown = Array.from({ length: n }, (_, i) => i);
    for (let i = n - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1));
      [unknown[i], unknown[j]] = [unknown[j], unknown[i]];
    }
    const V = new Float64Array(n * n);
    const Vinv = new Float64Array(n * n);
    const rows: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
    for (let start = 0; start < n; start += BLOCK) {
      const m = Math.min(BLOCK, n - start);
      const u = Float64Array.from({ length: m }, () => random() - 0.5);
      const uu = u.reduce((sum, x) => sum + x * x, 0);
      const H = (i: number, j: number): number => (i === j ? 1 : 0) - (2 * u[i] * u[j]) / uu;
      const N = new Float64Array(m * m);
      for (let i = 0; i < m; i++) for (let j = i + 1; j < m; j++) N[i * m + j] = 0.8 * (random() - 0.5);
      // (I + N)^-1 = sum_k (-N)^k, finite because N is nilpotent.
      const inverse = new Float64Array(m * m);
      let power = new Float64Array(m * m);
      for (let i = 0; i < m; i++) power[i * m + i] = 1;
      for (let k = 0; k < m; k++) {
        for (let x = 0; x < m * m; x++) inverse[x] += power[x];
        const next = new Float64Array(m * m);
        for (let i = 0; i < m; i++) for (let l = 0; l < m; l++) for (let j = 0; j < m; j++) next[i * m + j] -= power[i * m + l] * N[l * m + j];
        power = next;
      }
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < m; j++) {
          let v = 0;
          let w = 0;
          for (let l = 0; l < m; l++) {
            v += H(i, l) * ((l === j ? 1 : 0) + N[l * m + j]);
            w += inverse[i * m + l] * H(l, j);
          }
          // Row: unknown of block entry i; column: mode start + j (V), and the transpose roles for V^-1.
          V[unknown[start + i] * n + start + j] = v;
          Vinv[(start + i) * n + unknown[start + j]] = w;
          rows[unknown[start + i]].add(unknown[start + j]);
        }
      }
    }
    const pattern = patternFromRows(rows);
    const values = new Float64Array(pattern.rowPtr[n]);
    for (let i = 0; i < n; i++) {
      for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) {
        const j = pattern.colIdx[p];
        let a = 0;
        for (let mode = 0; mode < n; mode++) a += V[i * n + mode] * eigenvalues[mode] * Vinv[mode * n + j];
        values[p] = a;
      }
    }
    const problem: OdeProblem = {
      n,
      pattern,
      rhs(_t, y, d) {
        for (let i = 0; i < n; i++) {
          let sum = 0;
          for (let p = pattern.rowPtr[i]; p < pattern.rowPtr[i + 1]; p++) sum += values[p] * y[pattern.colIdx[p]];
          d[i] = sum;
        }
      },
      jacobian(_t, _y, v) {
        v.set(values);
      },
    };
    const y0 = Float64Array.from({ length: n }, () => random());
    const z0 = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) z0[i] += Vinv[i * n + j] * y0[j];
    const exact = (t: number): Float64Array => {
      const y = new Float64Array(n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) y[i] += V[i * n + j] * Math.exp(eigenvalues[j] * t) * z0[j];
      return y;
    };
    return { problem, y0, exact };
  }

  // One size on the dense path, one on the sparse path.
  it.each([8, DENSE_MAX_N + 16])('n = %i, eigenvalues -1e-8 .. -1e6', (n) => {
    const { problem, y0, exact } = linearSystem(n, 40 + n);
    const rtol = 1e-7;
    const atol = 1e-12;
    const times = logSpaced(1e-8, 1e9, 35);
    const result = integrate(problem, y0, times, { rtol, atol });
    expect(result.status).toBe('ok');
    const peak = new Float64Array(n);
    const references = times.map(exact);
    for (const reference of references) for (let i = 0; i < n; i++) peak[i] = Math.max(peak[i], Math.abs(reference[i]));
    for (let k = 0; k < times.length; k++) {
      for (let i = 0; i < n; i++) {
        expect(Math.abs(result.y[k][i] - references[k][i])).toBeLessThanOrEqual(PEAK_FACTOR * (rtol * peak[i] + atol));
      }
    }
  });
});

describe('a long decay chain on the sparse path', () => {
  it('handles a pattern without diagonal entries and matches Bateman (1910) for its first members', () => {
    // A_0 -> A_1 -> ... -> A_{n-1}, rates 1e3 down to 1e-11 s^-1; the last member
    // is stable, so its row has no diagonal entry.
    const n = DENSE_MAX_N + 6;
    const rates = Float64Array.from({ length: n - 1 }, (_, i) => 10 ** (3 - (14 * i) / (n - 2)));
    const rows = Array.from({ length: n }, (_, i) => new Set(i === 0 ? [0] : i === n - 1 ? [i - 1] : [i - 1, i]));
    const problem: OdeProblem = {
      n,
      pattern: patternFromRows(rows),
      rhs(_t, y, d) {
        for (let i = 0; i < n; i++) d[i] = (i > 0 ? rates[i - 1] * y[i - 1] : 0) - (i < n - 1 ? rates[i] * y[i] : 0);
      },
      jacobian(_t, _y, v) {
        let p = 0;
        for (let i = 0; i < n; i++) {
          if (i > 0) v[p++] = rates[i - 1];
          if (i < n - 1) v[p++] = -rates[i];
        }
      },
    };
    const y0 = new Float64Array(n);
    y0[0] = 1;
    const rtol = 1e-8;
    const atol = 1e-30;
    const times = logSpaced(1e-5, 1e13, 37);
    const result = integrate(problem, y0, times, { rtol, atol });
    expect(result.status).toBe('ok');
    for (let k = 0; k < times.length; k++) {
      const [a, b] = bateman(rates[0], rates[1], times[k]);
      expect(Math.abs(result.y[k][0] - a)).toBeLessThanOrEqual(PEAK_FACTOR * (rtol + atol));
      expect(Math.abs(result.y[k][1] - b)).toBeLessThanOrEqual(PEAK_FACTOR * (rtol + atol));
      expect(Math.abs(result.y[k].reduce((sum, v) => sum + v, 0) - 1)).toBeLessThan(1e-10);
    }
    // By 1e13 s everything with a rate above 1e-11 s^-1 has decayed into the last members.
    expect(result.y[times.length - 1][n - 1]).toBeGreaterThan(0.5);
  });
});

describe('a mass-action network on the sparse path', () => {
  it('conserves the number of particles and keeps abundances non-negative', () => {
    const { problem, y0 } = massActionNetwork({ species: 60, seed: 5 });
    expect(problem.n).toBeGreaterThan(DENSE_MAX_N);
    const times = logSpaced(3e7, 3e14, 15);
    const result = integrate(problem, y0, times, { rtol: 1e-6, atol: 1e-25, nonNegative: true });
    expect(result.status).toBe('ok');
    const total = y0.reduce((s, v) => s + v, 0);
    for (const y of result.y) {
      expect(Math.abs(y.reduce((s, v) => s + v, 0) / total - 1)).toBeLessThan(1e-9);
      expect(Math.min(...y)).toBeGreaterThanOrEqual(0);
    }
  });
});

describe('options', () => {
  it('nonNegative clips the round-off negatives that loose tolerances give (Robertson, atol 1e-6)', () => {
    const { problem, y0 } = robertson();
    const times = logSpaced(1e-4, 1e11, 30);
    const loose = { rtol: 1e-3, atol: 1e-6 };
    const plain = integrate(problem, y0, times, loose);
    const clipped = integrate(problem, y0, times, { ...loose, nonNegative: true });
    expect(plain.status).toBe('ok');
    expect(clipped.status).toBe('ok');
    const smallest = (r: typeof plain): number => Math.min(...r.y.map((y) => Math.min(...y)));
    expect(smallest(plain)).toBeLessThan(0);
    expect(smallest(clipped)).toBe(0);
    // Clipping moves mass by no more than about atol.
    for (const y of clipped.y) expect(Math.abs(y[0] + y[1] + y[2] - 1)).toBeLessThan(1e-5);
  });

  it('honours maxStep, initialStep and a per-component atol', () => {
    const { problem, y0 } = robertson();
    const free = integrate(problem, y0, [1e3], { rtol: 1e-6, atol: 1e-12 });
    const bounded = integrate(problem, y0, [1e3], { rtol: 1e-6, atol: 1e-12, maxStep: 5 });
    expect(bounded.status).toBe('ok');
    expect(bounded.stats.steps).toBeGreaterThanOrEqual(200);
    expect(bounded.stats.steps).toBeGreaterThan(free.stats.steps);
    const started = integrate(problem, y0, [1e3], { rtol: 1e-6, atol: 1e-12, initialStep: 1e-9 });
    const perComponent = integrate(problem, y0, [1e3], { rtol: 1e-6, atol: Float64Array.from([1e-12, 1e-16, 1e-12]) });
    for (const r of [bounded, started, perComponent]) {
      expect(r.status).toBe('ok');
      for (let i = 0; i < 3; i++) expect(Math.abs(r.y[0][i] / free.y[0][i] - 1)).toBeLessThan(1e-4);
    }
  });
});

describe('failures are statuses, never exceptions or endless loops', () => {
  it('reports a right-hand side that is NaN from the start', () => {
    const { problem, y0 } = robertson();
    const bad: OdeProblem = { ...problem, rhs: (_t, _y, d) => d.fill(Number.NaN) };
    const result = integrate(bad, y0, [1, 2], { rtol: 1e-6, atol: 1e-12 });
    expect(result.status).toMatch(/non-finite/);
    expect(result.y.length).toBe(0);
    expect(result.t.length).toBe(0);
    expect(result.failureTime).toBe(0);
  });

  it('reports a right-hand side that turns NaN part way, keeping the outputs reached', () => {
    const { problem, y0 } = robertson();
    const bad: OdeProblem = {
      ...problem,
      rhs(t, y, d) {
        problem.rhs(t, y, d);
        if (t > 5) d[1] = Number.NaN;
      },
    };
    const result = integrate(bad, y0, [1, 2, 4, 8, 16], { rtol: 1e-6, atol: 1e-12 });
    expect(result.status).toMatch(/non-finite values in the right-hand side/);
    expect(Array.from(result.t)).toEqual([1, 2, 4]);
    expect(result.y.length).toBe(3);
    expect(result.failureTime).toBeGreaterThan(4);
    expect(result.failureTime).toBeLessThanOrEqual(5);
  });

  it('reports a Jacobian with NaN in it', () => {
    const { problem, y0 } = robertson();
    const bad: OdeProblem = {
      ...problem,
      jacobian(t, y, v) {
        problem.jacobian(t, y, v);
        if (t > 1) v[4] = Number.NaN;
      },
    };
    const result = integrate(bad, y0, [0.5, 1e3], { rtol: 1e-6, atol: 1e-12 });
    expect(result.status).toMatch(/non-finite values in the Jacobian/);
    expect(result.y.length).toBe(1);
    expect(result.failureTime).toBeGreaterThan(0.5);
  });

  it('stops after maxSteps with a status', () => {
    const { problem, y0 } = robertson();
    const result = integrate(problem, y0, [1e-3, 1e10], { rtol: 1e-6, atol: 1e-12, maxSteps: 50 });
    expect(result.status).toMatch(/^too many steps/);
    expect(result.stats.steps).toBe(50);
    expect(result.y.length).toBe(result.t.length);
    expect(result.y.length).toBeLessThan(2);
  });

  it('stops at a finite-time blow-up (y\' = y^2, y(0) = 1, singular at t = 1)', () => {
    const problem: OdeProblem = {
      n: 1,
      pattern: densePattern(1),
      rhs: (_t, y, d) => {
        d[0] = y[0] * y[0];
      },
      jacobian: (_t, y, v) => {
        v[0] = 2 * y[0];
      },
    };
    const result = integrate(problem, Float64Array.from([1]), [0.5, 2], { rtol: 1e-6, atol: 1e-12 });
    expect(result.status).not.toBe('ok');
    expect(result.y.length).toBe(1);
    expect(result.y[0][0]).toBeCloseTo(2, 3);
    expect(result.failureTime).toBeLessThan(1);
  });

  it('throws a RangeError for malformed arguments, which are programming errors', () => {
    const { problem, y0 } = robertson();
    expect(() => integrate(problem, y0, [2, 1], { rtol: 1e-6, atol: 1e-12 })).toThrow(RangeError);
    expect(() => integrate(problem, new Float64Array(2), [1], { rtol: 1e-6, atol: 1e-12 })).toThrow(RangeError);
  });
});

describe('determinism', () => {
  it('gives bit-identical results and counts when run twice', () => {
    const { problem, y0 } = massActionNetwork({ species: 80, seed: 9 });
    const times = logSpaced(3e5, 3e14, 10);
    const options = { rtol: 1e-6, atol: 1e-25, nonNegative: true };
    const first = integrate(problem, y0, times, options);
    const second = integrate(problem, y0, times, options);
    expect(first.status).toBe('ok');
    expect(second.stats).toEqual(first.stats);
    for (let k = 0; k < times.length; k++) {
      expect(Buffer.from(second.y[k].buffer).equals(Buffer.from(first.y[k].buffer))).toBe(true);
    }
  });
});
