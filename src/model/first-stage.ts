/**
 * A first stage (docs/cloud-structure.md section 2): a model of its own
 * (conditions and an age, from its own initial composition) whose final
 * composition starts every model of the pipeline, e.g. a translucent phase
 * (n_H about 1e3, A_V about 1-2 mag: common practice) before the dense one.
 *
 * It is computed once per distinct first stage: its result is kept under
 * OUT/first-stage/<hash>.json, the hash covering everything that changes it
 * (tool version, network contents, grain and photochemistry options, solver
 * settings, its composition, conditions and age). The composition it gives
 * becomes the setup's `initial` record, so the model hash of every grid
 * point covers it with no further list.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { modelNetwork } from '../chem/mantle.ts';
import type { Network } from '../chem/network-types.ts';
import { checkConditionValue, defaultConditions, isConditionName, type PhysicalConditions } from '../config/conditions.ts';
import { throwProblems, UserError } from '../config/errors.ts';
import type { FirstStageSpec } from '../config/sections/initial.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { loadInitialComposition, type InitialSpecAt } from './initial.ts';
import { runModel } from './run.ts';
import type { ModelOptions } from './types.ts';

const FIRST_STAGE_TAG = 'hoarfrost-first-stage-v1';
export const FIRST_STAGE_DIR = 'first-stage';

export interface FirstStageResult {
  /** Final fractional abundances of the first stage (species above zero), the second stage's initial composition. */
  composition: Record<string, number>;
  conditions: PhysicalConditions;
  ageYr: number;
  hash: string;
  /** Where the result is kept, and whether it was read from there. */
  file: string;
  cached: boolean;
}

/** JSON with object keys sorted, so equal inputs give equal text. */
function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_, v: unknown) => {
    if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
    if (v && typeof v === 'object' && !Array.isArray(v)) return Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
    return v;
  });
}

/** The first stage's conditions: defaults, then the given values, every name and value checked. */
function stageConditions(given: Record<string, number>, at?: InitialSpecAt): PhysicalConditions {
  const conditions = defaultConditions();
  const problems: UserError[] = [];
  for (const [name, value] of Object.entries(given)) {
    const where = { file: at?.file, line: at?.lineOf(['initial', 'first_stage', 'conditions', name]), field: `initial.first_stage.conditions.${name}` };
    if (!isConditionName(name)) {
      problems.push(new UserError(`unknown condition '${name}' of the first stage.`, where));
      continue;
    }
    const bad = checkConditionValue(name, value);
    if (bad) problems.push(new UserError(`${bad}.`, where));
    else conditions[name] = value;
  }
  throwProblems(problems, `${problems.length} problems with the first stage's conditions:`, { file: at?.file });
  return conditions;
}

export interface FirstStageContext {
  network: Network;
  /** The pipeline's model options (grain, photochemistry, solver); its `initial` and times are not used. */
  options: Omit<ModelOptions, 'initial' | 'timesYr'>;
  baseDir: string;
  /** Output folder of the pipeline: the result is kept in its first-stage/ folder. */
  outputDir: string;
  notes: string[];
  at?: InitialSpecAt;
}

export function runFirstStage(spec: FirstStageSpec, ctx: FirstStageContext): FirstStageResult {
  const { network, options } = ctx;
  const from = loadInitialComposition(spec.from, ctx.baseDir, modelNetwork(network, options.grain), ctx.notes, ctx.at);
  const conditions = stageConditions(spec.conditions, ctx.at);
  const inputs = { tool: TOOL_VERSION, network: network.contentHash, grain: options.grain, photochemistry: options.photochemistry, solver: options.solver, massActionOnly: options.massActionOnly, from, conditions, ageYr: spec.age_yr };
  const hash = createHash('sha256').update(FIRST_STAGE_TAG).update(canonicalJson(inputs)).digest('hex');
  const file = join(ctx.outputDir, FIRST_STAGE_DIR, `${hash.slice(0, 32)}.json`);
  if (existsSync(file)) {
    try {
      const saved = JSON.parse(readFileSync(file, 'utf8')) as { hash: string; composition: Record<string, number> };
      if (saved.hash === hash) return { composition: saved.composition, conditions, ageYr: spec.age_yr, hash, file, cached: true };
    } catch {
      // An unreadable file is recomputed and written again below.
    }
  }
  const result = runModel({ network, conditions, grain: options.grain, photochemistry: options.photochemistry, solver: options.solver, massActionOnly: options.massActionOnly, initial: from, timesYr: Float64Array.of(spec.age_yr) });
  if (result.status !== 'ok' || !result.finalState) {
    throw new UserError(`the first stage (${spec.age_yr} yr at n_H = ${conditions.density} cm^-3, A_V = ${conditions.visual_extinction} mag) failed: ${result.failure ?? 'no state reached'}. Change its conditions or age, or the solver settings.`, {
      file: ctx.at?.file,
      line: ctx.at?.lineOf(['initial', 'first_stage']),
      field: 'initial.first_stage',
    });
  }
  // Species above zero; the solver's round-off negatives (|x| far below atol) are dropped.
  const composition: Record<string, number> = {};
  const { species, values } = result.finalState;
  species.forEach((name, i) => {
    if (values[i] > 0) composition[name] = values[i];
  });
  mkdirSync(join(ctx.outputDir, FIRST_STAGE_DIR), { recursive: true });
  const text = `${JSON.stringify({ hash, inputs: { ...inputs, network: { name: network.name, content_hash: network.contentHash } }, composition }, null, 1)}\n`;
  // Written whole under a temporary name, then renamed, so that a reader never sees half a file.
  const partial = `${file}.${process.pid}.part`;
  writeFileSync(partial, text);
  renameSync(partial, file);
  return { composition, conditions, ageYr: spec.age_yr, hash, file, cached: false };
}
