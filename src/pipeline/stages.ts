/**
 * The stage graph of `hoarfrost run`: observe, grid, fit, report, in that
 * order. A stage states what it reads (pipeline sections, files, earlier
 * stages' outputs); the runner hashes those inputs and skips the stage when
 * the hash matches the one recorded after its last successful run. The stage
 * implementations are parameters of the runner, so tests can give fakes.
 */
import { UserError } from '../config/errors.ts';
import type { Pipeline } from '../config/pipeline.ts';

export const STAGE_NAMES = ['observe', 'grid', 'fit', 'report'] as const;
export type StageName = (typeof STAGE_NAMES)[number];

export function isStageName(s: string): s is StageName {
  return (STAGE_NAMES as readonly string[]).includes(s);
}

/** Parse a stage name given on the command line, with a clear error for anything else. */
export function parseStageName(s: string, option: string): StageName {
  if (isStageName(s)) return s;
  throw new UserError(`unknown stage '${s}' for ${option}. The stages are, in order: ${STAGE_NAMES.join(', ')}.`);
}

export interface StageInputs {
  /** The parts of the pipeline configuration this stage reads (hashed as canonical JSON). */
  config: unknown;
  /** Files the stage reads, keyed by a role or a relative name (the key, not the path, enters the hash). */
  files: Record<string, string>;
  /** Earlier stages whose outputs this stage reads; their output hashes enter this stage's hash. */
  after: StageName[];
}

export interface StageOutcome<D> {
  /** One line for the terminal: what the stage did (counts, warnings). */
  summary: string;
  /** Files written, relative to the output folder, in a fixed order. */
  outputs: string[];
  /** Data handed to later stages in the same run. */
  data: D;
  /** Warnings the user should see (printed under the stage's line). */
  warnings?: string[];
}

export interface StageContext<M extends StageDataMap> {
  pipeline: Pipeline;
  /** Absolute output folder of the pipeline. */
  outDir: string;
  /** Worker threads for the grid (undefined: the stage's default). */
  workers?: number;
  /** Print a progress line (to stderr, so stdout stays the summary). */
  progress(line: string): void;
  /** The command as typed, for a record of how the outputs were made. */
  commandLine: readonly string[];
  /** Output hash of an earlier stage (this run's, or the recorded one). */
  outputHashOf(name: StageName): string | undefined;
  /** Data of an earlier stage: from this run, or reloaded from its outputs when it was skipped. */
  upstream<K extends StageName>(name: K): Promise<M[K]>;
}

export type StageDataMap = Record<StageName, unknown>;

export interface StageImpl<M extends StageDataMap, K extends StageName> {
  /**
   * What the stage reads. Called in stage order, after the earlier stages
   * have run or been skipped, so it may look at their data (the grid reads
   * the sightlines' A_V bins, not the whole observation set).
   */
  inputs(ctx: StageContext<M>): StageInputs | Promise<StageInputs>;
  run(ctx: StageContext<M>): Promise<StageOutcome<M[K]>>;
  /** Rebuild the stage's data from its outputs on disk (used when it was skipped and a later stage needs it). */
  load(ctx: StageContext<M>): Promise<M[K]>;
  /**
   * Hash of what the stage produced. Default: the contents of its output files.
   * The grid overrides it with a hash of the store's content, since the bytes of
   * an SQLite file depend on write order.
   */
  outputHash?(ctx: StageContext<M>, outputs: readonly string[]): string | Promise<string>;
}

export type StageSet<M extends StageDataMap> = { [K in StageName]: StageImpl<M, K> };
