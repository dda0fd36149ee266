import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { intervalFromProfile } from '../../src/fit/intervals.ts';
import { intervalReading, levelStatement } from '../../src/fit/regions.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import type { Profile1D, RegionLevel } from '../../src/fit/types.ts';
import { analyticAbundances, detection, logSpaced, observationSet, SPECIES, syntheticTable } from './synthetic.ts';

const LEVEL: RegionLevel = { level: 0.683, parametersOfInterest: 2, deltaChi2: 2.3 };

function profile(delta: (number | null)[]): Profile1D {
  return { parameter: 'density', values: delta.map((_, i) => 10 ** (3 + i)), chi2Min: delta.map((d) => (d === null ? null : d + 5)), deltaChi2: delta };
}

describe('intervals from a profile (sub-grid reading)', () => {
  it('is exact for a parabolic profile: vertex and bounds between grid values (u = log10 value)', () => {
    // chi^2(u) = 5 + ((u - 5.3) / 0.4)^2 at u = 3..7: the Gaussian case, minimum between two grid values.
    const values = [3, 4, 5, 6, 7].map((u) => 10 ** u);
    const chi2 = [3, 4, 5, 6, 7].map((u) => 5 + ((u - 5.3) / 0.4) ** 2);
    const p: Profile1D = { parameter: 'density', values, chi2Min: chi2, deltaChi2: chi2.map((c) => c - Math.min(...chi2)) };
    const one: RegionLevel = { level: 0.683, parametersOfInterest: 1, deltaChi2: 1 };
    const iv = intervalFromProfile(p, 1e5, one);
    expect(Math.log10(iv.best)).toBeCloseTo(5.3, 12);
    expect(Math.log10(iv.lo)).toBeCloseTo(4.9, 12);
    expect(Math.log10(iv.hi)).toBeCloseTo(5.7, 12);
    expect(iv.bestNode).toBe(1e5);
    // One grid value (1e5) inside: narrower than the grid, flagged, with the grid's own bounds beside it.
    expect([iv.unresolved, iv.nodeLo, iv.nodeHi]).toEqual([true, 1e4, 1e6]);
    const wide = intervalFromProfile(p, 1e5, LEVEL);
    expect(Math.log10(wide.lo)).toBeCloseTo(5.3 - 0.4 * Math.sqrt(2.3), 12);
    expect(Math.log10(wide.hi)).toBeCloseTo(5.3 + 0.4 * Math.sqrt(2.3), 12);
  });

  it('the vertex is the parabola through the lowest value and its neighbours (Numerical Recipes 10.2.1)', () => {
    // Through (3, 3), (4, 0), (5, 4): 3.5 (u - 4)^2 + 0.5 (u - 4), vertex at u = 4 - 1/14.
    const split = intervalFromProfile(profile([3, 0, 4, 2, 9]), 1e4, LEVEL);
    expect(Math.log10(split.best)).toBeCloseTo(4 - 1 / 14, 12);
    expect([split.nodeLo, split.nodeHi, split.disjoint]).toEqual([1e3, 1e7, true]);
    expect(split.lo).toBeGreaterThan(1e3);
    expect(split.lo).toBeLessThan(1e4);
    expect(split.hi).toBeGreaterThan(1e6);
    expect(split.hi).toBeLessThan(1e7);
  });

  it('flags the grid edges, a single value, and skips missing cells', () => {
    const iv = intervalFromProfile(profile([9, 2, 0, 1.5, 7]), 1e5, LEVEL);
    expect([iv.nodeLo, iv.nodeHi, iv.loAtEdge, iv.hiAtEdge, iv.disjoint, iv.unresolved, iv.fixed]).toEqual([1e3, 1e7, false, false, false, false, false]);
    const edge = intervalFromProfile(profile([0, 1, 5]), 1e3, LEVEL);
    expect([edge.loAtEdge, edge.hiAtEdge, edge.lo, edge.best]).toEqual([true, false, 1e3, 1e3]);
    const single = intervalFromProfile(profile([8, 0, 8]), 1e4, LEVEL);
    expect([single.best, single.unresolved, single.nodeLo, single.nodeHi]).toEqual([1e4, true, 1e3, 1e5]);
    // Symmetric: the bounds where sqrt(Delta chi^2) reaches sqrt(2.3) on the line from 0 to sqrt(8).
    expect(Math.log10(single.hi) - 4).toBeCloseTo(Math.sqrt(2.3 / 8), 12);
    // A missing cell (null) is never inside, even though null <= 2.3 in JavaScript.
    const holes = intervalFromProfile(profile([null, 0, null]), 1e4, LEVEL);
    expect([holes.lo, holes.hi]).toEqual([1e4, 1e4]);
    const fixed = intervalFromProfile(profile([0]), 1e3, LEVEL);
    expect([fixed.fixed, fixed.loAtEdge, fixed.hiAtEdge, fixed.unresolved]).toEqual([true, false, false, false]);
  });

  it('values without a candidate (null: excluded models) are untested: the edges are the outermost values with one, and a gap does not split a region', () => {
    // Only the middle value has models open to the sightline: the grid, not the data, bounds it on both sides.
    const lone = intervalFromProfile(profile([null, 0, null]), 1e4, LEVEL);
    expect([lone.loAtEdge, lone.hiAtEdge]).toEqual([true, true]);
    // Excluded models above 1e5: a region reaching 1e5 reaches the grid's edge for this sightline.
    const cut = intervalFromProfile(profile([9, 2, 0, null, null]), 1e5, LEVEL);
    expect([cut.nodeLo, cut.hi, cut.loAtEdge, cut.hiAtEdge]).toEqual([1e3, 1e5, false, true]);
    // A value without models between two inside the region is a hole in the grid, not a value outside the region.
    const gap = intervalFromProfile(profile([9, 0, null, 0.5, 9]), 1e4, LEVEL);
    expect([gap.nodeLo, gap.nodeHi, gap.disjoint, gap.loAtEdge, gap.hiAtEdge]).toEqual([1e3, 1e7, false, false, false]);
    const split = intervalFromProfile(profile([9, 0, null, 5, 1, 9]), 1e4, LEVEL);
    expect(split.disjoint).toBe(true);
  });
});

describe('fit section defaults', () => {
  it('model floor 0.3 dex, levels 68.3% and 95.4%, one parameter of interest for intervals, density x age pair', () => {
    const s = fitSection.parse({ quantities: [{ species: 'CO(s)' }] });
    expect(s.model_sigma_dex).toBe(0.3);
    expect(s.levels).toEqual([0.683, 0.954]);
    expect(s.parameters_of_interest).toBe(1);
    expect(s.pairs).toEqual([['density', 'age_yr']]);
    expect(s.agreement_factor).toBe(10);
    expect(s.limits_in_dof).toBe(false);
    expect(s.quantities[0].as).toBe('ratio');
    expect(fitSection.safeParse({ quantities: [] }).success).toBe(false);
    expect(fitSection.safeParse({ quantities: [{ species: 'CO(s)' }], levels: [1.2] }).success).toBe(false);
  });

  it('by default intervals use the one-parameter thresholds (Avni 1976: 1.00 at 68.3%) and the 2-D regions the two-parameter ones (2.30, 6.18)', () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 5), times: logSpaced(1e4, 1e7, 6) });
    const x = analyticAbundances(1e4, 1e5).map(Math.log10);
    const q = SPECIES.map((s, j) => detection('s', s, x[j], 0.2));
    const { result } = runFitStage({ table, section: fitSection.parse({ quantities: [{ species: 'CO(s)' }] }), observations: observationSet(['s']), quantities: q });
    expect(result.levels.every((l) => l.parametersOfInterest === 1)).toBe(true);
    expect(result.fits[0].intervals.every((iv) => iv.parametersOfInterest === 1)).toBe(true);
    // For 2 dof the quantile is -2 ln(1 - L) (closed form): 2.2977 and 6.1582 at the rounded levels.
    expect(result.regionLevels!.map((l) => Number(l.deltaChi2.toFixed(2)))).toEqual([2.3, 6.16]);
    // For 1 dof the quantile is z^2 with Phi(z) = (1 + L)/2: z = 1.0006 at 0.683 and 1.9954 at 0.954
    // (NIST/SEMATECH e-Handbook normal table, 1.3.6.7.1: Phi(1.00) = 0.84134, Phi(2.00) = 0.97725).
    expect(result.levels.map((l) => Number(l.deltaChi2.toFixed(2)))).toEqual([1.0, 3.98]);
  });

  it('parameters_of_interest: 2 keeps the projected reading, and says so', () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 5), times: logSpaced(1e4, 1e7, 6) });
    const x = analyticAbundances(1e4, 1e5).map(Math.log10);
    const q = SPECIES.map((s, j) => detection('s', s, x[j], 0.2));
    const { result } = runFitStage({ table, section: fitSection.parse({ quantities: [{ species: 'CO(s)' }], parameters_of_interest: 2 }), observations: observationSet(['s']), quantities: q });
    expect(result.levels.map((l) => Number(l.deltaChi2.toFixed(2)))).toEqual([2.3, 6.16]);
    expect(levelStatement(result.levels[0])).toBe('68.3%, Delta chi2 <= 2.30, projected from the 2-parameter region');
    expect(intervalReading(1)).toBe('one-parameter');
  });
});

describe('joint fit sharing density', () => {
  it('recovers the shared density with the ages free', () => {
    const densities = logSpaced(1e3, 1e6, 7);
    const times = logSpaced(1e4, 1e7, 10);
    const table = syntheticTable({ densities, times });
    const q = [2, 5, 8].flatMap((k, m) => {
      const x = analyticAbundances(densities[3], times[k]).map(Math.log10);
      return SPECIES.map((s, j) => detection(`m${m}`, s, x[j], 0.1));
    });
    const section = fitSection.parse({ quantities: [{ species: 'CO(s)' }], joint: [{ name: 'core', sightlines: ['m0', 'm1', 'm2'], share: 'density' }] });
    const j = runFitStage({ table, section, observations: observationSet(['m0', 'm1', 'm2']), quantities: q }).result.joint[0];
    expect(j.sharedBest).toEqual({ density: densities[3] });
    expect(j.memberFits.map((m) => m.best.ageYr)).toEqual([times[2], times[5], times[8]]);
    expect(j.intervals.every((iv) => iv.parameter === 'density')).toBe(true);
  });
});
