/**
 * Makes the demo data of pipelines/demo/: an invented dark cloud, the
 * Elsinmoor Cloud (no real object, catalogue, survey or person), seen through
 * a dozen background stars and as a small column-density map.
 *
 * The data come from hoarfrost's own models: each sightline gets a hidden
 * "true" density and chemical age, the model for that density and half its
 * A_V (model_av_fraction) is run with the demo pipeline's network and
 * settings, abundances are read at the true age (log-log interpolation
 * between output times) and turned into columns with N_H = nh_per_av * A_V.
 * Noise: every column is drawn from a Gaussian with its stated 1-sigma error
 * (a relative error per species, with an absolute floor); a draw below three
 * times the floor is written as a 3-sigma upper limit. A_V errors are 5%.
 * The random numbers come from a seeded generator (mulberry32), so the files
 * are the same on every machine.
 *
 * The map: a 32 x 32 pixel filament whose A_V runs from 3 to 30 mag, density
 * rising with A_V, one age; column images from models on a small grid of
 * density and A_V, interpolated per pixel in log abundance, with the same
 * noise model. Written as one FITS file with an image extension per quantity.
 *
 *   npx tsx scripts/make-demo-data.ts [--pipeline pipelines/demo.yaml] [--out pipelines/demo] [--seed 20261201]
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { defaultConditions, isConditionName, type PhysicalConditions } from '../src/config/conditions.ts';
import { loadPipeline, type Pipeline } from '../src/config/pipeline.ts';
import { buildModelSetup, modelInput, runModel } from '../src/model/run.ts';
import type { ModelResult } from '../src/model/types.ts';
import { commentCards, writeFits, type FitsCard, type FitsHdu } from '../src/report/fits.ts';
import { seededRandom } from './seeded-random.ts';

export const CLOUD_NAME = 'Elsinmoor Cloud';
export const DEFAULT_SEED = 20261201;
const INVENTED_NOTE = `INVENTED DEMO DATA: the ${CLOUD_NAME} is not a real object; these values were computed from hoarfrost's own models with seeded noise by scripts/make-demo-data.ts. Do not use them for science.`;

/** One observed species of the demo: its 1-sigma relative error and absolute error floor, cm^-2. */
interface DemoSpecies {
  species: string;
  column: string;
  relativeError: number;
  floor: number;
}

/**
 * Errors of the order quoted for ice bands toward background stars and for
 * millimetre lines (memory; chosen for the demo, not taken from a survey).
 */
export const DEMO_SPECIES: readonly DemoSpecies[] = [
  { species: 'H2O(s)', column: 'N_H2O_ice', relativeError: 0.1, floor: 5e16 },
  { species: 'CO(s)', column: 'N_CO_ice', relativeError: 0.15, floor: 5e16 },
  { species: 'CO2(s)', column: 'N_CO2_ice', relativeError: 0.15, floor: 3e16 },
  { species: 'CH3OH(s)', column: 'N_CH3OH_ice', relativeError: 0.2, floor: 5e16 },
  { species: 'NH3(s)', column: 'N_NH3_ice', relativeError: 0.25, floor: 5e16 },
  { species: 'CH4(s)', column: 'N_CH4_ice', relativeError: 0.25, floor: 3e16 },
  { species: 'CO', column: 'N_CO', relativeError: 0.15, floor: 1e16 },
  { species: 'N2H+', column: 'N_N2Hp', relativeError: 0.2, floor: 1e11 },
  { species: 'HCO+', column: 'N_HCOp', relativeError: 0.2, floor: 2e11 },
];
/** The species of the map images (the ices and gas CO that maps are made of). */
const MAP_SPECIES = ['H2O(s)', 'CO(s)', 'CO2(s)', 'CH3OH(s)', 'CO'];
const AV_RELATIVE_ERROR = 0.05;
const LIMIT_SIGMA = 3;

/** The invented background stars: observed A_V (mag) from 4 to 30. */
const SIGHTLINE_AV = [4.3, 5.1, 6.3, 7.6, 9.0, 10.8, 12.9, 15.4, 18.3, 20.8, 23.5, 26.5];
/** Hidden truth: n_H rises with A_V as n0 (A_V/4 mag)^slope, scattered by DENSITY_SCATTER_DEX; ages scatter around AGE_CENTRE_YR. */
const DENSITY_AT_4_MAG = 2.5e3;
const DENSITY_SLOPE = 1.7;
const DENSITY_SCATTER_DEX = 0.15;
const AGE_CENTRE_YR = 4e5;
const AGE_SCATTER_DEX = 0.3;

const MAP_SIZE = 32;
const MAP_AGE_YR = 5e5;
const MAP_AV_BACKGROUND = 3;
const MAP_AV_PEAK = 30;
/** Filament width (Gaussian sigma across its axis) and length scale along it, pixels. */
const MAP_WIDTH_PX = 4;
const MAP_LENGTH_PX = 14;
/** Models behind the map: densities and model A_V values between which pixels are interpolated. */
const MAP_MODEL_DENSITIES = [1e3, 3e3, 1e4, 3e4, 1e5, 3e5];
const MAP_MODEL_AV = [1.5, 3, 5, 8, 11, 15];
/** Invented pointing of the map (degrees) and its pixel size (arcsec). */
const MAP_CENTRE_RA = 150.25;
const MAP_CENTRE_DEC = -7.5;
const MAP_PIXEL_ARCSEC = 20;


/** Standard normal deviates by the Box-Muller transform. */
function gaussian(random: () => number): () => number {
  return () => {
    const u = 1 - random();
    const v = random();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
}

interface ModelContext {
  pipeline: Pipeline;
  run(density: number, modelAv: number): ModelResult;
  modelAvFraction: number;
  nhPerAv: number;
  iceThresholdAv: number;
}

function modelContext(pipeline: Pipeline): ModelContext {
  const c = pipeline.config;
  const setup = buildModelSetup(pipeline);
  const fixed: Partial<PhysicalConditions> = {};
  for (const [name, axis] of Object.entries(c.conditions)) if (isConditionName(name) && typeof axis === 'number') fixed[name] = axis;
  return {
    pipeline,
    modelAvFraction: c.observations?.model_av_fraction ?? 0.5,
    nhPerAv: c.observations?.nh_per_av ?? 1.87e21,
    iceThresholdAv: c.observations?.ice_threshold_av ?? 0,
    run: (density, modelAv) => {
      const conditions: PhysicalConditions = { ...defaultConditions(), ...fixed, density, visual_extinction: modelAv };
      const result = runModel(modelInput(setup, conditions));
      if (result.status !== 'ok') throw new Error(`demo model n_H = ${density}, A_V = ${modelAv} failed: ${result.failure}`);
      return result;
    },
  };
}

/** log10 abundance of a species at an age, interpolated linearly in log time between output times. */
function log10AbundanceAt(result: ModelResult, species: string, ageYr: number): number {
  const s = result.species.indexOf(species);
  if (s < 0) throw new Error(`the demo network has no species ${species}`);
  const n = result.species.length;
  const t = result.timesYr;
  const lx = (k: number) => Math.log10(Math.max(result.abundances[k * n + s], 1e-30));
  if (ageYr <= t[0]) return lx(0);
  for (let k = 1; k < t.length; k++) {
    if (ageYr <= t[k]) {
      const f = (Math.log10(ageYr) - Math.log10(t[k - 1])) / (Math.log10(t[k]) - Math.log10(t[k - 1]));
      return lx(k - 1) + f * (lx(k) - lx(k - 1));
    }
  }
  return lx(t.length - 1);
}

type Observed = { kind: 'detection'; value: number; error: number } | { kind: 'upper'; limit: number };

/** A noisy measurement of a true column with the species' stated error; below LIMIT_SIGMA floors it becomes an upper limit. */
function observe(trueColumn: number, sp: DemoSpecies, normal: () => number): Observed {
  const error = Math.max(sp.relativeError * trueColumn, sp.floor);
  const value = trueColumn + error * normal();
  if (value < LIMIT_SIGMA * sp.floor) return { kind: 'upper', limit: LIMIT_SIGMA * sp.floor };
  return { kind: 'detection', value, error };
}

function iceColumnAv(av: number, species: string, threshold: number): number {
  return species.endsWith('(s)') ? Math.max(av - threshold, 0) : av;
}

/** Four significant digits: what an observers' table prints. */
function sig(v: number): string {
  return v.toPrecision(4).replace(/\.?0+e/, 'e');
}

export interface DemoTruth {
  id: string;
  av: number;
  density: number;
  ageYr: number;
}

export interface DemoFiles {
  table: string;
  columns: string;
  truth: string;
  map?: string;
}

function writeSightlines(ctx: ModelContext, outDir: string, seed: number, progress: (s: string) => void): { files: Omit<DemoFiles, 'map'>; truth: DemoTruth[] } {
  const random = seededRandom(seed);
  const normal = gaussian(random);
  const truth: DemoTruth[] = SIGHTLINE_AV.map((av, i) => ({
    id: `EM-${String(i + 1).padStart(2, '0')}`,
    av,
    density: Number((DENSITY_AT_4_MAG * (av / 4) ** DENSITY_SLOPE * 10 ** (DENSITY_SCATTER_DEX * normal())).toPrecision(3)),
    ageYr: Number((AGE_CENTRE_YR * 10 ** (AGE_SCATTER_DEX * normal())).toPrecision(3)),
  }));
  const header = ['star', 'av', 'av_err', ...DEMO_SPECIES.flatMap((s) => [s.column, `${s.column}_err`])];
  const rows: string[] = [];
  for (const t of truth) {
    progress(`sightline ${t.id}: n_H = ${t.density} cm^-3, age ${t.ageYr} yr, A_V ${t.av} mag`);
    const model = ctx.run(t.density, ctx.modelAvFraction * t.av);
    const cells = [t.id, sig(t.av * (1 + AV_RELATIVE_ERROR * normal())), sig(AV_RELATIVE_ERROR * t.av)];
    for (const sp of DEMO_SPECIES) {
      const nh = ctx.nhPerAv * iceColumnAv(t.av, sp.species, ctx.iceThresholdAv);
      const o = observe(10 ** log10AbundanceAt(model, sp.species, t.ageYr) * nh, sp, normal);
      if (o.kind === 'upper') cells.push(`<${sig(o.limit)}`, '');
      else cells.push(sig(o.value), sig(o.error));
    }
    rows.push(cells.join(','));
  }
  const table = join(outDir, 'sightlines.csv');
  const commentLines = wrap(INVENTED_NOTE, 76).map((l) => `# ${l}`);
  const notes = [
    `# Columns: star name; observed A_V and its 1-sigma error (mag); per species the column density N (cm^-2) and its 1-sigma error.`,
    `# '<value' is a ${LIMIT_SIGMA}-sigma upper limit. Noise: Gaussian with the stated errors, seed ${seed}.`,
  ];
  writeFileSync(table, [...commentLines, ...notes, header.join(','), ...rows].join('\n') + '\n');

  const columns = join(outDir, 'sightlines.columns.yaml');
  const mapping = [
    ...commentLines,
    '# Column mapping of sightlines.csv: which column holds what.',
    'id: star',
    'av: av',
    'av_error: av_err',
    'species:',
    ...DEMO_SPECIES.map((s) => `  ${JSON.stringify(s.species)}: { value: ${s.column}, error: ${s.column}_err, unit: cm-2, limit_confidence: 0.997 }`),
  ];
  writeFileSync(columns, mapping.join('\n') + '\n');

  const truthFile = join(outDir, 'truth.csv');
  writeFileSync(truthFile, [...commentLines, '# The hidden truth behind sightlines.csv, for checking what the fit recovers.', 'star,av,density,age_yr', ...truth.map((t) => `${t.id},${t.av},${t.density},${t.ageYr}`)].join('\n') + '\n');
  return { files: { table, columns, truth: truthFile }, truth };
}

function wrap(text: string, width: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(' ')) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}

/** Bilinear interpolation on a rectilinear table (clamped at the edges). */
function bilinear(xs: readonly number[], ys: readonly number[], values: Float64Array, x: number, y: number): number {
  const find = (axis: readonly number[], v: number) => {
    if (v <= axis[0]) return { i: 0, f: 0 };
    for (let i = 1; i < axis.length; i++) if (v <= axis[i]) return { i: i - 1, f: (v - axis[i - 1]) / (axis[i] - axis[i - 1]) };
    return { i: axis.length - 2, f: 1 };
  };
  const a = find(xs, x);
  const b = find(ys, y);
  const at = (i: number, j: number) => values[j * xs.length + i];
  const lo = at(a.i, b.i) * (1 - a.f) + at(a.i + 1, b.i) * a.f;
  const hi = at(a.i, b.i + 1) * (1 - a.f) + at(a.i + 1, b.i + 1) * a.f;
  return lo * (1 - b.f) + hi * b.f;
}

function extname(species: string): string {
  return species.replace('(s)', '_ICE').replace('+', 'P');
}

function writeMap(ctx: ModelContext, outDir: string, seed: number, progress: (s: string) => void): string {
  const normal = gaussian(seededRandom(seed + 1));
  const logN = MAP_MODEL_DENSITIES.map(Math.log10);
  const tables = new Map<string, Float64Array>(MAP_SPECIES.map((s) => [s, new Float64Array(MAP_MODEL_DENSITIES.length * MAP_MODEL_AV.length)]));
  MAP_MODEL_AV.forEach((av, j) => {
    MAP_MODEL_DENSITIES.forEach((n, i) => {
      progress(`map model n_H = ${n} cm^-3, model A_V = ${av} mag`);
      const model = ctx.run(n, av);
      for (const s of MAP_SPECIES) tables.get(s)![j * MAP_MODEL_DENSITIES.length + i] = log10AbundanceAt(model, s, MAP_AGE_YR);
    });
  });
  const npx = MAP_SIZE * MAP_SIZE;
  const av = new Float64Array(npx);
  const avErr = new Float64Array(npx);
  const images = new Map<string, { value: Float64Array; error: Float64Array }>(MAP_SPECIES.map((s) => [s, { value: new Float64Array(npx), error: new Float64Array(npx) }]));
  const centre = (MAP_SIZE - 1) / 2;
  // A filament along a diagonal: Gaussian across it, a broad envelope along it.
  const angle = Math.PI / 5;
  for (let y = 0; y < MAP_SIZE; y++) {
    for (let x = 0; x < MAP_SIZE; x++) {
      const dx = x - centre;
      const dy = y - centre;
      const across = -dx * Math.sin(angle) + dy * Math.cos(angle);
      const along = dx * Math.cos(angle) + dy * Math.sin(angle);
      const trueAv = MAP_AV_BACKGROUND + (MAP_AV_PEAK - MAP_AV_BACKGROUND) * Math.exp(-(across * across) / (2 * MAP_WIDTH_PX ** 2) - (along * along) / (2 * MAP_LENGTH_PX ** 2));
      const density = DENSITY_AT_4_MAG * (trueAv / 4) ** DENSITY_SLOPE;
      const p = y * MAP_SIZE + x;
      av[p] = trueAv * (1 + AV_RELATIVE_ERROR * normal());
      avErr[p] = AV_RELATIVE_ERROR * trueAv;
      for (const s of MAP_SPECIES) {
        const sp = DEMO_SPECIES.find((d) => d.species === s)!;
        const nh = ctx.nhPerAv * iceColumnAv(trueAv, s, ctx.iceThresholdAv);
        const o = observe(10 ** bilinear(logN, MAP_MODEL_AV, tables.get(s)!, Math.log10(density), ctx.modelAvFraction * trueAv) * nh, sp, normal);
        const img = images.get(s)!;
        // Not detected: the pixel is blank (NaN), as observers' maps mask such pixels.
        img.value[p] = o.kind === 'detection' ? o.value : Number.NaN;
        img.error[p] = o.kind === 'detection' ? o.error : Number.NaN;
      }
    }
  }
  const wcs: FitsCard[] = [
    { key: 'WCSAXES', value: 2 },
    { key: 'CTYPE1', value: 'RA---TAN' },
    { key: 'CTYPE2', value: 'DEC--TAN' },
    { key: 'CRPIX1', value: centre + 1 },
    { key: 'CRPIX2', value: centre + 1 },
    { key: 'CRVAL1', value: MAP_CENTRE_RA, comment: 'invented pointing' },
    { key: 'CRVAL2', value: MAP_CENTRE_DEC, comment: 'invented pointing' },
    { key: 'CDELT1', value: -MAP_PIXEL_ARCSEC / 3600 },
    { key: 'CDELT2', value: MAP_PIXEL_ARCSEC / 3600 },
    { key: 'CUNIT1', value: 'deg' },
    { key: 'CUNIT2', value: 'deg' },
    { key: 'RADESYS', value: 'ICRS' },
    { key: 'EQUINOX', value: 2000 },
  ];
  const common = (bunit: string, what: string): FitsCard[] => [
    { key: 'OBJECT', value: CLOUD_NAME, comment: 'invented demo cloud' },
    { key: 'BUNIT', value: bunit },
    ...wcs,
    ...commentCards(what),
  ];
  const hdus: FitsHdu[] = [
    { type: 'image', name: 'AV', data: av, nx: MAP_SIZE, ny: MAP_SIZE, header: [...common('mag', 'Visual extinction A_V along the line of sight.'), ...commentCards(INVENTED_NOTE)] },
    { type: 'image', name: 'AV_ERR', data: avErr, nx: MAP_SIZE, ny: MAP_SIZE, header: common('mag', '1-sigma error of A_V.') },
  ];
  for (const s of MAP_SPECIES) {
    const img = images.get(s)!;
    hdus.push({ type: 'image', name: extname(s), data: img.value, nx: MAP_SIZE, ny: MAP_SIZE, header: common('cm-2', `Column density of ${s}; NaN where not detected.`) });
    hdus.push({ type: 'image', name: `${extname(s)}_ERR`, data: img.error, nx: MAP_SIZE, ny: MAP_SIZE, header: common('cm-2', `1-sigma error of the column density of ${s}.`) });
  }
  const file = join(outDir, 'map.fits');
  writeFits(file, hdus);
  writeFileSync(
    join(outDir, 'map.columns.yaml'),
    [
      ...wrap(INVENTED_NOTE, 76).map((l) => `# ${l}`),
      '# EXTNAME mapping of map.fits: which image holds what.',
      'av: AV',
      'av_error: AV_ERR',
      'species:',
      ...MAP_SPECIES.map((s) => `  ${JSON.stringify(s)}: { value: ${extname(s)}, error: ${extname(s)}_ERR }`),
    ].join('\n') + '\n',
  );
  return file;
}

export interface MakeDemoOptions {
  pipelineFile: string;
  outDir: string;
  seed?: number;
  /** Also make the FITS map set (about 36 more models). */
  map?: boolean;
  progress?: (line: string) => void;
}

export function makeDemoData(o: MakeDemoOptions): DemoFiles {
  const pipeline = loadPipeline(o.pipelineFile);
  const ctx = modelContext(pipeline);
  const seed = o.seed ?? DEFAULT_SEED;
  const progress = o.progress ?? (() => undefined);
  mkdirSync(o.outDir, { recursive: true });
  const { files } = writeSightlines(ctx, o.outDir, seed, progress);
  const map = o.map === false ? undefined : writeMap(ctx, o.outDir, seed, progress);
  return { ...files, map };
}

function argValue(args: string[], flag: string): string | undefined {
  const i = args.indexOf(flag);
  return i >= 0 ? args[i + 1] : undefined;
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const args = process.argv.slice(2);
  const pipelineFile = argValue(args, '--pipeline') ?? 'pipelines/demo.yaml';
  const outDir = argValue(args, '--out') ?? 'pipelines/demo';
  const seedText = argValue(args, '--seed');
  const started = performance.now();
  const files = makeDemoData({ pipelineFile, outDir, seed: seedText === undefined ? undefined : Number(seedText), progress: (l) => process.stderr.write(`${l}\n`) });
  for (const f of Object.values(files)) if (f) process.stdout.write(`wrote ${relative(process.cwd(), f)}\n`);
  process.stdout.write(`demo data made in ${((performance.now() - started) / 1000).toFixed(1)} s\n`);
}
