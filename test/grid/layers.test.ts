import { describe, expect, it } from 'vitest';
import { expandGrid, type GridSpec } from '../../src/grid/expand.ts';
import { layeredCandidates } from '../../src/grid/layered-candidates.ts';
import { binLineOfSightAv, cellAv, layerAxisValues, sightlineLayers, type LayerGeometry } from '../../src/grid/layers.ts';
import type { CandidateTable } from '../../src/fit/types.ts';
import { CONDITION_NAMES, CONDITIONS } from '../../src/config/conditions.ts';

/** N_H/A_V of Bohlin, Savage & Drake (1978), cm^-2 mag^-1. */
const NH_PER_AV = 1.87e21;
const slab: LayerGeometry = { kind: 'slab' };

/** N(X) = N_H(sightline) sum_k w_k x(A_V of cell k), the sum of docs/cloud-structure.md section 1. */
function column(geometry: LayerGeometry, losAv: number, step: number, x: (av: number) => number): number {
  const { cells, weights } = sightlineLayers(geometry, losAv, step);
  let s = 0;
  for (let q = 0; q < cells.length; q++) s += weights[q] * x(cellAv(cells[q], step));
  return NH_PER_AV * losAv * s;
}

describe('layered columns: the exact checks of the physics primer, section 11', () => {
  it('a constant abundance gives N = x N_H, for the slab and the sphere at any impact parameter', () => {
    const x = 3.7e-5;
    for (const geometry of [slab, { kind: 'sphere', impactParameter: 0 }, { kind: 'sphere', impactParameter: 0.6 }] as LayerGeometry[]) {
      for (const [av, step] of [[7.3, 0.5], [12, 1], [0.4, 0.5], [29.61, 0.25]]) {
        const nH = NH_PER_AV * av;
        expect(column(geometry, av, step, () => x)).toBeCloseTo(x * nH, -Math.floor(Math.log10(x * nH)) + 12);
        const { weights } = sightlineLayers(geometry, av, step);
        expect(weights.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 14);
      }
    }
  });

  it('a step in x at A_t on a cell edge gives the analytic slab sum 2 (N_H/A_V) [x0 A_t + x1 (A_V/2 - A_t)]', () => {
    const [x0, x1, at, step] = [1e-9, 1e-4, 3, 0.5];
    const x = (av: number) => (av < at ? x0 : x1);
    for (const av of [10, 13.7, 29.61]) {
      const analytic = 2 * NH_PER_AV * (x0 * at + x1 * (av / 2 - at));
      expect(column(slab, av, step, x) / analytic).toBeCloseTo(1, 12);
    }
    // A sightline that never reaches A_t holds only x0.
    expect(column(slab, 5, step, x) / (NH_PER_AV * 5 * x0)).toBeCloseTo(1, 12);
  });

  it('a step inside a cell is off by at most the midpoint rule bound: (x1 - x0) 2 (N_H/A_V) step/2', () => {
    const [x0, x1, at, step, av] = [0, 1e-4, 3.2, 0.5, 12];
    const analytic = 2 * NH_PER_AV * (x0 * at + x1 * (av / 2 - at));
    const err = Math.abs(column(slab, av, step, (a) => (a < at ? x0 : x1)) - analytic);
    expect(err).toBeGreaterThan(0);
    expect(err).toBeLessThanOrEqual((x1 - x0) * 2 * NH_PER_AV * (step / 2) * (1 + 1e-12));
  });

  it('sphere at impact parameter b: the share of the chord deeper than A_t is sqrt(r_t^2 - b^2)/sqrt(R^2 - b^2), r_t = R (1 - A_t/A_R) (geometry of a uniform sphere)', () => {
    const beta = 0.6;
    const losAv = 16; // chord through the sphere
    const aR = losAv / (2 * Math.sqrt(1 - beta * beta)); // = 10 mag radial
    expect(aR).toBeCloseTo(10, 12);
    const [at, step] = [2, 0.5];
    const rt = 1 - at / aR;
    const deepShare = Math.sqrt(rt * rt - beta * beta) / Math.sqrt(1 - beta * beta);
    const got = column({ kind: 'sphere', impactParameter: beta }, losAv, step, (a) => (a < at ? 0 : 1)) / (NH_PER_AV * losAv);
    expect(got).toBeCloseTo(deepShare, 12);
    // The chord's deepest point is at radius b: depth A_R (1 - beta) = 4 mag, so 8 cells.
    expect(sightlineLayers({ kind: 'sphere', impactParameter: beta }, losAv, step).cells.length).toBe(8);
  });

  it('a sphere seen through its centre has the weights of the slab', () => {
    const a = sightlineLayers(slab, 13.3, 0.5);
    const b = sightlineLayers({ kind: 'sphere', impactParameter: 0 }, 13.3, 0.5);
    expect(Array.from(b.cells)).toEqual(Array.from(a.cells));
    b.weights.forEach((w, i) => expect(w).toBeCloseTo(a.weights[i], 14));
  });

  it('cells are shared: the axis holds the cells of the deepest sightline, and each sightline uses a prefix of them', () => {
    const avs = [4.339, 10.56, 29.61];
    const values = layerAxisValues(slab, avs, 1);
    expect(values).toEqual(Array.from({ length: 15 }, (_, k) => k + 0.5));
    expect(binLineOfSightAv(29.61, 1)).toBe(30);
    expect(binLineOfSightAv(0.2, 1)).toBe(1);
  });
});

describe('the grid of a layered pipeline', () => {
  const spec = (visual: unknown, sightlineAv?: number[]): GridSpec => ({
    conditions: { density: [1e4, 1e5], visual_extinction: visual as never },
    exclude: [],
    sightlineAv,
    modelAvFraction: 0.5,
    locate: (path) => ({ file: 'p.yaml', field: path.join('.') }),
  });

  it('holds one model per (other conditions, cell): L cells of the deepest sightline, shared by all', () => {
    const grid = expandGrid(spec({ layers: 'slab', step: 1 }, [4.3, 10.6, 13.2]));
    const axis = grid.axes.find((a) => a.name === 'visual_extinction')!;
    expect(axis.kind).toBe('layers');
    expect(axis.values).toEqual([0.5, 1.5, 2.5, 3.5, 4.5, 5.5, 6.5]);
    expect(grid.points.length).toBe(2 * 7);
  });

  it('refuses layers on another condition, an impact parameter on a slab, and a grazing sphere', () => {
    expect(() => expandGrid({ ...spec(1, [5]), conditions: { density: { layers: 'slab' } as never } })).toThrow(/only visual_extinction can run through layers/);
    expect(() => expandGrid(spec({ layers: 'slab', impact_parameter: 0.3 }, [5]))).toThrow(/a slab has no impact parameter/);
    expect(() => expandGrid(spec({ layers: 'sphere', impact_parameter: 0.99 }, [5]))).toThrow(/at most 0.95/);
    expect(() => expandGrid(spec({ layers: 'slab' }))).toThrow(/has no observations/);
  });
});

describe('layeredCandidates: columns from the layer models of a store', () => {
  /** A table of layer models: two densities, cells of 0.5 mag to 6 mag, 2 times, 2 species with x(A_V) a step at 3 mag for species 0 and constant for species 1. */
  function table(): CandidateTable {
    const step = 0.5;
    const cells = Array.from({ length: 12 }, (_, k) => cellAv(k, step));
    const densities = [1e4, 1e5];
    const np = CONDITION_NAMES.length;
    const parameters: number[] = [];
    const abundances: number[] = [];
    const modelIds: string[] = [];
    for (const n of densities) {
      for (const av of cells) {
        for (const name of CONDITION_NAMES) parameters.push(name === 'density' ? n : name === 'visual_extinction' ? av : CONDITIONS[name].default);
        modelIds.push(`p${modelIds.length}`);
        for (let t = 0; t < 2; t++) abundances.push(av < 3 ? 0 : (t + 1) * 1e-4 * (n / 1e4), 2e-5);
      }
    }
    expect(parameters.length).toBe(np * 24);
    return {
      parameterNames: [...CONDITION_NAMES],
      nModels: 24,
      nTimes: 2,
      nSpecies: 2,
      parameters: Float64Array.from(parameters),
      modelIds,
      timesYr: Float64Array.of(1e5, 1e6),
      species: ['H2O(s)', 'CO'],
      abundances: Float64Array.from(abundances),
    };
  }

  it('gives each (other conditions, line-of-sight A_V) the column-averaged abundance: the analytic step sum over N_H', () => {
    const { table: t, warnings } = layeredCandidates(table(), { geometry: slab, step: 0.5 }, [8, 12]);
    expect(warnings).toEqual([]);
    expect(t.nModels).toBe(4);
    const np = t.parameterNames.length;
    const av = t.parameterNames.indexOf('visual_extinction');
    const dens = t.parameterNames.indexOf('density');
    for (let m = 0; m < 4; m++) {
      const losAv = t.parameters[m * np + av];
      const n = t.parameters[m * np + dens];
      for (let time = 0; time < 2; time++) {
        const x1 = (time + 1) * 1e-4 * (n / 1e4);
        // <x> = 2 [0 * 3 + x1 (A_V/2 - 3)] / A_V
        expect(t.abundances[(m * 2 + time) * 2]).toBeCloseTo((2 * x1 * (losAv / 2 - 3)) / losAv, 15);
        expect(t.abundances[(m * 2 + time) * 2 + 1]).toBeCloseTo(2e-5, 18);
      }
      expect(t.modelIds[m]).toMatch(/^c[0-9a-f]{16}$/);
    }
  });

  it('leaves out, with a warning, a column whose layers the store lacks', () => {
    const { table: t, warnings } = layeredCandidates(table(), { geometry: slab, step: 0.5 }, [8, 14]);
    expect(t.nModels).toBe(2);
    expect(warnings).toEqual(['2 column(s) at line-of-sight A_V = 14 mag left out: one of their layer models failed or is missing from the store.']);
  });
});
