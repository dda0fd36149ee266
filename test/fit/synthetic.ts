/**
 * Invented test data: a small candidate table whose abundances are smooth
 * analytic functions of density and time (not a chemical model; shapes
 * chosen only so that density and age are both identifiable), and a seeded
 * random-number generator for noisy draws.
 */
import type { CandidateTable } from '../../src/fit/types.ts';
import type { ObservedQuantity, ObservationSet, Sightline } from '../../src/obs/types.ts';
import { seededRandom } from '../../scripts/seeded-random.ts';

export { seededRandom };

export const SPECIES = ['H2O(s)', 'CO(s)', 'CO2(s)', 'CH3OH(s)', 'CO'];

/** Invented smooth abundances (relative to n_H) of SPECIES at density n (cm^-3) and time t (yr); `uv` scales CH3OH weakly. */
export function analyticAbundances(n: number, t: number, uv = 1): number[] {
  const freeze = 1 - Math.exp(-(t * n) / 6e9);
  return [
    1e-4 * freeze,
    3e-5 * freeze * Math.pow(n / 1e4, 0.3),
    2e-5 * Math.pow(t / 1e6, 0.4) * Math.pow(n / 1e4, -0.25) * freeze,
    1e-6 * Math.pow(n / 1e4, 0.6) * Math.pow(t / 1e5, 0.5) * Math.pow(uv, -0.3),
    1e-4 * Math.exp(-(t * n) / 6e9) + 1e-8,
  ];
}

export function logSpaced(from: number, to: number, count: number): number[] {
  return Array.from({ length: count }, (_, i) => from * Math.pow(to / from, i / (count - 1)));
}

export interface GridSpec {
  densities: number[];
  times: number[];
  uvFields?: number[];
  /** Extra conditions with fixed values. */
  fixed?: Record<string, number>;
}

export function syntheticTable(spec: GridSpec): CandidateTable {
  const uvs = spec.uvFields ?? [1];
  const fixed = spec.fixed ?? { gas_temperature: 10 };
  const parameterNames = ['density', 'uv_field', ...Object.keys(fixed)];
  const np = parameterNames.length;
  const models: number[][] = [];
  for (const n of spec.densities) for (const uv of uvs) models.push([n, uv, ...Object.values(fixed)]);
  const nT = spec.times.length;
  const nS = SPECIES.length;
  const parameters = new Float64Array(models.length * np);
  const abundances = new Float64Array(models.length * nT * nS);
  models.forEach((m, i) => {
    parameters.set(m, i * np);
    spec.times.forEach((t, k) => abundances.set(analyticAbundances(m[0], t, m[1]), (i * nT + k) * nS));
  });
  return {
    parameterNames,
    nModels: models.length,
    nTimes: nT,
    nSpecies: nS,
    parameters,
    modelIds: models.map((_, i) => `m${String(i).padStart(4, '0')}`),
    timesYr: Float64Array.from(spec.times),
    species: [...SPECIES],
    abundances,
  };
}


/** Standard normal deviate by the Box-Muller transform. */
export function gaussian(random: () => number): number {
  const u = 1 - random();
  const v = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

export function detection(sightline: string, numerator: string, log10: number, sigmaDex: number, denominator?: string): ObservedQuantity {
  return {
    sightline,
    label: denominator ? `${numerator}/${denominator}` : `X(${numerator})`,
    numerator,
    ...(denominator ? { denominator } : {}),
    kind: 'detection',
    log10,
    sigmaLoDex: sigmaDex,
    sigmaHiDex: sigmaDex,
  };
}

export function limit(sightline: string, kind: 'upper' | 'lower', numerator: string, log10: number, denominator?: string): ObservedQuantity {
  return { sightline, label: denominator ? `${numerator}/${denominator}` : `X(${numerator})`, numerator, ...(denominator ? { denominator } : {}), kind, log10, sigmaLoDex: 0, sigmaHiDex: 0 };
}

/** A table-kind observation set with the given sightline ids, every column a detection unless listed in `limits`. */
export function observationSet(ids: string[], limits: Record<string, Record<string, 'upper' | 'lower'>> = {}): ObservationSet {
  const sightlines: Sightline[] = ids.map((id, row) => {
    const columns: Sightline['columns'] = {};
    for (const s of SPECIES) columns[s] = { kind: limits[id]?.[s] ?? 'detection', value: 1e17, errLo: 1e16, errHi: 1e16 };
    return { id, columns, source: { file: 'invented-cloud.csv', row: row + 2 } };
  });
  return { file: 'invented-cloud.csv', kind: 'table', sightlines, warnings: [] };
}

/** The table less the models for which `drop` is true (as a grid's exclusion rules leave it): parameters by name. */
export function withoutModels(table: CandidateTable, drop: (parameters: Record<string, number>) => boolean): CandidateTable {
  const np = table.parameterNames.length;
  const nT = table.nTimes;
  const nS = table.nSpecies;
  const keep: number[] = [];
  for (let m = 0; m < table.nModels; m++) {
    const p = Object.fromEntries(table.parameterNames.map((name, k) => [name, table.parameters[m * np + k]]));
    if (!drop(p)) keep.push(m);
  }
  const parameters = new Float64Array(keep.length * np);
  const abundances = new Float64Array(keep.length * nT * nS);
  keep.forEach((m, i) => {
    parameters.set(table.parameters.subarray(m * np, (m + 1) * np), i * np);
    abundances.set(table.abundances.subarray(m * nT * nS, (m + 1) * nT * nS), i * nT * nS);
  });
  return { ...table, nModels: keep.length, parameters, abundances, modelIds: keep.map((m) => table.modelIds[m]) };
}

/** Dense r^T C^-1 r by Gauss-Jordan elimination, independent of the Cholesky code. */
export function denseChiSquare(c: number[][], r: number[]): number {
  const n = r.length;
  const a = c.map((row, i) => [...row, r[i]]);
  for (let i = 0; i < n; i++) {
    let p = i;
    for (let k = i + 1; k < n; k++) if (Math.abs(a[k][i]) > Math.abs(a[p][i])) p = k;
    [a[i], a[p]] = [a[p], a[i]];
    for (let k = 0; k < n; k++) {
      if (k === i) continue;
      const f = a[k][i] / a[i][i];
      for (let j = i; j <= n; j++) a[k][j] -= f * a[i][j];
    }
  }
  return r.reduce((s, ri, i) => s + ri * (a[i][n] / a[i][i]), 0);
}
