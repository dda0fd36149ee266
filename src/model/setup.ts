/**
 * The model setup: the network and every model option of a pipeline (grain
 * and photochemistry switches, initial composition, output times, solver
 * settings, mass-action-only), built once from the loaded pipeline. It alone
 * feeds `runModel`, the grid's workers, the model content hash and the store,
 * so an option added to ModelOptions (or to a section it mirrors) reaches all
 * of them without a second list to keep.
 */
import { loadNetwork } from '../chem/network.ts';
import type { Network } from '../chem/network-types.ts';
import { modelNetwork } from '../chem/mantle.ts';
import type { GrainOptions, PhysicalConditions } from '../config/conditions.ts';
import type { Pipeline } from '../config/pipeline.ts';
import type { FirstStageSpec } from '../config/sections/initial.ts';
import type { PhysicalTrackSection, TrackParameterName, TrackValueSpec } from '../config/sections/track.ts';
import { runFirstStage, type FirstStageResult } from './first-stage.ts';
import type { PhysicalTrack } from './physical-track.ts';
import { loadInitialComposition } from './initial.ts';
import { outputTimesYr } from './times.ts';
import type { ModelInput, ModelOptions } from './types.ts';

export interface ModelSetup {
  network: Network;
  /** Absolute path of the network file (a worker loads it again and checks its content hash). */
  networkFile: string;
  options: ModelOptions;
  /** Notes from building it, for the terminal (optional trace species the network lacks, dropped). */
  notes: string[];
  /** The first stage whose final composition is `options.initial`, when the pipeline has one. */
  firstStage?: FirstStageResult;
}

/** snake_case to camelCase, as a type: the pipeline's section keys become the options' field names. */
type Camel<S extends string> = S extends `${infer H}_${infer T}` ? `${H}${Capitalize<Camel<T>>}` : S;
type Camelised<T> = { [K in keyof T & string as Camel<K>]: T[K] };

/**
 * A pipeline section with its keys in camelCase. The compiler checks the
 * result against the option type it is assigned to, so a field added to
 * GrainOptions without its pipeline key (or the other way round) fails the
 * type check instead of being dropped.
 */
function camelised<T extends Record<string, unknown>>(section: T): Camelised<T> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(section)) out[key.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase())] = value;
  return out as Camelised<T>;
}

/** A pipeline's grain section (snake_case, defaults applied) as the model's grain options. */
export function grainOptionsOf(section: Pipeline['config']['grain']): GrainOptions {
  return camelised(section);
}

/** The pipeline's physical_track section as the model's track. */
export function physicalTrackOf(section: PhysicalTrackSection | undefined, values: Partial<Record<TrackParameterName, number>> = {}): PhysicalTrack | undefined {
  if (!section) return undefined;
  // A parameter that is a grid axis takes the point's value; without one (a single model), the axis's first value.
  const v = (name: TrackParameterName, spec: TrackValueSpec): number => values[name] ?? (typeof spec === 'number' ? spec : Array.isArray(spec) ? spec[0] : spec.from);
  if (section.kind === 'free-fall') return { kind: 'free-fall', finalDensity: v('final_density', section.final_density), retardation: v('retardation', section.retardation), avGrowth: section.av_growth };
  return { kind: 'warm-up', finalTemperature: v('final_temperature', section.final_temperature), durationYr: v('duration_yr', section.duration_yr), exponent: section.shape === 'linear' ? 1 : section.exponent! };
}

/** Notes for a single model (`hoarfrost model`, `hoarfrost spread`) of a pipeline whose track has grid axes: the value it takes of each. */
export function trackAxisNotes(section: PhysicalTrackSection | undefined): string[] {
  if (!section) return [];
  const notes: string[] = [];
  for (const [name, spec] of Object.entries(section)) {
    if (typeof spec !== 'object' || spec === null) continue;
    const s = spec as Exclude<TrackValueSpec, number>;
    const values = Array.isArray(s) ? s.join(', ') : `${s.from} to ${s.to}, ${s.count} values`;
    notes.push(`physical_track.${name} is a grid axis (${values}); this single model takes its first value, ${Array.isArray(s) ? s[0] : s.from}`);
  }
  return notes;
}

export interface SetupOverrides {
  massActionOnly?: boolean;
  /** Turn H2 self-shielding off whatever the pipeline says (`hoarfrost model --no-self-shielding`). */
  noSelfShielding?: boolean;
}

export function buildModelSetup(pipeline: Pipeline, overrides: SetupOverrides = {}): ModelSetup {
  const c = pipeline.config;
  const networkFile = pipeline.resolvePath(c.network);
  const network = loadNetwork(networkFile);
  const notes: string[] = [];
  const grain = grainOptionsOf(c.grain);
  const photochemistry = camelised(c.photochemistry);
  const shared = {
    grain,
    photochemistry: { ...photochemistry, h2SelfShielding: photochemistry.h2SelfShielding && !overrides.noSelfShielding },
    solver: camelised(c.solver),
    massActionOnly: overrides.massActionOnly ?? false,
  };
  const at = { file: pipeline.file, lineOf: pipeline.yaml.lineOf };
  let initial: Record<string, number>;
  let firstStage: FirstStageResult | undefined;
  if (typeof c.initial === 'object' && 'first_stage' in c.initial) {
    // The first stage's final composition starts every model (docs/cloud-structure.md section 2).
    firstStage = runFirstStage(c.initial.first_stage as FirstStageSpec, { network, options: shared, baseDir: pipeline.dir, outputDir: pipeline.resolvePath(c.output), notes, at });
    initial = firstStage.composition;
    notes.push(`first stage: ${firstStage.ageYr} yr at n_H = ${firstStage.conditions.density} cm^-3, A_V = ${firstStage.conditions.visual_extinction} mag, T = ${firstStage.conditions.gas_temperature} K (${firstStage.cached ? 'read from' : 'computed into'} ${firstStage.file}); ages count from its end`);
  } else {
    // With the mantle on, the initial composition may give mantle abundances (X(mantle)).
    initial = loadInitialComposition(c.initial as string | Record<string, number>, pipeline.dir, modelNetwork(network, grain), notes, at);
  }
  const options: ModelOptions = {
    ...shared,
    initial,
    timesYr: outputTimesYr(c.times.start_yr, c.times.end_yr, c.times.count),
    track: physicalTrackOf(c.physical_track),
  };
  return { network, networkFile, options, notes, firstStage };
}

/** The input of one model of the setup. */
export function modelInput(setup: Pick<ModelSetup, 'network' | 'options'>, conditions: PhysicalConditions): ModelInput {
  return { network: setup.network, conditions, ...setup.options };
}
