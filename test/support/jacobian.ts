/**
 * Analytic Jacobian of a compiled system against central differences (common
 * practice): the worst relative disagreement over entries that matter against
 * their row's largest entry, and a positive pseudo-random state to check at.
 */
import type { CompiledSystem } from '../../src/chem/system.ts';

export function randomState(sys: CompiledSystem, scale: number, seed: number): Float64Array {
  let s = seed;
  const rand = () => ((s = (s * 16807) % 2147483647) / 2147483647);
  return Float64Array.from({ length: sys.n }, () => scale * (0.1 + rand()));
}

/** `floor`: smallest |x_j| the step is scaled from, so that zero entries (an empty surface) are perturbed too. */
export function fdCheck(sys: CompiledSystem, y: Float64Array, floor = 0): number {
  const values = new Float64Array(sys.pattern.colIdx.length);
  sys.jacobian(0, y, values);
  const f0 = new Float64Array(sys.n);
  const f1 = new Float64Array(sys.n);
  const dense = new Float64Array(sys.n * sys.n);
  for (let i = 0; i < sys.n; i++) for (let p = sys.pattern.rowPtr[i]; p < sys.pattern.rowPtr[i + 1]; p++) dense[i * sys.n + sys.pattern.colIdx[p]] = values[p];
  // J = J(pattern) + u w^T when the system has a rank-one part.
  if (sys.rankOne) for (let i = 0; i < sys.n; i++) for (let j = 0; j < sys.n; j++) dense[i * sys.n + j] += sys.rankOne.u[i] * sys.rankOne.w[j];
  let worst = 0;
  const rowMax = new Float64Array(sys.n);
  for (let i = 0; i < sys.n; i++) for (let j = 0; j < sys.n; j++) rowMax[i] = Math.max(rowMax[i], Math.abs(dense[i * sys.n + j]));
  for (let j = 0; j < sys.n; j++) {
    const h = 1e-7 * Math.max(Math.abs(y[j]), floor);
    const yp = Float64Array.from(y);
    const ym = Float64Array.from(y);
    yp[j] += h;
    ym[j] -= h;
    sys.rhs(0, yp, f1);
    sys.rhs(0, ym, f0);
    for (let i = 0; i < sys.n; i++) {
      const fd = (f1[i] - f0[i]) / (2 * h);
      const an = dense[i * sys.n + j];
      const scale = Math.max(Math.abs(fd), Math.abs(an), 1e-30);
      if (Math.abs(fd - an) > 1e-7 * rowMax[i] && Math.abs(fd - an) / scale > worst) {
        worst = Math.abs(fd - an) / scale;
        if (process.env.DEBUG_FD) console.log(sys.species[i], sys.species[j], fd, an);
      }
    }
  }
  return worst;
}
