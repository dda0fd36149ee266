/**
 * Synthetic inputs for the report tests (invented: no real cloud). The chi^2
 * surface is a tilted quadratic in log density and log age, so that the
 * joint region is the elongated, degenerate shape real fits show; profiles,
 * intervals and tracks are derived from it as the fit stage would.
 */
import type { FitStageResult, QuantityScore, MapFitJson, Profile1D, Profile2D, ProfilesJson, SightlineFit, ParameterInterval } from '../../src/fit/types.ts';
import type { ObservationSet, ObservedQuantity, Sightline } from '../../src/obs/types.ts';
import { DEFAULT_REPORT_SECTION, type ReportSection } from '../../src/config/sections/report.ts';
import type { ModelTrack, ReportInput } from '../../src/report/types.ts';

export const HOSTILE_NAMES = ['<script>alert(1)</script>', '50%_&_#1'];
export const SIGHTLINES = ['Frostmere-01', HOSTILE_NAMES[0], HOSTILE_NAMES[1], 'Frostmere "04"'];

const DENSITIES = [1e3, 3e3, 1e4, 3e4, 1e5, 3e5, 1e6];
const AGES = [1e3, 3e3, 1e4, 3e4, 1e5, 3e5, 1e6, 3e6, 1e7];
const TEMPERATURES = [10, 15];
const LEVELS = [
  { level: 0.683, parametersOfInterest: 1, deltaChi2: 1.0 },
  { level: 0.954, parametersOfInterest: 1, deltaChi2: 4.0 },
];

/** chi^2 of a candidate for sightline k: minimum at a density and age that move with k, tilted (n t degenerate). */
function chi2(k: number, n: number, t: number, temp: number): number {
  const u = Math.log10(n) - (3.8 + 0.5 * k);
  const v = Math.log10(t) - (5.2 - 0.3 * k);
  return 3 + k + 6 * (u + v) ** 2 + 1.5 * (u - v) ** 2 + (temp === 10 ? 0 : 0.8);
}

function argmin<T>(items: T[], f: (x: T) => number): { item: T; value: number } {
  let best = items[0];
  let bv = f(best);
  for (const x of items) {
    const v = f(x);
    if (v < bv) {
      bv = v;
      best = x;
    }
  }
  return { item: best, value: bv };
}

function profile1(k: number, parameter: 'density' | 'age_yr' | 'gas_temperature', chi2Best: number): Profile1D {
  const values = parameter === 'density' ? DENSITIES : parameter === 'age_yr' ? AGES : TEMPERATURES;
  const chi2Min = values.map((val) => {
    let m = Infinity;
    for (const n of DENSITIES) for (const t of AGES) for (const T of TEMPERATURES) {
      const p = { density: n, age_yr: t, gas_temperature: T };
      if (p[parameter] !== val) continue;
      m = Math.min(m, chi2(k, n, t, T));
    }
    return m;
  });
  return { parameter, values, chi2Min, deltaChi2: chi2Min.map((c) => c - chi2Best) };
}

function interval(p: Profile1D, best: number, level: (typeof LEVELS)[number]): ParameterInterval {
  const inside = p.values.filter((_, i) => (p.deltaChi2[i] ?? Infinity) <= level.deltaChi2);
  const lo = Math.min(...inside);
  const hi = Math.max(...inside);
  return { parameter: p.parameter, level: level.level, deltaChi2Threshold: level.deltaChi2, best, lo, hi, loAtEdge: lo === p.values[0], hiAtEdge: hi === p.values[p.values.length - 1], disjoint: false, fixed: false, unresolved: inside.length === 1 };
}

const QUANTITIES = [
  { label: 'CO(s)/H2O(s)', numerator: 'CO(s)', denominator: 'H2O(s)' },
  { label: 'CO2(s)/H2O(s)', numerator: 'CO2(s)', denominator: 'H2O(s)' },
  { label: 'CH3OH(s)/H2O(s)', numerator: 'CH3OH(s)', denominator: 'H2O(s)' },
  { label: 'NH3(s)/H2O(s)', numerator: 'NH3(s)', denominator: 'H2O(s)' },
  { label: 'X(CO)', numerator: 'CO' },
];

/** A smooth invented ratio track: log10 rising with age towards a plateau. */
function trackLog10(q: number, t: number, n: number): number {
  // Gas-phase CO falls as it freezes out.
  if (q === 4) return -4 - 1.5 * Math.max(0, Math.log10(t) - 5) - 0.2 * (Math.log10(n) - 4);
  const rise = Math.tanh((Math.log10(t) - 4.5 + 0.2 * q) / 1.2);
  return -1.2 - 0.3 * q + 0.6 * rise + 0.1 * (Math.log10(n) - 4);
}

export interface FixtureOptions {
  sightlines?: string[];
  config?: Partial<ReportSection>;
  map?: { nx: number; ny: number };
  /** Add a joint fit of the first two sightlines sharing one age, its group named with markup. */
  joint?: boolean;
}

export function syntheticInput(options: FixtureOptions = {}): ReportInput {
  const names = options.sightlines ?? SIGHTLINES;
  const fits: SightlineFit[] = [];
  const profiles: ProfilesJson = { format: 'hoarfrost-fit-profiles/1', levels: LEVELS, sightlines: [], joint: [] };
  const quantities: ObservedQuantity[] = [];
  const tracks: ModelTrack[] = [];
  const sightlines: Sightline[] = [];
  names.forEach((id, k) => {
    const kk = k % 4;
    const cands = DENSITIES.flatMap((n) => AGES.flatMap((t) => TEMPERATURES.map((T) => ({ n, t, T }))));
    const { item: best, value: chi2Best } = argmin(cands, (c) => chi2(kk, c.n, c.t, c.T));
    const p1 = (['density', 'age_yr', 'gas_temperature'] as const).map((p) => profile1(kk, p, chi2Best));
    const pair: Profile2D = {
      x: 'density',
      y: 'age_yr',
      xValues: DENSITIES,
      yValues: AGES,
      chi2Min: AGES.flatMap((t) => DENSITIES.map((n) => Math.min(...TEMPERATURES.map((T) => chi2(kk, n, t, T))))),
      deltaChi2: [],
    };
    pair.deltaChi2 = pair.chi2Min.map((c) => (c === null ? null : c - chi2Best));
    // One missing cell, as where a model failed.
    pair.chi2Min[0] = null;
    pair.deltaChi2[0] = null;
    profiles.sightlines.push({ sightline: id, chi2Best, profiles: p1, pairs: [pair] });
    const bestValues: Record<string, number> = { density: best.n, age_yr: best.t, gas_temperature: best.T };
    const intervals = LEVELS.flatMap((l) => p1.map((p) => interval(p, bestValues[p.parameter], l)));
    const modelId = `m${k}-${best.n}-${best.T}`;
    const residuals: QuantityScore[] = [];
    const warnings = intervals.some((i) => i.level === 0.683 && (i.loAtEdge || i.hiAtEdge)) ? [`the 68.3% interval of ${id} reaches the grid edge`] : [];
    fits.push({
      sightline: id,
      best: { modelId, modelIndex: k, timeIndex: AGES.indexOf(best.t), ageYr: best.t, parameters: { density: best.n, gas_temperature: best.T }, chi2: chi2Best, deltaChi2: 0 },
      dof: 1,
      reducedChi2: chi2Best,
      pValue: Math.exp(-chi2Best / 2),
      agreementFraction: 0.75,
      counts: { detections: 3, upperLimits: 1, lowerLimits: 0, skipped: 0 },
      fittedParameters: 3,
      heldParameters: {},
      residuals,
      runnerUps: [],
      candidatesInRegion: 5,
      intervals,
      warnings,
    });
    QUANTITIES.forEach((q, j) => {
      const times = Array.from({ length: 41 }, (_, i) => 10 ** (3 + (4 * i) / 40));
      tracks.push({ sightline: id, label: q.label, modelId, role: 'best', timesYr: times, log10: times.map((t, i) => (i === 0 && j === 0 ? null : trackLog10(j, t, best.n))) });
      const obs = trackLog10(j, best.t, best.n) + 0.1 * (j - 1);
      const kind = j === 3 ? 'upper' : j === 2 && k === 1 ? 'lower' : 'detection';
      quantities.push({ sightline: id, ...q, kind, log10: obs, sigmaLoDex: kind === 'detection' ? 0.12 : 0, sigmaHiDex: kind === 'detection' ? 0.1 : 0 });
      // The best fit's residual as the fit stage scores it (docs/statistics.md): d = model - observed over the width.
      const model = trackLog10(j, best.t, best.n);
      const d = model - obs;
      const width = Math.hypot(kind === 'detection' ? (d < 0 ? 0.12 : 0.1) : 0, 0.3);
      const violated = (kind === 'upper' && d > 0) || (kind === 'lower' && d < 0);
      residuals.push({ label: q.label, numerator: q.numerator, denominator: q.denominator, kind, observedLog10: obs, sigmaLoDex: kind === 'detection' ? 0.12 : 0, sigmaHiDex: kind === 'detection' ? 0.1 : 0, modelLog10: model, residualDex: d, sigmaDex: width, chi2: kind === 'detection' || violated ? (d / width) ** 2 : 0, agrees: kind === 'detection' ? Math.abs(d) < 1 : !violated });
    });
    // Invented positions in a small field near Dec -30 deg.
    sightlines.push({ id, av: 4 + 6 * k, avErr: 0.8, ra: 201.3 + 0.05 * k, dec: -30.1 + 0.03 * ((k * 7) % 4), columns: {}, source: { file: 'frostmere.csv', row: k + 2 } });
  });
  const fit: FitStageResult = {
    format: 'hoarfrost-fit/1',
    fittedParameters: ['density', 'gas_temperature', 'age_yr'],
    fixedParameters: { cr_ionisation_rate: 1.3e-17 },
    levels: LEVELS,
    modelSigmaDex: 0.3,
    poorFitP: 0.01,
    nCandidates: DENSITIES.length * AGES.length * TEMPERATURES.length,
    fits,
    joint: [],
    warnings: [],
    cautions: [],
  };
  if (options.joint) {
    fit.joint.push({
      name: '<b>core</b>',
      members: names.slice(0, 2),
      shared: ['age_yr'],
      sharedBest: { age_yr: 1e5 },
      chi2: 9.1,
      dof: 3,
      reducedChi2: 9.1 / 3,
      pValue: 0.028,
      fittedParameters: 5,
      memberFits: [],
      profiles: [],
      intervals: [{ parameter: 'age_yr', level: 0.683, deltaChi2Threshold: 1, best: 1e5, lo: 3e4, hi: 3e5, loAtEdge: false, hiAtEdge: false, disjoint: false, fixed: false, unresolved: false }],
      warnings: ['the group & its <members> share one age'],
    });
  }
  const observations: ObservationSet = { file: 'frostmere.csv', kind: options.map ? 'map' : 'table', sightlines, warnings: [] };
  let map: MapFitJson | undefined;
  if (options.map) {
    const { nx, ny } = options.map;
    const npx = nx * ny;
    const img = (f: (x: number, y: number) => number | null) => Array.from({ length: npx }, (_, i) => f(i % nx, Math.floor(i / nx)));
    const hole = (x: number, y: number) => x === 0 && y === ny - 1;
    map = {
      format: 'hoarfrost-fit-map/1',
      nx,
      ny,
      fittedPixels: npx - 1,
      level: LEVELS[0],
      images: {
        best_density: img((x, y) => (hole(x, y) ? null : 10 ** (3 + (3 * x) / (nx - 1)))),
        best_age_yr: img((x, y) => (hole(x, y) ? null : 10 ** (4 + (3 * y) / (ny - 1)))),
        best_chi2: img((x, y) => (hole(x, y) ? null : 1 + x + y)),
        reduced_chi2: img(() => 1),
        p_value: img(() => 0.5),
        dof: img(() => 1),
        density_lo: img((x, y) => (hole(x, y) ? null : 10 ** (2.75 + (3 * x) / (nx - 1)))),
        density_hi: img((x, y) => (hole(x, y) ? null : 10 ** (3.25 + (3 * x) / (nx - 1)))),
        age_lo_yr: img((x, y) => (hole(x, y) ? null : 10 ** (3.5 + (3 * y) / (ny - 1)))),
        age_hi_yr: img((x, y) => (hole(x, y) ? null : 10 ** (4.5 + (3 * y) / (ny - 1)))),
        density_width_dex: img(() => 0.5),
        age_width_dex: img(() => 1),
        at_edge: img(() => 0),
        unresolved: img((x, y) => (hole(x, y) ? null : 0)),
        density_subgrid: img((x, y) => (hole(x, y) ? null : 10 ** (3 + (3 * x) / (nx - 1)))),
        age_subgrid_yr: img((x, y) => (hole(x, y) ? null : 10 ** (4 + (3 * y) / (ny - 1)))),
        used_quantities: img(() => 4),
      },
      warnings: [],
    };
    observations.map = { nx, ny, wcs: { CTYPE1: 'RA---TAN', CTYPE2: 'DEC--TAN', CRPIX1: 4.5, CRPIX2: 3.5, CRVAL1: 83.8, CRVAL2: -5.4, CDELT1: -0.001, CDELT2: 0.001, CUNIT1: 'deg', CUNIT2: 'deg', OBJECT: 'Frostmere <map> & "50%"' } };
  }
  return {
    title: 'Frostmere test report',
    config: { ...DEFAULT_REPORT_SECTION, ...options.config },
    configFile: 'pipelines/frostmere.yaml',
    fit,
    profiles,
    map,
    observations,
    quantities,
    tracks,
    provenance: { toolVersion: '0.1.0', nodeVersion: process.version, commandLine: ['hoarfrost', 'run', 'pipelines/frostmere.yaml'], hashes: { pipeline: 'abc123', network: 'def456' } },
  };
}
