import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import { FIT_OUTPUT_FILES } from '../../src/fit/types.ts';
import type { ObservationSet, ObservedQuantity, Sightline } from '../../src/obs/types.ts';
import { analyticAbundances, detection, gaussian, limit, logSpaced, observationSet, seededRandom, SPECIES, syntheticTable, withoutModels } from './synthetic.ts';

const DENSITIES = logSpaced(1e3, 1e6, 7);
const TIMES = logSpaced(1e4, 1e7, 12);
const NX = 5;
const NY = 4;

function mapSet(ids: string[]): ObservationSet {
  const sightlines: Sightline[] = ids.map((id, i) => ({ id, pixel: { x: i % NX, y: Math.floor(i / NX) }, columns: {}, source: { file: 'invented-map.fits' } }));
  return { file: 'invented-map.fits', kind: 'map', sightlines, map: { nx: NX, ny: NY, wcs: {} }, warnings: [] };
}

/** Pixel quantities from a smooth invented pattern of density and age, with noise, one limit, and blank pixels. */
function pixelQuantities(seed: number): { ids: string[]; quantities: ObservedQuantity[] } {
  const random = seededRandom(seed);
  const ids: string[] = [];
  const quantities: ObservedQuantity[] = [];
  for (let y = 0; y < NY; y++) {
    for (let x = 0; x < NX; x++) {
      const id = `${x},${y}`;
      ids.push(id);
      if (x === 0 && y === 0) continue; // a blank pixel
      const n = DENSITIES[(x + y) % DENSITIES.length];
      const t = TIMES[(2 * x + y) % TIMES.length];
      const v = analyticAbundances(n, t).map(Math.log10);
      quantities.push(detection(id, 'H2O(s)', v[0] + 0.1 * gaussian(random), 0.1));
      quantities.push({ ...detection(id, 'CO(s)', v[1] - v[0] + 0.15 * gaussian(random), 0.15, 'H2O(s)'), sigmaHiDex: 0.25 });
      if (x !== 3) quantities.push(detection(id, 'CH3OH(s)', v[3] - v[0] + 0.2 * gaussian(random), 0.2, 'H2O(s)'));
      quantities.push(x % 2 === 0 ? limit(id, 'upper', 'CO', v[4] + 0.3) : detection(id, 'CO', v[4] + 0.1 * gaussian(random), 0.1));
    }
  }
  return { ids, quantities };
}

describe('map fit', () => {
  const table = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: [0.5, 1, 2] });
  // The grid's own candidates (no sub-grid mesh, which maps do not use), so the two fits score the same candidates.
  const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], refine: 1 });

  it('streams to the same best fits and 68.3% bounds as the per-sightline fit', () => {
    const { ids, quantities } = pixelQuantities(5);
    const map = runFitStage({ table, section, observations: mapSet(ids), quantities });
    const one = runFitStage({ table, section, observations: observationSet(ids), quantities });
    const im = map.map!.images;
    expect(map.map!.fittedPixels).toBe(NX * NY - 1);
    expect(Number.isNaN(im.best_chi2[0])).toBe(true);
    for (const f of one.result.fits) {
      const [x, y] = f.sightline.split(',').map(Number);
      const i = y * NX + x;
      expect(im.best_chi2[i]).toBeCloseTo(f.best.chi2, 10);
      expect(im.best_density[i]).toBe(f.best.parameters.density);
      expect(im.best_age_yr[i]).toBe(f.best.ageYr);
      // The same candidate, also where candidates tie: pixels without CH3OH(s) (x = 3) cannot tell the UV fields apart.
      expect(map.map!.bestCandidate[i], f.sightline).toBe(f.best.modelIndex * table.nTimes + f.best.timeIndex);
      expect(im.p_value[i]).toBeCloseTo(f.pValue, 12);
      expect(im.dof[i]).toBe(f.dof);
      const d = f.intervals.find((iv) => iv.parameter === 'density' && iv.level === 0.683)!;
      const a = f.intervals.find((iv) => iv.parameter === 'age_yr' && iv.level === 0.683)!;
      // The map keeps each profile exact to 4 thresholds above its minimum; a grid value beyond is taken
      // at that depth, so a bound there is at most as tight as the per-sightline fit's, never beyond the grid's own.
      for (const [lo, hi, iv] of [[im.density_lo[i], im.density_hi[i], d], [im.age_lo_yr[i], im.age_hi_yr[i], a]] as const) {
        expect(lo).toBeLessThanOrEqual(iv.lo * (1 + 1e-12));
        expect(hi).toBeGreaterThanOrEqual(iv.hi * (1 - 1e-12));
        expect(lo).toBeGreaterThanOrEqual(iv.nodeLo! * (1 - 1e-12));
        expect(hi).toBeLessThanOrEqual(iv.nodeHi! * (1 + 1e-12));
      }
      expect(im.density_width_dex[i]).toBeCloseTo(Math.log10(im.density_hi[i] / im.density_lo[i]), 12);
      expect(im.unresolved[i]).toBe(d.unresolved || a.unresolved ? 1 : 0);
      expect(im.at_edge[i]).toBe(d.loAtEdge || d.hiAtEdge || a.loAtEdge || a.hiAtEdge ? 1 : 0);
    }
    const json = JSON.parse(map.files[FIT_OUTPUT_FILES.mapJson]);
    expect(json.images.best_chi2[0]).toBeNull();
    expect(json.images.best_density.length).toBe(NX * NY);
    expect(map.files[FIT_OUTPUT_FILES.bestFitsCsv].trim().split('\n').length).toBe(NX * NY);
    expect(map.result.warnings.some((w) => w.includes('1 of 20 map pixels have no usable quantity'))).toBe(true);
    // Pixels with x even have three detections (and a limit) for three fitted parameters: dof raised to 1, as the per-sightline fit warns.
    const floored = one.result.fits.filter((f) => f.warnings.some((w) => w.includes('dof raised to 1'))).length;
    expect(floored).toBeGreaterThan(0);
    expect(map.result.warnings).toContain(`${floored} of 19 fitted pixels have fewer counted quantities than the 3 fitted parameters plus one: their dof is raised to 1 (the dof image), so their p-values do not test the fit.`);
  });

  it('pixels held at their own A_V see only the models of that A_V', () => {
    const { ids, quantities } = pixelQuantities(6);
    const held = Object.fromEntries(ids.map((id, i) => [id, { uv_field: [0.5, 1, 2][i % 3] }]));
    const map = runFitStage({ table, section, observations: mapSet(ids), quantities, held });
    const one = runFitStage({ table, section, observations: observationSet(ids), quantities, held });
    for (const f of one.result.fits) {
      const [x, y] = f.sightline.split(',').map(Number);
      expect(map.map!.images.best_chi2[y * NX + x]).toBeCloseTo(f.best.chi2, 10);
      expect(f.best.parameters.uv_field).toBe(held[f.sightline].uv_field);
    }
  });

  it('grid exclusions: a 68.3% region reaching the highest density open to a held pixel is at the edge, as in the per-sightline fit', () => {
    // No models above DENSITIES[3] at uv_field 2 (as an exclusion rule leaves a grid); pixels held at uv_field 2 whose truth is DENSITIES[3].
    const cut = withoutModels(table, (p) => p.uv_field === 2 && p.density > DENSITIES[3] * 1.0001);
    const ids = ['0,0', '1,0', '2,0'];
    const quantities = ids.flatMap((id, k) => {
      const v = analyticAbundances(DENSITIES[3], TIMES[3 + 3 * k], 2).map(Math.log10);
      return SPECIES.map((s, j) => detection(id, s, v[j], 0.1));
    });
    const held = Object.fromEntries(ids.map((id) => [id, { uv_field: 2 }]));
    const map = runFitStage({ table: cut, section, observations: mapSet(ids), quantities, held });
    const one = runFitStage({ table: cut, section, observations: observationSet(ids), quantities, held });
    for (const f of one.result.fits) {
      const d = f.intervals.find((iv) => iv.parameter === 'density' && iv.level === 0.683)!;
      expect([d.best, d.hi, d.hiAtEdge], f.sightline).toEqual([DENSITIES[3], DENSITIES[3], true]);
      const i = Number(f.sightline.split(',')[0]);
      expect(map.map!.images.density_hi[i]).toBe(DENSITIES[3]);
      expect(map.map!.images.at_edge[i], f.sightline).toBe(1);
    }
    expect(one.result.warnings.some((w) => w.includes('interval of density reaches the grid') && w.includes('upper edge'))).toBe(true);
  });

  it('of candidates with equal chi2 the map keeps the first, as the per-sightline fit does, also past its sparse first pass', () => {
    // 5 x 7 models x 31 times = 1085 candidates: the first pass visits every second one. Without CH3OH(s)
    // the UV fields tie exactly, and with an odd number of times the tied candidates alternate in parity.
    const big = syntheticTable({ densities: DENSITIES, times: logSpaced(1e4, 1e7, 31), uvFields: [0.5, 1, 2, 4, 8] });
    const ids = ['0,0', '1,0', '2,0', '3,0', '4,0', '0,1', '1,1', '2,1'];
    const quantities = ids.flatMap((id, k) => {
      const v = analyticAbundances(DENSITIES[k % 7], 10 ** (4 + 0.37 * k)).map(Math.log10);
      return [detection(id, 'H2O(s)', v[0], 0.1), detection(id, 'CO(s)', v[1] - v[0], 0.1, 'H2O(s)'), detection(id, 'CO2(s)', v[2] - v[0], 0.1, 'H2O(s)')];
    });
    const map = runFitStage({ table: big, section, observations: mapSet(ids), quantities });
    const one = runFitStage({ table: big, section, observations: observationSet(ids), quantities });
    one.result.fits.forEach((f, k) => {
      expect(map.map!.bestCandidate[k], f.sightline).toBe(f.best.modelIndex * big.nTimes + f.best.timeIndex);
      expect(map.map!.images.best_chi2[k]).toBe(f.best.chi2);
    });
  });

  it('upper and lower limits score to the same chi2 to the last bit in the map and in the per-sightline fit', () => {
    const ids = ['0,0', '1,0', '2,0', '3,0'];
    const quantities = ids.flatMap((id, k) => {
      const v = analyticAbundances(DENSITIES[2 + k], TIMES[4 + k]).map(Math.log10);
      return [
        detection(id, 'H2O(s)', v[0] + 0.05, 0.1),
        detection(id, 'CO(s)', v[1] - v[0] - 0.1, 0.15, 'H2O(s)'),
        limit(id, 'upper', 'CO', v[4] - 0.2),
        limit(id, 'lower', 'CH3OH(s)', v[3] - v[0] + 0.1 * k, 'H2O(s)'),
      ];
    });
    const map = runFitStage({ table, section, observations: mapSet(ids), quantities });
    const one = runFitStage({ table, section, observations: observationSet(ids), quantities });
    one.result.fits.forEach((f, k) => {
      expect([f.counts.upperLimits, f.counts.lowerLimits]).toEqual([1, 1]);
      expect(map.map!.images.best_chi2[k]).toBe(f.best.chi2);
      expect(map.map!.bestCandidate[k]).toBe(f.best.modelIndex * table.nTimes + f.best.timeIndex);
    });
  });

  it('a map with no valid pixel is a clear error', () => {
    const ids = ['0,0', '1,0'];
    // Pixels carry only a species the fit does not use.
    expect(() => runFitStage({ table, section, observations: mapSet(ids), quantities: [] })).toThrow(/no sightline of invented-map.fits has a value/);
    const blank = ids.map((id) => ({ ...detection(id, SPECIES[0], Number.NaN, 0.1) }));
    expect(() => runFitStage({ table, section, observations: mapSet(ids), quantities: blank })).toThrow(/no pixel of the 5 x 4 map has a usable value/);
  });
});
