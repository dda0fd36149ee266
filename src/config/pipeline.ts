/**
 * The pipeline file: one YAML document naming the observations, the network,
 * the grid of conditions, the output times, the fit and the report. Each
 * section's schema lives in sections/ beside this file; this file joins them,
 * resolves paths against the pipeline file's folder, and validates once at
 * the edge: inside, code trusts the types.
 */
import { existsSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { z } from 'zod';
import { DEFAULT_SURFACE_LAYERS, ICE_PHOTOLYSIS_FACTOR } from './conditions.ts';
import { UserError } from './errors.ts';
import { loadYamlFile, validate, type LoadedYaml } from './yaml.ts';
import { MAX_OUTPUT_TIMES } from './limits.ts';
import { observationsSection } from './sections/observations.ts';
import { conditionsSection, excludeSection } from './sections/conditions.ts';
import { fitSection } from './sections/fit.ts';
import { reportSection } from './sections/report.ts';
import { realizationsSection } from './sections/realizations.ts';
import { initialSection } from './sections/initial.ts';
import { physicalTrackSection } from './sections/track.ts';

export const timesSection = z
  .object({
    start_yr: z.number().positive().default(1e3),
    end_yr: z.number().positive().default(1e7),
    /** Output times, spaced logarithmically from start to end. */
    count: z.number().int().min(2).max(MAX_OUTPUT_TIMES, { message: `at most ${MAX_OUTPUT_TIMES} output times per model (see src/config/limits.ts)` }).default(41),
  })
  .strict()
  .refine((t) => t.start_yr < t.end_yr, { path: ['end_yr'], message: 'output times need start_yr < end_yr; swap them, or make end_yr the later time' });

export const solverSection = z
  .object({
    rtol: z.number().positive().lt(1).default(1e-6),
    atol: z.number().positive().default(1e-25),
    max_steps: z.number().int().positive().default(50000),
  })
  .strict();

export const grainSection = z
  .object({
    tunnelling: z.boolean().default(false),
    diffusion_competition: z.boolean().default(false),
    /** surface: H(s) + H(s), up to about 15 K dust; parametric: Jura 1975; hollenbach-mckee: Hollenbach & McKee 1979, for warmer dust. */
    h2_formation: z.enum(['surface', 'parametric', 'hollenbach-mckee']).default('surface'),
    /** Non-diffusive surface chemistry (Jin & Garrod 2020; Garrod et al. 2022): docs/ice-nondiffusive.md. */
    three_body: z.boolean().default(false),
    eley_rideal: z.boolean().default(false),
    photodissociation_induced: z.boolean().default(false),
    /** Ice photolysis derived from the gas-phase photoreactions, at ice_photolysis_factor times their rate. */
    ice_photolysis: z.boolean().default(false),
    ice_photolysis_factor: z.number().min(0).default(ICE_PHOTOLYSIS_FACTOR),
    /** Three-phase ice: reactive surface over an inert mantle (docs/ice-mantle.md). Off by default. */
    mantle: z.boolean().default(false),
    /** Monolayers of the reactive surface when the mantle is on (default DEFAULT_SURFACE_LAYERS, with its source in conditions.ts). */
    surface_layers: z.number().positive().default(DEFAULT_SURFACE_LAYERS),
  })
  .strict();

/** Gas-phase photochemistry switches. */
export const photochemistrySection = z
  .object({
    /** H2 photodissociation shielded by the H2 column (Draine & Bertoldi 1996); off gives the unshielded rate. */
    h2_self_shielding: z.boolean().default(true),
  })
  .strict();


export const pipelineSchema = z
  .object({
    name: z.string().default('pipeline'),
    /** Output folder, relative to the pipeline file. */
    output: z.string().default('out'),
    network: z.string(),
    observations: observationsSection.optional(),
    conditions: conditionsSection.default({}),
    /** Grid points to leave out (see sections/conditions.ts). */
    exclude: excludeSection.default([]),
    // prefault: an absent section is parsed as {}, so each default is written once, in its section.
    grain: grainSection.prefault({}),
    photochemistry: photochemistrySection.prefault({}),
    initial: initialSection.default('low-metal'),
    /** Conditions that change with time (sections/track.ts); absent: static conditions. */
    physical_track: physicalTrackSection.optional(),
    times: timesSection.prefault({}),
    solver: solverSection.prefault({}),
    fit: fitSection.optional(),
    /** Monte Carlo realizations of the rate coefficients at the best fits (docs/uncertainty.md). */
    realizations: realizationsSection.optional(),
    report: reportSection.optional(),
  })
  .strict();

export type PipelineConfig = z.infer<typeof pipelineSchema>;

export interface Pipeline {
  file: string;
  /** Folder of the pipeline file; relative paths resolve against it. */
  dir: string;
  config: PipelineConfig;
  yaml: LoadedYaml;
  /** Absolute path of a path written in the file. */
  resolvePath(p: string): string;
}

export function loadPipeline(file: string): Pipeline {
  const yaml = loadYamlFile(file, 'pipeline file');
  const config = validate(pipelineSchema, yaml);
  const dir = dirname(resolve(file));
  checkOutputFolder(resolve(dir, config.output), yaml);
  return { file, dir, config, yaml, resolvePath: (p) => resolve(dir, p) };
}

/** The output folder, or the nearest part of its path that exists, must be a folder: a file there would stop every stage at its first write. */
function checkOutputFolder(output: string, yaml: LoadedYaml): void {
  let p = output;
  while (!existsSync(p) && dirname(p) !== p) p = dirname(p);
  if (!statSync(p).isDirectory()) {
    const which = p === output ? 'the output folder' : `${p}, on the path of the output folder ${output},`;
    throw new UserError(`expected a folder, but ${which} is a file. Give another output path, or move the file away.`, { file: yaml.file, line: yaml.lineOf(['output']), field: 'output' });
  }
}
