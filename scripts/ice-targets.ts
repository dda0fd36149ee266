/**
 * The ice targets of the default network (physics.md section 9): runs a
 * network under quiet dark-cloud conditions (10 K gas and dust, A_V = 10,
 * the low-metal start) at n_H = 2e4 and 1e5 cm^-3 from 1e3 to 1e7 yr, and
 * prints for every output time the ice ratios to water ice, the water ice
 * per H, the largest ice reservoir of an element outside the expected
 * carriers, and which targets hold; then the widest window of consecutive
 * output times in which every target holds at once.
 *
 * The targets: CO and CO2 ice relative to water ice within a factor of 2 of
 * the cloud-core medians of Oberg et al. 2011 (ApJ 740, 109: H2O:CO:CO2:CH3OH
 * = 100:31:38:4), CH3OH within a factor of 3 of theirs; NH3 and CH4 below
 * 0.15 of water (their protostellar medians are 0.05, with quartiles within
 * about 25 %); water ice between 3e-5 and 1.5e-4 per H (physics.md section
 * 4: about 1e-4 at late times, common practice); no ice species above 10 %
 * of one of its elements except the observed carriers H2O, CO, CO2, CH3OH,
 * NH3, CH4, N2 and O2. A window must span at least 0.3 dex of age.
 *
 * Ice is every non-gas form of a species (the surface ice X(s), and a mantle
 * form when the engine has one) summed by gas name.
 *
 * Run: npx tsx scripts/ice-targets.ts [network.yaml] [--json] [--recommended | --grain '{"mantle": true, ...}']
 */
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../src/config/conditions.ts';
import { loadNetwork } from '../src/chem/network.ts';
import type { Network } from '../src/chem/network-types.ts';
import { ICE_SUFFIX } from '../src/chem/species.ts';
import { grainSection } from '../src/config/pipeline.ts';
import { grainOptionsOf } from '../src/model/setup.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../src/model/run.ts';

export const DEFAULT_NETWORK = fileURLToPath(new URL('../config/networks/dark-cloud.yaml', import.meta.url));

/**
 * The grain switches recommended for the default network (docs/default-network.md,
 * with the measured table): the three-phase ice (Hasegawa & Herbst 1993;
 * Garrod & Pauly 2011) with one surface monolayer, the non-diffusive
 * three-body, Eley-Rideal and photodissociation-induced reactions (Jin &
 * Garrod 2020) and ice photolysis; thermal hopping without tunnelling and no
 * reaction-diffusion competition (each of those two, switched on, moves CO
 * ice away from its target: docs/default-network.md). Not the engine's
 * default, which stays two-phase so that older models keep their meaning.
 */
export const RECOMMENDED_GRAIN: GrainOptions = {
  ...DEFAULT_GRAIN_OPTIONS,
  mantle: true,
  threeBody: true,
  eleyRideal: true,
  photodissociationInduced: true,
  icePhotolysis: true,
};

/** The densities of the targets, cm^-3 (issue text: a diffuse and a dense core). */
export const TARGET_DENSITIES = [2e4, 1e5];

/** Oberg et al. 2011 (ApJ 740, 109), cloud-core (background star) medians relative to H2O = 1. */
export const CLOUD_CORE_MEDIANS = { CO: 0.31, CO2: 0.38, CH3OH: 0.04 } as const;

export interface RatioTarget {
  species: string;
  /** Acceptable ratio to water ice, [low, high]. */
  range: [number, number];
  source: string;
}

export const RATIO_TARGETS: RatioTarget[] = [
  { species: 'CO', range: [CLOUD_CORE_MEDIANS.CO / 2, CLOUD_CORE_MEDIANS.CO * 2], source: 'Oberg et al. 2011 cloud-core median 0.31, within a factor of 2' },
  { species: 'CO2', range: [CLOUD_CORE_MEDIANS.CO2 / 2, CLOUD_CORE_MEDIANS.CO2 * 2], source: 'Oberg et al. 2011 cloud-core median 0.38, within a factor of 2' },
  { species: 'CH3OH', range: [CLOUD_CORE_MEDIANS.CH3OH / 3, CLOUD_CORE_MEDIANS.CH3OH * 3], source: 'Oberg et al. 2011 cloud-core median 0.04, within a factor of 3' },
  { species: 'NH3', range: [0, 0.15], source: 'Oberg et al. 2011 low-mass protostar median 0.05; below 0.15' },
  { species: 'CH4', range: [0, 0.15], source: 'Oberg et al. 2011 low-mass protostar median 0.05; below 0.15' },
];

/** Water ice per H nucleus (physics.md section 4: about 1e-4 at late times, common practice). */
export const WATER_RANGE: [number, number] = [3e-5, 1.5e-4];

/** Largest share of an element one ice species may hold, outside the observed carriers (issue text). */
export const RESERVOIR_LIMIT = 0.1;
export const OBSERVED_CARRIERS = ['H2O', 'CO', 'CO2', 'CH3OH', 'NH3', 'CH4', 'N2', 'O2'];
/**
 * The elements the reservoir limit applies to: those whose ices are observed.
 * Sulphur, silicon and the metals have no observed ice carrier and freeze out
 * whole (Mg(s) holding all magnesium is depletion onto grains, not a
 * runaway), so a share of theirs says nothing about the network (our choice).
 */
export const RESERVOIR_ELEMENTS = ['C', 'N', 'O'];

/** Smallest width, dex of age, of a window in which every target holds. */
export const MIN_WINDOW_DEX = 0.3;

export interface Row {
  timeYr: number;
  water: number;
  /** Ratio to water ice, by the species of RATIO_TARGETS. */
  ratios: Record<string, number>;
  /** The ice species (outside the carriers) holding the largest share of one of its elements. */
  reservoir: { species: string; element: string; share: number };
  /** Names of the targets missed at this time. */
  missed: string[];
}

export interface DensityResult {
  density: number;
  status: 'ok' | 'failed';
  failure?: string;
  rows: Row[];
  /** Widest run of consecutive output times meeting every target, or undefined. */
  window?: { fromYr: number; toYr: number; dex: number };
  /** Largest share of its element any non-carrier ice species reaches over the run. */
  worstReservoir: { species: string; element: string; share: number; timeYr: number };
  /** Largest ratio to water ice of every ice species over the run (to spot runaways). */
  maxRatio: Record<string, number>;
  /** Ice abundance per H of every species (all ice forms summed), by gas name, at each row's time. */
  ice: Record<string, number[]>;
  /** Share of an element held by an ice species at each row's time. */
  share: (species: string, element: string) => number[];
}

export interface EvaluateOptions {
  densities?: number[];
  grain?: GrainOptions;
  /** Output times per decade of age from 1e3 to 1e7 yr. */
  perDecade?: number;
}

/**
 * Abundance of the whole ice of each species, by gas name: the output column
 * X(s), which is surface plus mantle when the three-phase ice is on (its
 * X(surface) and X(mantle) columns are the parts, not added again).
 */
function iceTotals(species: readonly string[], y: Float64Array, offset: number): Map<string, number> {
  const totals = new Map<string, number>();
  species.forEach((name, i) => {
    if (name.endsWith(ICE_SUFFIX)) totals.set(name.slice(0, -ICE_SUFFIX.length), y[offset + i]);
  });
  return totals;
}

export function evaluateIceTargets(network: Network, options: EvaluateOptions = {}): DensityResult[] {
  const densities = options.densities ?? TARGET_DENSITIES;
  const perDecade = options.perDecade ?? 10;
  const timesYr = outputTimesYr(1e3, 1e7, 4 * perDecade + 1);
  const initial = loadInitialComposition('low-metal', '.', network);
  const elementTotals = new Map<string, number>();
  for (const [name, x] of Object.entries(initial)) {
    const s = network.species[network.speciesIndex.get(name) ?? -1];
    if (!s) continue;
    for (const [el, n] of Object.entries(s.elements)) elementTotals.set(el, (elementTotals.get(el) ?? 0) + n * x);
  }
  const elementsOf = new Map(network.species.map((s) => [s.gasName, s.elements]));

  return densities.map((density) => {
    const conditions = { ...defaultConditions(), density, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 };
    const result = runModel({ network, conditions, grain: options.grain ?? DEFAULT_GRAIN_OPTIONS, initial, timesYr, solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 100000 } });
    const n = result.species.length;
    const rows: Row[] = [];
    const maxRatio: Record<string, number> = {};
    let worstReservoir = { species: '', element: '', share: 0, timeYr: 0 };
    const series: Record<string, number[]> = {};
    for (let k = 0; k < timesYr.length; k++) {
      if (!Number.isFinite(result.abundances[k * n])) break;
      const ice = iceTotals(result.species, result.abundances, k * n);
      for (const [name, x] of ice) (series[name] ??= []).push(x);
      const water = ice.get('H2O') ?? 0;
      const ratios: Record<string, number> = {};
      for (const t of RATIO_TARGETS) ratios[t.species] = (ice.get(t.species) ?? 0) / water;
      for (const [name, x] of ice) maxRatio[name] = Math.max(maxRatio[name] ?? 0, x / water);
      let reservoir = { species: '', element: '', share: 0 };
      for (const [name, x] of ice) {
        if (OBSERVED_CARRIERS.includes(name)) continue;
        for (const [el, count] of Object.entries(elementsOf.get(name) ?? {})) {
          if (!RESERVOIR_ELEMENTS.includes(el)) continue;
          const total = elementTotals.get(el);
          if (!total) continue;
          const share = (count * x) / total;
          if (share > reservoir.share) reservoir = { species: name, element: el, share };
        }
      }
      if (reservoir.share > worstReservoir.share) worstReservoir = { ...reservoir, timeYr: timesYr[k] };
      const missed: string[] = [];
      for (const t of RATIO_TARGETS) if (!(ratios[t.species] >= t.range[0] && ratios[t.species] <= t.range[1])) missed.push(t.species);
      if (!(water >= WATER_RANGE[0] && water <= WATER_RANGE[1])) missed.push('H2O');
      if (reservoir.share > RESERVOIR_LIMIT) missed.push(`${reservoir.species}>10%${reservoir.element}`);
      rows.push({ timeYr: timesYr[k], water, ratios, reservoir, missed });
    }
    const share = (species: string, element: string): number[] => {
      const count = elementsOf.get(species)?.[element] ?? 0;
      const total = elementTotals.get(element) ?? Number.NaN;
      return (series[species] ?? []).map((x) => (count * x) / total);
    };
    return { density, status: result.status, failure: result.failure, rows, window: widestWindow(rows), worstReservoir, maxRatio, ice: series, share };
  });
}

/** The widest run of consecutive rows with no target missed, as its first and last time. */
export function widestWindow(rows: Row[]): DensityResult['window'] {
  let best: DensityResult['window'];
  let start = -1;
  for (let k = 0; k <= rows.length; k++) {
    const ok = k < rows.length && rows[k].missed.length === 0;
    if (ok && start < 0) start = k;
    if (!ok && start >= 0) {
      const dex = Math.log10(rows[k - 1].timeYr / rows[start].timeYr);
      if (!best || dex > best.dex) best = { fromYr: rows[start].timeYr, toYr: rows[k - 1].timeYr, dex };
      start = -1;
    }
  }
  return best;
}

const fmt = (x: number): string => (x === 0 ? '0' : x.toExponential(2));

export function formatTable(results: DensityResult[]): string {
  const lines: string[] = [];
  const head = ['t_yr', 'H2O/H', ...RATIO_TARGETS.map((t) => `${t.species}/H2O`), 'largest other reservoir', 'missed'];
  for (const r of results) {
    lines.push(`n_H = ${fmt(r.density)} cm^-3, 10 K, A_V = 10, low-metal start: ${r.status}${r.failure ? ` (${r.failure})` : ''}`);
    lines.push(head.join('\t'));
    for (const row of r.rows) {
      const res = row.reservoir.species ? `${row.reservoir.species} ${(100 * row.reservoir.share).toFixed(1)}% of ${row.reservoir.element}` : '-';
      lines.push([fmt(row.timeYr), fmt(row.water), ...RATIO_TARGETS.map((t) => fmt(row.ratios[t.species])), res, row.missed.join(',') || 'none'].join('\t'));
    }
    const w = r.window;
    lines.push(
      w
        ? `widest window meeting every target: ${fmt(w.fromYr)} to ${fmt(w.toYr)} yr (${w.dex.toFixed(2)} dex; ${w.dex >= MIN_WINDOW_DEX ? 'wide enough' : `narrower than ${MIN_WINDOW_DEX} dex`})`
        : 'no output time meets every target',
    );
    const wr = r.worstReservoir;
    lines.push(`largest non-carrier ice reservoir of ${RESERVOIR_ELEMENTS.join(', ')}: ${wr.species || '-'} ${(100 * wr.share).toFixed(1)}% of ${wr.element} at ${fmt(wr.timeYr)} yr`);
    const top = Object.entries(r.maxRatio)
      .filter(([name]) => !OBSERVED_CARRIERS.includes(name))
      .sort((a, b) => b[1] - a[1])
      .slice(0, 8);
    lines.push(`largest ratios to water ice over the run (other species): ${top.map(([name, x]) => `${name} ${fmt(x)}`).join(', ')}`);
    lines.push('');
  }
  return lines.join('\n');
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const args = process.argv.slice(2);
  const file = args.find((a, i) => !a.startsWith('--') && args[i - 1] !== '--grain') ?? DEFAULT_NETWORK;
  // --grain '{"mantle": true, "three_body": true}': the pipeline's grain section, as JSON.
  const grainArg = args.indexOf('--grain');
  const grain = grainArg >= 0 ? grainOptionsOf(grainSection.parse(JSON.parse(args[grainArg + 1]))) : args.includes('--recommended') ? RECOMMENDED_GRAIN : undefined;
  const results = evaluateIceTargets(loadNetwork(resolve(file)), { grain });
  process.stdout.write(args.includes('--json') ? JSON.stringify(results, null, 2) + '\n' : formatTable(results));
}
