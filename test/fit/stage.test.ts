import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { fitSection } from '../../src/config/sections/fit.ts';
import { buildAxes } from '../../src/fit/axes.ts';
import { chiSquarePValue } from '../../src/fit/chi-square.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import { FIT_OUTPUT_FILES, type CandidateTable, type SightlineFit } from '../../src/fit/types.ts';
import type { ObservedQuantity } from '../../src/obs/types.ts';
import { analyticAbundances, detection, gaussian, limit, logSpaced, observationSet, seededRandom, SPECIES, syntheticTable } from './synthetic.ts';

const DENSITIES = logSpaced(1e3, 1e6, 7);
const TIMES = logSpaced(1e4, 1e7, 10);
const UV = [0.5, 1, 2];

function abundanceQuantities(id: string, n: number, t: number, sigma: number, noise: () => number = () => 0, uv = 1): ObservedQuantity[] {
  const x = analyticAbundances(n, t, uv).map(Math.log10);
  return SPECIES.map((s, j) => detection(id, s, x[j] + sigma * noise(), sigma));
}

/** The grid's own candidates unless a test asks for the sub-grid mesh: these tests check the scoring on known grid values. */
function parse(extra: Record<string, unknown> = {}) {
  return fitSection.parse({ quantities: [{ species: 'CO(s)' }], refine: 1, ...extra });
}

describe('profiles, intervals and degrees of freedom', () => {
  const table = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: UV });
  const random = seededRandom(7);
  const quantities = abundanceQuantities('s1', DENSITIES[3], TIMES[5], 0.1, () => gaussian(random));
  const { result, profiles, files } = runFitStage({ table, section: parse(), observations: observationSet(['s1']), quantities });
  const fit = result.fits[0];

  it('counts fitted parameters and degrees of freedom', () => {
    expect(result.fittedParameters).toEqual(['density', 'uv_field', 'age_yr']);
    expect(result.fixedParameters).toEqual({ gas_temperature: 10 });
    expect(fit.fittedParameters).toBe(3);
    expect(fit.dof).toBe(5 - 3);
    expect(fit.reducedChi2).toBeCloseTo(fit.best.chi2 / 2, 12);
    expect(fit.pValue).toBeCloseTo(chiSquarePValue(fit.best.chi2, 2), 12);
  });

  it('each 1-D profile is the minimum of chi2 over all other parameters (brute force)', () => {
    const p = profiles.sightlines[0];
    const density = p.profiles.find((q) => q.parameter === 'density')!;
    expect(density.values).toEqual(DENSITIES);
    // Brute force: refit with density held to each value via a one-density table.
    DENSITIES.forEach((n, i) => {
      const sub = syntheticTable({ densities: [n], times: TIMES, uvFields: UV });
      const one = runFitStage({ table: sub, section: parse(), observations: observationSet(['s1']), quantities }).result.fits[0];
      expect(density.chi2Min[i]).toBeCloseTo(one.best.chi2, 10);
    });
    expect(Math.min(...(density.deltaChi2 as number[]))).toBe(0);
    const pair = p.pairs[0];
    expect(pair.chi2Min.length).toBe(DENSITIES.length * TIMES.length);
    // The 2-D profile minimised over age gives back the 1-D density profile.
    DENSITIES.forEach((_, i) => {
      const column = TIMES.map((_, k) => pair.chi2Min[k * DENSITIES.length + i]!);
      expect(Math.min(...column)).toBeCloseTo(density.chi2Min[i]!, 12);
    });
  });

  it('intervals hold the best value, are nested by level and flag the grid edge', () => {
    for (const name of ['density', 'age_yr']) {
      const [a, b] = [0.683, 0.954].map((l) => fit.intervals.find((iv) => iv.parameter === name && iv.level === l)!);
      expect(a.lo).toBeLessThanOrEqual(a.best);
      expect(a.hi).toBeGreaterThanOrEqual(a.best);
      expect(b.lo).toBeLessThanOrEqual(a.lo);
      expect(b.hi).toBeGreaterThanOrEqual(a.hi);
      // One parameter of interest (the default): z^2 with Phi(z) = (1 + 0.683)/2, z = 1.00064
      // (NIST/SEMATECH e-Handbook normal table, 1.3.6.7.1: Phi(1.00) = 0.84134).
      expect(a.deltaChi2Threshold).toBeCloseTo(1.0013, 3);
      expect(a.parametersOfInterest).toBe(1);
    }
    // The uv_field axis is only weakly constrained by one species: its region runs to both grid edges.
    const uv = fit.intervals.find((iv) => iv.parameter === 'uv_field' && iv.level === 0.954)!;
    expect(uv.loAtEdge && uv.hiAtEdge).toBe(true);
    expect(fit.warnings.some((w) => w.includes('uv_field') && w.includes('the truth may lie outside the grid'))).toBe(true);
  });

  it('runner-ups lie within the 68.3% threshold, sorted, best excluded', () => {
    const threshold = result.levels[0].deltaChi2;
    expect(fit.candidatesInRegion).toBeGreaterThanOrEqual(fit.runnerUps.length + 1);
    let last = 0;
    for (const r of fit.runnerUps) {
      expect(r.deltaChi2).toBeLessThanOrEqual(threshold);
      expect(r.deltaChi2).toBeGreaterThanOrEqual(last);
      expect(r.modelId === fit.best.modelId && r.timeIndex === fit.best.timeIndex).toBe(false);
      last = r.deltaChi2;
    }
  });

  it('writes best_fits.csv with the columns of the issue and JSON without Infinity/NaN', () => {
    const csv = files[FIT_OUTPUT_FILES.bestFitsCsv].trim().split('\n');
    const header = csv[0].split(',');
    for (const col of ['sightline', 'density', 'age_yr', 'chi2', 'dof', 'p_value', 'density_lo', 'density_hi', 'age_lo_yr', 'age_hi_yr', 'uv_field', 'uv_field_lo', 'uv_field_hi', 'gas_temperature']) {
      expect(header).toContain(col);
    }
    const row = csv[1].split(',');
    const at = (c: string) => row[header.indexOf(c)];
    expect(Number(at('density'))).toBe(fit.best.parameters.density);
    expect(Number(at('density_lo'))).toBe(fit.intervals.find((iv) => iv.parameter === 'density' && iv.level === 0.683)!.lo);
    expect(Number(at('dof'))).toBe(2);
    const parsed = JSON.parse(files[FIT_OUTPUT_FILES.fitJson]);
    expect(parsed.fits[0].best.chi2).toBe(fit.best.chi2);
    expect(JSON.parse(files[FIT_OUTPUT_FILES.profilesJson]).sightlines[0].pairs[0].x).toBe('density');
    expect(result.cautions.length).toBeGreaterThan(0);
  });

  it('a quantity may set its own model floor', () => {
    const section = parse({ quantities: [{ species: 'CO', as: 'abundance', model_sigma_dex: 0.7 }] });
    const out = runFitStage({ table, section, observations: observationSet(['s1']), quantities }).result.fits[0];
    const sigma = (label: string) => out.residuals.find((r) => r.label === label)!.sigmaDex;
    // sqrt(0.1^2 + 0.7^2) for X(CO), sqrt(0.1^2 + 0.3^2) for the rest (the default floor).
    expect(sigma('X(CO)')).toBeCloseTo(Math.hypot(0.1, 0.7), 12);
    expect(sigma('X(CO(s))')).toBeCloseTo(Math.hypot(0.1, 0.3), 12);
  });

  it('a floor set on a ratio applies to the term of its own reference alone', () => {
    const x = analyticAbundances(DENSITIES[3], TIMES[5]).map(Math.log10);
    // SPECIES order: H2O(s), CO(s), CO2(s), CH3OH(s), CO.
    const ratios = [detection('s1', 'CH3OH(s)', x[3] - x[1], 0.1, 'CO(s)'), detection('s1', 'CH3OH(s)', x[3] - x[0], 0.1, 'H2O(s)'), detection('s1', 'CO', x[4], 0.1)];
    const sigmas = (quantities: Record<string, unknown>[]) => {
      const out = runFitStage({ table, section: parse({ quantities }), observations: observationSet(['s1']), quantities: ratios }).result.fits[0];
      return Object.fromEntries(out.residuals.map((r) => [r.label, r.sigmaDex]));
    };
    const own = sigmas([{ species: 'CH3OH(s)', as: 'ratio', reference: 'CO(s)', model_sigma_dex: 0.7 }, { species: 'CH3OH(s)', as: 'ratio' }, { species: 'CO', as: 'abundance' }]);
    expect(own['CH3OH(s)/CO(s)']).toBeCloseTo(Math.hypot(0.1, 0.7), 12);
    expect(own['CH3OH(s)/H2O(s)']).toBeCloseTo(Math.hypot(0.1, 0.3), 12);
    const global = sigmas([{ species: 'CH3OH(s)', as: 'ratio', reference: 'CO(s)' }, { species: 'CH3OH(s)', as: 'ratio', model_sigma_dex: 0.5 }, { species: 'CO', as: 'abundance' }]);
    expect(global['CH3OH(s)/CO(s)']).toBeCloseTo(Math.hypot(0.1, 0.3), 12);
    expect(global['CH3OH(s)/H2O(s)']).toBeCloseTo(Math.hypot(0.1, 0.5), 12);
  });

  it('a poor fit is flagged (p < 0.01)', () => {
    const bad = abundanceQuantities('s9', DENSITIES[3], TIMES[5], 0.05).map((q, j) => ({ ...q, log10: q.log10 + (j % 2 === 0 ? 1.5 : -1.5) }));
    const out = runFitStage({ table, section: parse(), observations: observationSet(['s9']), quantities: bad });
    expect(out.result.fits[0].pValue).toBeLessThan(0.01);
    expect(out.result.fits[0].warnings.some((w) => w.includes('poor fit'))).toBe(true);
    expect(out.files[FIT_OUTPUT_FILES.bestFitsCsv]).toContain(',true,');
  });

  it('limits do not count in dof unless asked; dof is floored at 1 with a warning', () => {
    // Sightline s3 measures every species; s2 lacks CO(s) and CO2(s) and has CO only as an upper limit.
    const full = abundanceQuantities('s3', DENSITIES[3], TIMES[5], 0.1);
    const partial = [full[0], full[3], limit('s2', 'upper', 'CO', -3)].map((q) => ({ ...q, sightline: 's2' }));
    const observations = observationSet(['s2', 's3']);
    const off = runFitStage({ table, section: parse(), observations, quantities: [...partial, ...full] }).result.fits[0];
    const on = runFitStage({ table, section: parse({ limits_in_dof: true }), observations, quantities: [...partial, ...full] }).result.fits[0];
    expect(off.counts).toEqual({ detections: 2, upperLimits: 1, lowerLimits: 0, skipped: 2 });
    // 2 detections - 3 fitted parameters < 1: floored; with the limit counted, 3 - 3 < 1: floored too.
    expect(off.dof).toBe(1);
    expect(off.warnings.some((w) => w.includes('dof raised to 1'))).toBe(true);
    expect(off.warnings.some((w) => w.includes('no measurement of X(CO(s)), X(CO2(s))'))).toBe(true);
    expect(on.dof).toBe(1);
    expect(on.warnings.some((w) => w.includes('3 detection(s) and limit(s) for 3 fitted parameters: dof raised to 1'))).toBe(true);
    const fourAndLimit = [...full.slice(0, 4), limit('s3', 'upper', 'CO', -3)];
    const a = runFitStage({ table, section: parse(), observations: observationSet(['s3']), quantities: fourAndLimit }).result.fits[0];
    const b = runFitStage({ table, section: parse({ limits_in_dof: true }), observations: observationSet(['s3']), quantities: fourAndLimit }).result.fits[0];
    expect(a.dof).toBe(4 - 3);
    expect(b.dof).toBe(5 - 3);
  });
});

/** The table with a dust_temperature column tied to the second parameter (uv_field): 10 x uv_field. */
function withTiedDustTemperature(t: CandidateTable): CandidateTable {
  const np = t.parameterNames.length;
  const params = new Float64Array(t.nModels * (np + 1));
  for (let m = 0; m < t.nModels; m++) {
    params.set(t.parameters.subarray(m * np, (m + 1) * np), m * (np + 1));
    params[m * (np + 1) + np] = 10 * t.parameters[m * np + 1];
  }
  return { ...t, parameterNames: [...t.parameterNames, 'dust_temperature'], parameters: params };
}

describe('ties and held parameters', () => {
  it('a condition tied to another adds no fitted parameter', () => {
    const t = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: UV });
    // dust_temperature = 10 x uv_field: a tie, not a new axis
    const tied = withTiedDustTemperature(t);
    expect(buildAxes(tied).independent).toEqual(['density', 'uv_field', 'age_yr']);
  });

  it('a held parameter restricts the candidates and leaves the fit', () => {
    const table = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: UV });
    const q = abundanceQuantities('h', DENSITIES[2], TIMES[4], 0.1, () => 0, 2);
    const out = runFitStage({ table, section: parse(), observations: observationSet(['h']), quantities: q, held: { h: { uv_field: 0.5 } } }).result.fits[0];
    expect(out.best.parameters.uv_field).toBe(0.5);
    expect(out.heldParameters).toEqual({ uv_field: 0.5 });
    expect(out.fittedParameters).toBe(2);
    expect(out.intervals.some((iv) => iv.parameter === 'uv_field')).toBe(false);
    const paired = runFitStage({ table, section: parse({ pairs: [['uv_field', 'age_yr'], ['density', 'age_yr']] }), observations: observationSet(['h']), quantities: q, held: { h: { uv_field: 0.5 } } });
    expect(paired.profiles.sightlines[0].pairs.map((p) => p.x)).toEqual(['density']);
    expect(paired.result.warnings.some((w) => w.includes('no 2-D profile of (uv_field, age_yr) for 1 sightline(s): uv_field is held'))).toBe(true);
    expect(() => runFitStage({ table, section: parse(), observations: observationSet(['h']), quantities: q, held: { h: { uv_field: 7 } } })).toThrow(/no models? at|has none there/);
  });
});

describe('ratios and absolute abundances', () => {
  const table = syntheticTable({ densities: DENSITIES, times: TIMES });
  // Framed for the projected reading (p = 2) of the intervals, where it was measured.
  const section = parse({ model_sigma_dex: 0, parameters_of_interest: 2 });
  /** The same observed columns as abundances X = N/N_H (N_H exact), or as X(H2O(s)) and ratios to H2O(s) (errors in quadrature). */
  function both(noisy: number[], sigma: number[]) {
    const abs = SPECIES.map((s, j) => detection('a', s, noisy[j], sigma[j]));
    const ratios = [
      detection('a', 'H2O(s)', noisy[0], sigma[0]),
      ...SPECIES.slice(1).map((s, j) => detection('a', s, noisy[j + 1] - noisy[0], Math.hypot(sigma[j + 1], sigma[0]), 'H2O(s)')),
    ];
    const fa = runFitStage({ table, section, observations: observationSet(['a']), quantities: abs }).result.fits[0];
    const fr = runFitStage({ table, section, observations: observationSet(['a']), quantities: ratios }).result.fits[0];
    return [fa, fr] as const;
  }

  it('give the same best fit without noise', () => {
    for (let draw = 0; draw < 10; draw++) {
      const [i, k] = [draw % 7, (3 * draw) % 10];
      const [fa, fr] = both(analyticAbundances(DENSITIES[i], TIMES[k]).map(Math.log10), [0.1, 0.1, 0.1, 0.1, 0.1]);
      for (const f of [fa, fr]) {
        expect(f.best.parameters.density).toBe(DENSITIES[i]);
        expect(f.best.ageYr).toBe(TIMES[k]);
      }
    }
  });

  /** Draws of noisy data fitted both ways: how often each best lies inside the other's 95.4% intervals, and how often the two are one candidate. */
  function compare(sigma: number[], seed: number, draws: number) {
    const random = seededRandom(seed);
    let mutual = 0;
    let same = 0;
    const inside = (f: SightlineFit, b: SightlineFit) =>
      ['density', 'age_yr'].every((name) => {
        const iv = f.intervals.find((x) => x.parameter === name && x.level === 0.954)!;
        const v = b.intervals.find((x) => x.parameter === name && x.level === 0.954)!.best;
        return v >= iv.lo && v <= iv.hi;
      });
    for (let draw = 0; draw < draws; draw++) {
      const [i, k] = [1 + (draw % 5), 2 + (draw % 7)];
      const noisy = analyticAbundances(DENSITIES[i], TIMES[k]).map((v, j) => Math.log10(v) + sigma[j] * gaussian(random));
      const [fa, fr] = both(noisy, sigma);
      if (inside(fa, fr) && inside(fr, fa)) mutual++;
      if (fa.best.modelId === fr.best.modelId && fa.best.timeIndex === fr.best.timeIndex) same++;
    }
    return { mutual, same };
  }

  it('with noise, consistent best fits: each inside the other\'s 95.4% intervals', () => {
    // Ratios to one species share its noise, which the scoring treats as independent (the
    // quantities' errors are taken as uncorrelated), so the two likelihoods differ by that
    // correlation: the fits agree within their regions, and coincide when the reference is precise.
    const precise = compare([0.01, 0.15, 0.15, 0.15, 0.15], 99, 100);
    expect(precise.mutual).toBe(100);
    expect(precise.same).toBeGreaterThanOrEqual(90);
    const equal = compare([0.1, 0.1, 0.1, 0.1, 0.1], 100, 100);
    expect(equal.mutual).toBeGreaterThanOrEqual(90);
  });
});

describe('joint fits', () => {
  const table = syntheticTable({ densities: DENSITIES, times: TIMES });
  it('members sharing one age: summed chi2, the shared age recovered, densities free', () => {
    const k = 6;
    const q = [...abundanceQuantities('a', DENSITIES[1], TIMES[k], 0.1), ...abundanceQuantities('b', DENSITIES[4], TIMES[k], 0.1), ...abundanceQuantities('c', DENSITIES[5], TIMES[k], 0.1)];
    const section = parse({ joint: [{ name: 'core', sightlines: 'all', share: 'age_yr' }] });
    const { result, files } = runFitStage({ table, section, observations: observationSet(['a', 'b', 'c']), quantities: q });
    const j = result.joint[0];
    expect(j.sharedBest).toEqual({ age_yr: TIMES[k] });
    expect(j.memberFits.map((m) => m.best.parameters.density)).toEqual([DENSITIES[1], DENSITIES[4], DENSITIES[5]]);
    expect(j.chi2).toBeCloseTo(0, 20);
    expect(j.fittedParameters).toBe(1 + 3 * 1);
    expect(j.dof).toBe(15 - 4);
    expect(files[FIT_OUTPUT_FILES.jointFitsCsv].split('\n').length).toBe(5);
  });

  it('sharing a condition tied to another shares that one too: one fitted parameter for the group, not one per member', () => {
    // dust_temperature = 10 x uv_field (a tie): sharing it fixes uv_field for every member.
    const t = syntheticTable({ densities: DENSITIES, times: TIMES, uvFields: UV });
    const tied = withTiedDustTemperature(t);
    const q = [...abundanceQuantities('a', DENSITIES[1], TIMES[2], 0.1), ...abundanceQuantities('b', DENSITIES[4], TIMES[6], 0.1), ...abundanceQuantities('c', DENSITIES[5], TIMES[7], 0.1)];
    const section = parse({ joint: [{ name: 'core', sightlines: 'all', share: 'dust_temperature' }] });
    const { result } = runFitStage({ table: tied, section, observations: observationSet(['a', 'b', 'c']), quantities: q });
    const j = result.joint[0];
    // uv_field (through dust_temperature) once, density and age per member: 1 + 3 x 2.
    expect(j.fittedParameters).toBe(1 + 3 * 2);
    expect(j.dof).toBe(15 - 7);
    // Sharing uv_field itself counts the same.
    const direct = runFitStage({ table: tied, section: parse({ joint: [{ name: 'core', sightlines: 'all', share: 'uv_field' }] }), observations: observationSet(['a', 'b', 'c']), quantities: q }).result.joint[0];
    expect(direct.fittedParameters).toBe(j.fittedParameters);
  });

  it('the summed profile equals the sum of member profiles over the shared value', () => {
    const random = seededRandom(3);
    const q = [...abundanceQuantities('a', DENSITIES[2], TIMES[3], 0.2, () => gaussian(random)), ...abundanceQuantities('b', DENSITIES[3], TIMES[4], 0.2, () => gaussian(random))];
    // Model errors independent from member to member (no shared part): the group's chi2 is the plain sum.
    const section = parse({ joint: [{ name: 'pair', sightlines: ['a', 'b'], share: ['age_yr'] }], model_sigma_shared_dex: 0 });
    const { profiles } = runFitStage({ table, section, observations: observationSet(['a', 'b']), quantities: q });
    const age = (i: number) => profiles.sightlines[i].profiles.find((p) => p.parameter === 'age_yr')!.chi2Min as number[];
    const joint = profiles.joint[0].profiles[0].chi2Min as number[];
    joint.forEach((v, t) => expect(v).toBeCloseTo(age(0)[t] + age(1)[t], 10));
  });
});

describe('bad input', () => {
  const table = syntheticTable({ densities: DENSITIES, times: TIMES });
  it('a species the store lacks', () => {
    const q = [detection('s', 'NH3(s)', -5, 0.1), detection('s', 'H2O(s)', -4, 0.1)];
    expect(() => runFitStage({ table, section: parse(), observations: observationSet(['s']), quantities: q })).toThrow(UserError);
    expect(() => runFitStage({ table, section: parse(), observations: observationSet(['s']), quantities: q })).toThrow(/'NH3\(s\)'.*model store has no abundance.*fit\.quantities/s);
  });

  it('a ratio to a species with only a limit', () => {
    // As the observations room derives them: a detection over an upper limit is a lower limit of the ratio.
    const q = ['s', 't'].map((id) => ({ ...limit(id, 'lower', 'CO(s)', -0.5, 'H2O(s)') }));
    const obs = observationSet(['s', 't'], { s: { 'H2O(s)': 'upper' }, t: { 'H2O(s)': 'upper' } });
    expect(() => runFitStage({ table, section: parse(), observations: obs, quantities: q })).toThrow(UserError);
    expect(() => runFitStage({ table, section: parse(), observations: obs, quantities: q })).toThrow(/ratios CO\(s\)\/H2O\(s\) are to H2O\(s\).*only as a limit.*as: abundance/s);
    // A limit on the reference toward one sightline only is a ratio limit there, not an error.
    const mixed = observationSet(['s', 't'], { s: { 'H2O(s)': 'upper' } });
    const q2 = [q[0], detection('t', 'CO(s)', -0.5, 0.1, 'H2O(s)')];
    const fits = runFitStage({ table, section: parse(), observations: mixed, quantities: q2 }).result.fits;
    expect(fits.map((f) => f.counts.lowerLimits)).toEqual([1, 0]);
  });

  it('a pair or shared parameter the grid lacks, and limits without any width', () => {
    const q = abundanceQuantities('s', DENSITIES[1], TIMES[1], 0.1);
    expect(() => runFitStage({ table, section: parse({ pairs: [['density', 'zeta']] }), observations: observationSet(['s']), quantities: q })).toThrow(/'zeta' is not a parameter of the model grid/);
    const withLimit = [...q, limit('s', 'upper', 'CO', -3)].filter((x) => x.numerator !== 'CO' || x.kind === 'upper');
    expect(() => runFitStage({ table, section: parse({ model_sigma_dex: 0 }), observations: observationSet(['s']), quantities: withLimit })).toThrow(/limit_sigma_dex/);
    expect(() => runFitStage({ table, section: parse({ joint: [{ name: 'g', sightlines: ['s', 'nope'], share: 'age_yr' }] }), observations: observationSet(['s']), quantities: q })).toThrow(/no sightline 'nope'/);
  });

  it('a sightline id used twice, and a joint member listed twice', () => {
    const q = abundanceQuantities('s', DENSITIES[1], TIMES[1], 0.1);
    expect(() => runFitStage({ table, section: parse(), observations: observationSet(['s', 's']), quantities: q })).toThrow(/sightline id 's' is used twice \(row 2 and row 3\)/);
    const q2 = [...q, ...abundanceQuantities('t', DENSITIES[1], TIMES[1], 0.1)];
    expect(() => runFitStage({ table, section: parse({ joint: [{ name: 'g', sightlines: ['s', 't', 's'], share: 'age_yr' }] }), observations: observationSet(['s', 't']), quantities: q2 })).toThrow(/lists s more than once/);
  });

  it('no sightline with any fitted quantity', () => {
    expect(() => runFitStage({ table, section: parse(), observations: observationSet(['s']), quantities: [] })).toThrow(/no sightline of invented-cloud.csv has a value/);
  });
});
