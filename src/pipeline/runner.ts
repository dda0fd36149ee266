/**
 * Runs the stages of a pipeline in order, skipping each one whose inputs
 * (the pipeline sections it reads, the files it reads, the output hashes of
 * the stages before it, the tool version) hash the same as at its last
 * successful run and whose outputs are still there, unchanged.
 *
 * `from`: that stage and every later one run even when unchanged; earlier
 * ones are brought up to date as usual (skipped when unchanged), so a forced
 * stage never reads stale inputs.
 * `only`: that stage alone runs, on whatever the earlier stages left; the
 * runner warns when those are out of date with the pipeline file.
 * `stages` (the verbs grid, fit, observations): these stages run, each
 * skipped when unchanged unless listed in `force`; the others are left as
 * they are, as with `only`.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../config/errors.ts';
import type { Pipeline } from '../config/pipeline.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { hashFiles, hashValue } from './hash.ts';
import { STAGE_NAMES, type StageContext, type StageDataMap, type StageInputs, type StageName, type StageSet } from './stages.ts';
import { readState, writeState, type StageState } from './state.ts';

export type StageStatus = 'ran' | 'skipped' | 'not run';

export interface StageReport {
  name: StageName;
  status: StageStatus;
  seconds: number;
  inputHash?: string;
  outputHash?: string;
  summary: string;
  warnings: string[];
  outputs: string[];
}

export interface RunOptions {
  from?: StageName;
  only?: StageName;
  /** Run these stages alone (in stage order); the others are left as they are. */
  stages?: readonly StageName[];
  /** Run these stages even when unchanged. */
  force?: readonly StageName[];
  /** How the user asked for the selection, for messages (`--only fit`, `hoarfrost fit`). */
  asked?: string;
  workers?: number;
  commandLine?: readonly string[];
  /** Receives one line per stage, as it finishes. */
  onStage?(report: StageReport): void;
  /** Progress and warnings that are not a stage's summary. */
  progress?(line: string): void;
}

export interface RunResult<M extends StageDataMap = StageDataMap> {
  outDir: string;
  stages: StageReport[];
  /** Data of the stages that ran in this call. */
  data: { [K in StageName]?: M[K] };
  /** Data of any stage: from this call, or reloaded from the outputs it left. */
  dataOf<K extends StageName>(name: K): Promise<M[K]>;
  state: StageState;
  startedAt: string;
  finishedAt: string;
}

/** Absolute output folder named by the pipeline file. */
export function outputFolder(pipeline: Pipeline): string {
  return pipeline.resolvePath(pipeline.config.output);
}

export async function runStages<M extends StageDataMap>(pipeline: Pipeline, impls: StageSet<M>, options: RunOptions = {}): Promise<RunResult<M>> {
  const startedAt = new Date().toISOString();
  const outDir = outputFolder(pipeline);
  const progress = options.progress ?? (() => undefined);
  const state = readState(outDir);
  const outputHashes = new Map<StageName, string>();
  const data = new Map<StageName, Promise<unknown>>();

  const ctx: StageContext<M> = {
    pipeline,
    outDir,
    workers: options.workers,
    progress,
    commandLine: options.commandLine ?? [],
    outputHashOf: (name) => outputHashes.get(name) ?? state[name]?.outputHash,
    upstream: <K extends StageName>(name: K): Promise<M[K]> => {
      let d = data.get(name);
      if (!d) {
        if (!state[name]) {
          return Promise.reject(new UserError(`the ${name} stage has no results in ${outDir} yet. ${whatToRun(name)}`));
        }
        d = impls[name].load(ctx);
        data.set(name, d);
      }
      return d as Promise<M[K]>;
    },
  };

  const outputHashOf = async (name: StageName, outputs: readonly string[]): Promise<string | undefined> => {
    if (!outputs.every((o) => existsSync(join(outDir, o)))) return undefined;
    const impl = impls[name];
    if (impl.outputHash) return impl.outputHash(ctx, outputs);
    const files: Record<string, string> = {};
    for (const o of outputs) files[o] = join(outDir, o);
    return hashFiles(files);
  };

  const reports: StageReport[] = [];
  const ran: { [K in StageName]?: M[K] } = {};
  const fromIndex = options.from ? STAGE_NAMES.indexOf(options.from) : Infinity;
  const chosen: readonly StageName[] = options.only ? [options.only] : (options.stages ?? STAGE_NAMES);
  const partial = chosen.length < STAGE_NAMES.length;
  const lastChosen = Math.max(...chosen.map((n) => STAGE_NAMES.indexOf(n)));
  const asked = options.asked ?? (options.only ? `--only ${options.only}` : 'this command');
  for (const [index, name] of STAGE_NAMES.entries()) {
    const impl = impls[name];
    const record = state[name];
    const selected = chosen.includes(name);
    let inputs: StageInputs;
    try {
      inputs = await impl.inputs(ctx);
    } catch (e) {
      if (selected) throw e;
      // A stage left as it was whose inputs cannot be read now (an earlier stage never ran) is out of date.
      inputs = { config: null, files: {}, after: [...STAGE_NAMES.slice(0, index)] };
    }
    const forced = options.only === name || index >= fromIndex || (options.force ?? []).includes(name);
    const upstreamHashes: Record<string, string> = {};
    for (const u of inputs.after) {
      const h = outputHashes.get(u) ?? state[u]?.outputHash;
      if (h !== undefined) upstreamHashes[u] = h;
      else if (selected) {
        if (partial) throw new UserError(`the ${name} stage needs the results of the ${u} stage, and there are none in ${outDir}. ${whatToRun(u)}`);
        throw new Error(`stage ${name} reads ${u}, which has not run before it`);
      }
    }
    const complete = Object.keys(upstreamHashes).length === inputs.after.length;
    const inputHash = complete ? hashValue({ stage: name, tool: TOOL_VERSION, config: inputs.config, files: hashFiles(inputs.files), upstream: upstreamHashes }) : undefined;

    if (!selected) {
      if (record) outputHashes.set(name, record.outputHash);
      const stale = !record || record.inputHash !== inputHash;
      const report: StageReport = { name, status: 'not run', seconds: 0, inputHash: record?.inputHash, outputHash: record?.outputHash, summary: record ? `left as it was${stale ? ' (out of date with the pipeline file)' : ''}` : 'never run', warnings: [], outputs: record?.outputs ?? [] };
      if (stale && index < lastChosen) {
        report.warnings.push(`the ${name} stage is out of date with the pipeline file; ${asked} uses its old results.`);
      }
      reports.push(report);
      options.onStage?.(report);
      continue;
    }

    const t0 = performance.now();
    if (!forced && record && record.inputHash === inputHash) {
      const current = await outputHashOf(name, record.outputs);
      if (current === record.outputHash) {
        outputHashes.set(name, record.outputHash);
        const report: StageReport = { name, status: 'skipped', seconds: (performance.now() - t0) / 1000, inputHash, outputHash: record.outputHash, summary: record.summary, warnings: [], outputs: record.outputs };
        reports.push(report);
        options.onStage?.(report);
        continue;
      }
    }

    delete state[name];
    writeState(outDir, state);
    const outcome = await impl.run(ctx);
    data.set(name, Promise.resolve(outcome.data));
    ran[name] = outcome.data;
    const outputHash = await outputHashOf(name, outcome.outputs);
    if (outputHash === undefined) {
      const missing = outcome.outputs.filter((o) => !existsSync(join(outDir, o)));
      throw new Error(`stage ${name} reported outputs it did not write: ${missing.join(', ')}`);
    }
    const seconds = (performance.now() - t0) / 1000;
    state[name] = { inputHash: inputHash!, outputHash, outputs: outcome.outputs, summary: outcome.summary, finishedAt: new Date().toISOString(), seconds };
    writeState(outDir, state);
    outputHashes.set(name, outputHash);
    const report: StageReport = { name, status: 'ran', seconds, inputHash, outputHash, summary: outcome.summary, warnings: outcome.warnings ?? [], outputs: outcome.outputs };
    reports.push(report);
    options.onStage?.(report);
  }
  return { outDir, stages: reports, data: ran, dataOf: ctx.upstream, state, startedAt, finishedAt: new Date().toISOString() };
}

/** What to run to give a stage results. */
function whatToRun(stage: StageName): string {
  if (stage === 'grid') return 'Compute the grid first: hoarfrost grid PIPELINE (or the whole pipeline: hoarfrost run PIPELINE).';
  return 'Run the whole pipeline first: hoarfrost run PIPELINE.';
}

/** The terminal line of one stage: name, what happened, the time it took, the summary. */
export function formatStageLine(r: StageReport): string {
  const status = r.status === 'skipped' ? 'unchanged' : r.status;
  return `${r.name.padEnd(8)} ${status.padEnd(10)} ${formatSeconds(r.seconds).padStart(8)}  ${r.summary}`;
}

function formatSeconds(s: number): string {
  if (s < 60) return `${s.toFixed(s < 10 ? 2 : 1)} s`;
  const m = Math.floor(s / 60);
  return `${m} min ${Math.round(s - 60 * m)} s`;
}
