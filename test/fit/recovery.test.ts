/**
 * Recovery of known parameters from synthetic observations drawn from a
 * model of a small invented grid, with seeded Gaussian noise at the stated
 * errors (a coverage check of the Delta chi^2 regions, Avni 1976: a 95.4%
 * region should hold the truth in about 95 of 100 draws).
 */
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import type { ObservedQuantity } from '../../src/obs/types.ts';
import { analyticAbundances, detection, gaussian, logSpaced, observationSet, seededRandom, syntheticTable } from './synthetic.ts';

const DENSITIES = logSpaced(1e3, 1e6, 10);
const TIMES = logSpaced(1e4, 1e7, 16);
const SIGMA_DEX = 0.15;
const DRAWS = 100;

/** Observed quantities of a sightline from a true (density, time): X(H2O(s)) and four ratios to H2O(s), each with noise `sigma` times a unit deviate. */
function drawQuantities(id: string, n: number, t: number, noise: () => number, sigma = SIGMA_DEX): ObservedQuantity[] {
  const x = analyticAbundances(n, t).map(Math.log10);
  return [
    detection(id, 'H2O(s)', x[0] + sigma * noise(), sigma),
    detection(id, 'CO(s)', x[1] - x[0] + sigma * noise(), sigma, 'H2O(s)'),
    detection(id, 'CO2(s)', x[2] - x[0] + sigma * noise(), sigma, 'H2O(s)'),
    detection(id, 'CH3OH(s)', x[3] - x[0] + sigma * noise(), sigma, 'H2O(s)'),
    detection(id, 'CO', x[4] - x[0] + sigma * noise(), sigma, 'H2O(s)'),
  ];
}

// Truths on grid values, regions read on the grid's own cells: no sub-grid mesh (coverage.test.ts tests the mesh).
const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], model_sigma_dex: 0, refine: 1 });
const table = syntheticTable({ densities: DENSITIES, times: TIMES });

describe('recovery on a synthetic grid', () => {
  it('without noise the best fit is exactly the true model, with chi2 = 0', () => {
    const ids = ['p1', 'p2', 'p3'];
    const truths = [[2, 5], [6, 11], [9, 0]];
    const quantities = ids.flatMap((id, i) => drawQuantities(id, DENSITIES[truths[i][0]], TIMES[truths[i][1]], () => 0));
    const { result } = runFitStage({ table, section, observations: observationSet(ids), quantities });
    result.fits.forEach((f, i) => {
      expect(f.best.parameters.density).toBe(DENSITIES[truths[i][0]]);
      expect(f.best.ageYr).toBe(TIMES[truths[i][1]]);
      expect(f.best.chi2).toBeCloseTo(0, 20);
      expect(f.pValue).toBeCloseTo(1, 12);
      expect(f.agreementFraction).toBe(1);
    });
  });

  it('the true (density, age) lies inside the 95.4% region in at least 90 of 100 seeded draws', () => {
    const random = seededRandom(20240611);
    const noise = () => gaussian(random);
    const ids: string[] = [];
    const truth: [number, number][] = [];
    const quantities: ObservedQuantity[] = [];
    for (let d = 0; d < DRAWS; d++) {
      const i = Math.floor(random() * DENSITIES.length);
      const k = Math.floor(random() * TIMES.length);
      const id = `draw${d}`;
      ids.push(id);
      truth.push([i, k]);
      quantities.push(...drawQuantities(id, DENSITIES[i], TIMES[k], noise));
    }
    const { result, profiles } = runFitStage({ table, section, observations: observationSet(ids), quantities });
    // The 2-D region of density and age jointly: p = 2 (Avni 1976), whatever p the intervals use.
    const level = result.regionLevels!.find((l) => l.level === 0.954)!;
    expect(level.parametersOfInterest).toBe(2);
    let covered = 0;
    let cellsInside = 0;
    profiles.sightlines.forEach((p, d) => {
      const pair = p.pairs[0];
      expect([pair.x, pair.y]).toEqual(['density', 'age_yr']);
      const [i, k] = truth[d];
      const delta = pair.deltaChi2[k * pair.xValues.length + i]!;
      if (delta <= level.deltaChi2) covered++;
      cellsInside += pair.deltaChi2.filter((v) => v !== null && v <= level.deltaChi2).length / pair.deltaChi2.length;
    });
    expect(covered).toBeGreaterThanOrEqual(90);
    // The regions must also be informative: on average they hold well under half of the grid.
    expect(cellsInside / DRAWS).toBeLessThan(0.3);
  });
});
