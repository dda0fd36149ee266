/**
 * The sub-grid mesh (src/fit/refine.ts): models interpolated multilinearly in
 * log parameter and log time. Checked on a model that is exactly a power law
 * (log-linear), where linear interpolation in the logs is exact and the
 * leave-one-out error is zero, and on a curved one, where the error is the
 * second difference of the logs (hand-worked below).
 */
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { buildAxes } from '../../src/fit/axes.ts';
import { buildModelQuantities } from '../../src/fit/model-quantities.ts';
import { interpolationError, refinableAxes, refineTable } from '../../src/fit/refine.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import type { CandidateTable } from '../../src/fit/types.ts';
import { detection, logSpaced, observationSet } from './synthetic.ts';

/** Two species; X(A) = 1e-6 (n/1e4)^a (t/1e5)^b, X(B) = 1e-5 n^0 t^0 times exp of a curvature c (log10 n - 4)^2 in log. */
function powerTable(densities: number[], times: number[], curvature = 0): CandidateTable {
  const nS = 2;
  const abundances = new Float64Array(densities.length * times.length * nS);
  densities.forEach((n, m) =>
    times.forEach((t, k) => {
      const base = (m * times.length + k) * nS;
      abundances[base] = 1e-6 * Math.pow(n / 1e4, 0.7) * Math.pow(t / 1e5, -0.4);
      abundances[base + 1] = 1e-5 * Math.pow(10, curvature * (Math.log10(n) - 4) ** 2);
    }),
  );
  return {
    parameterNames: ['density', 'gas_temperature'],
    nModels: densities.length,
    nTimes: times.length,
    nSpecies: nS,
    parameters: Float64Array.from(densities.flatMap((n) => [n, 10])),
    modelIds: densities.map((_, i) => `m${i}`),
    timesYr: Float64Array.from(times),
    species: ['A', 'B'],
    abundances,
  };
}

describe('sub-grid mesh', () => {
  const densities = logSpaced(1e3, 1e6, 7);
  const times = logSpaced(1e4, 1e7, 16);

  it('cuts each interval into `factor` steps, keeps grid values and their ids, marks interpolated points', () => {
    const table = powerTable(densities, times);
    const axes = buildAxes(table);
    const names = refinableAxes(axes, new Set());
    expect(names).toEqual(['density', 'age_yr']);
    const r = refineTable(table, axes, names, 4);
    expect(r.table.nModels).toBe(6 * 4 + 1);
    expect(r.table.nTimes).toBe(15 * 4 + 1);
    expect(r.table.modelIds[0]).toBe('m0');
    expect(r.table.modelIds[1]).toBe('~m0+1');
    expect(r.table.modelIds[3]).toBe('~m0+3');
    expect(r.table.modelIds[4]).toBe('m1');
    // Every refined point has an id of its own: the report finds a best fit's track by it.
    expect(new Set(r.table.modelIds).size).toBe(r.table.nModels);
    // A power law is linear in the logs: the mesh reproduces it exactly between grid values.
    const n = r.table.parameters[2 * 2];
    const t = r.table.timesYr[3];
    expect(Math.log10(n)).toBeCloseTo(3 + 0.5 * (2 / 4), 12);
    const x = r.table.abundances[(2 * r.table.nTimes + 3) * 2];
    expect(Math.log10(x)).toBeCloseTo(Math.log10(1e-6 * Math.pow(n / 1e4, 0.7) * Math.pow(t / 1e5, -0.4)), 10);
  });

  it('measures the interpolation error at held-out grid values: zero for a power law, the second difference for a curved model', () => {
    // B = 1e-5 * 10^(c (u - 4)^2), u = log10 n, spacing h = 0.5: the value at u predicted from u +- h
    // errs by c h^2 = 0.25 c dex at every interior density (a parabola's second difference); the error
    // at the grid spacing is a quarter of it (h^2 law), c h^2 / 4.
    const c = 0.4;
    const table = powerTable(densities, times, c);
    const axes = buildAxes(table);
    const model = buildModelQuantities(table, [
      { key: 'A', label: 'X(A)', numerator: 'A' },
      { key: 'B', label: 'X(B)', numerator: 'B' },
    ]);
    const err = interpolationError(table, axes, model, ['density', 'age_yr']);
    expect(err.errorDex.get('A')).toBeLessThan(1e-12);
    // Along density: every held-out value errs by c h^2; along age: 0. RMS in quadrature over the two axes.
    expect(err.leaveOneOutDex.get('B')).toBeCloseTo(c * 0.25, 10);
    expect(err.errorDex.get('B')).toBeCloseTo((c * 0.25) / 4, 10);
  });

  it('a fit on the mesh finds a truth between grid values and states the mesh and its error in fit.json', () => {
    const table = powerTable(densities, times);
    const nTrue = 10 ** 4.25;
    const tTrue = 10 ** 5.3;
    const a = Math.log10(1e-6 * Math.pow(nTrue / 1e4, 0.7) * Math.pow(tTrue / 1e5, -0.4));
    const q = [detection('s', 'A', a, 0.05), detection('s', 'B', -5, 0.05)];
    const section = fitSection.parse({ quantities: [{ species: 'A', as: 'abundance' }], model_sigma_dex: 0, refine: 2 });
    const { result } = runFitStage({ table, section, observations: { ...observationSet(['s']), sightlines: [{ id: 's', columns: {}, source: { file: 'invented.csv', row: 2 } }] }, quantities: q });
    expect(result.interpolation?.factor).toBe(2);
    expect(result.interpolation?.errorDex['X(A)']).toBeLessThan(1e-12);
    // A and B cannot separate density from age (one power law), but the best chi^2 is 0 on the mesh, not at a grid value.
    expect(result.fits[0].best.chi2).toBeLessThan(1e-20);
    expect(result.fits[0].best.modelId.startsWith('~') || !Number.isInteger(Math.log10(result.fits[0].best.ageYr) * 5)).toBe(true);
  });
});
