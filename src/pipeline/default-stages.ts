/**
 * The real stages of `hoarfrost run`, each a thin adapter between the stage
 * runner and the room that does the work: observations (src/obs), the model
 * grid (src/grid), the fit (src/fit) and the report (src/report). Each says
 * which pipeline sections and files it reads, so an unchanged stage is
 * skipped, and writes its results under the output folder so a later run can
 * reload them instead of recomputing.
 */
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { writeOutput as writeOutputFile } from '../config/write.ts';
import { basename, dirname, extname, join, relative, sep } from 'node:path';
import { isTableFile } from '../chem/network-table.ts';
import { toCsv } from '../config/csv.ts';
import { UserError } from '../config/errors.ts';
import type { Pipeline } from '../config/pipeline.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { FIT_OUTPUT_FILES, MAP_IMAGE_NAMES, type FitStageResult, type MapFitJson, type ProfilesJson } from '../fit/types.ts';
import { mainStoreFile, type GridPlan } from '../grid/plan.ts';
import type { GridRunResult, RunGridOptions } from '../grid/run.ts';
import type { Shard } from '../grid/shard.ts';
import { DEFAULT_BAND_TABLE, deriveQuantities, loadObservations, sidecarPath, type ObservationSet, type ObservedQuantity } from '../obs/index.ts';
import type { ReportProvenance } from '../report/types.ts';
import { hashFile } from './hash.ts';
import { heldParameters } from './held.ts';
import type { StageContext, StageImpl, StageSet } from './stages.ts';
import type { SpreadReport } from './realizations.ts';
import { loadTracks } from './tracks.ts';
import { modelCautions } from './model-cautions.ts';

export interface ObserveData {
  observations: ObservationSet;
  quantities: ObservedQuantity[];
}
export interface GridData {
  storeFile: string;
  /** What the grid did, when it ran in this process. */
  run?: GridRunResult;
}
export interface FitData {
  result: FitStageResult;
  profiles?: ProfilesJson;
  map?: MapFitJson;
  /** Monte Carlo realizations at the best fits (the pipeline's `realizations:` section). */
  spread?: SpreadReport;
}
export interface ReportData {
  html: string;
}
export interface PipelineData {
  observe: ObserveData;
  grid: GridData;
  fit: FitData;
  report: ReportData;
}

const OBSERVATIONS_JSON = 'observations/observations.json';
const QUANTITIES_CSV = 'observations/quantities.csv';
/** The grid's store of a whole grid (src/grid/plan.ts names it). */
const STORE_DIR = 'store';
const REPORT_DIR = 'report';
/** Outputs of the realizations at the best fits (src/pipeline/realizations.ts). */
const SPREAD_JSON = 'fit/spread.json';
const SENSITIVITY_CSV = 'fit/sensitivity.csv';
const SENSITIVITY_TOP_CSV = 'fit/sensitivity_top10.csv';
/** Progress lines of a grid that is not on a terminal: at most one per this many ms. */
const GRID_PROGRESS_INTERVAL_MS = 5000;

function writeOutput(outDir: string, rel: string, text: string | Uint8Array): void {
  const file = join(outDir, rel);
  mkdirSync(dirname(file), { recursive: true });
  writeOutputFile(file, text);
}

function readJson<T>(outDir: string, rel: string, stage: string): T {
  const file = join(outDir, rel);
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as T;
  } catch {
    throw new UserError(`the ${stage} stage's output is missing or unreadable; rerun with --from ${stage}.`, { file });
  }
}

/** A path relative to the output folder, with forward slashes (the same on every machine). */
function relOut(outDir: string, file: string): string {
  return relative(outDir, file).split(sep).join('/');
}

function observationsSection(pipeline: Pipeline) {
  const section = pipeline.config.observations;
  if (!section) {
    throw new UserError('the pipeline has no `observations:` section; `hoarfrost run` fits observations and needs one (give at least `file:`).', { file: pipeline.file, line: pipeline.yaml.lineOf([]) });
  }
  return section;
}

function fitSection(pipeline: Pipeline) {
  const section = pipeline.config.fit;
  if (!section) throw new UserError('the pipeline has no `fit:` section; name the quantities to fit under `fit: quantities:`.', { file: pipeline.file });
  return section;
}

/** The network file and, for a CSV/TSV network, the column mapping beside it. */
function networkFiles(pipeline: Pipeline): Record<string, string> {
  const network = pipeline.resolvePath(pipeline.config.network);
  if (!isTableFile(network)) return { network };
  return { network, network_mapping: join(dirname(network), basename(network, extname(network)) + '.mapping.yaml') };
}

/** The files the observation readers read: the data, its column mapping, the band strengths. */
function observationFiles(pipeline: Pipeline): Record<string, string> {
  const s = observationsSection(pipeline);
  const data = pipeline.resolvePath(s.file);
  if (!existsSync(data)) {
    throw new UserError(`the observations file ${s.file} does not exist (looked for ${data}). Paths are relative to the pipeline file's folder; fix the path, or create the file (\`hoarfrost init DIR\` makes an example).`, {
      file: pipeline.file,
      line: pipeline.yaml.lineOf(['observations', 'file']),
      field: 'observations.file',
    });
  }
  const files: Record<string, string> = { observations: data, ...networkFiles(pipeline) };
  files.columns = s.columns_file ? pipeline.resolvePath(s.columns_file) : sidecarPath(data);
  files.band_strengths = s.band_strengths ? pipeline.resolvePath(s.band_strengths) : DEFAULT_BAND_TABLE;
  return files;
}

/** The species whose quantities the fit asks for, as the observations room takes them. */
function wantedQuantities(pipeline: Pipeline) {
  return fitSection(pipeline).quantities;
}

/**
 * The observation set with every path made relative to the pipeline's folder
 * (forward slashes), so what the observe stage saves, and what the later
 * stages read, is the same in every clone.
 */
function portable(set: ObservationSet, baseDir: string): ObservationSet {
  const rel = (file: string) => relative(baseDir, file).split(sep).join('/') || '.';
  const prefix = baseDir.endsWith(sep) ? baseDir : baseDir + sep;
  const text = (t: string) => t.split(prefix).join('');
  return {
    ...set,
    file: rel(set.file),
    sightlines: set.sightlines.map((s) => ({ ...s, source: { ...s.source, file: rel(s.source.file) } })),
    warnings: set.warnings.map(text),
  };
}

function quantitiesCsv(quantities: readonly ObservedQuantity[]): string {
  const header = ['sightline', 'quantity', 'kind', 'log10', 'sigma_lo_dex', 'sigma_hi_dex'];
  return toCsv(header, quantities.map((q) => [q.sightline, q.label, q.kind, q.log10, q.sigmaLoDex, q.sigmaHiDex]));
}

/** The observations as the pipeline reads them: its section, species checked against its network. */
export async function readObservationSet(pipeline: Pipeline): Promise<ObservationSet> {
  const { loadNetwork } = await import('../chem/network.ts');
  const network = loadNetwork(pipeline.resolvePath(pipeline.config.network));
  return loadObservations(observationsSection(pipeline), pipeline.dir, new Set(network.species.map((s) => s.name)));
}

/** The observe stage's work without writing anything: the observation set and the quantities the fit asks for. */
export async function readObservations(pipeline: Pipeline): Promise<ObserveData & { warnings: string[] }> {
  const observations = await readObservationSet(pipeline);
  const derived = deriveQuantities(observations, observationsSection(pipeline), wantedQuantities(pipeline));
  return { observations, quantities: derived.quantities, warnings: [...observations.warnings, ...derived.warnings] };
}

const observe: StageImpl<PipelineData, 'observe'> = {
  inputs: ({ pipeline }) => ({ config: { observations: observationsSection(pipeline), quantities: wantedQuantities(pipeline) }, files: observationFiles(pipeline), after: [] }),
  run: async ({ pipeline, outDir }) => {
    const { observations, quantities, warnings } = await readObservations(pipeline);
    const saved: ObserveData = { observations: portable(observations, pipeline.dir), quantities };
    writeOutput(outDir, OBSERVATIONS_JSON, `${JSON.stringify(saved, null, 1)}\n`);
    writeOutput(outDir, QUANTITIES_CSV, quantitiesCsv(quantities));
    const nSightlines = observations.sightlines.length;
    const limits = quantities.filter((q) => q.kind !== 'detection').length;
    return {
      summary: `${nSightlines} ${observations.kind === 'map' ? 'pixels' : 'sightlines'}, ${quantities.length} quantities (${limits} limits)${warnings.length ? `, ${warnings.length} warnings` : ''}`,
      outputs: [OBSERVATIONS_JSON, QUANTITIES_CSV],
      data: saved,
      warnings,
    };
  },
  load: async ({ outDir }) => readJson<ObserveData>(outDir, OBSERVATIONS_JSON, 'observe'),
};

function sightlineAvs(observations: ObservationSet, pipeline: Pipeline): number[] {
  const missing = observations.sightlines.filter((s) => s.av === undefined).map((s) => s.id);
  if (missing.length > 0) {
    throw new UserError(
      `conditions.visual_extinction is tied to the sightlines, but ${missing.length} sightline(s) have no A_V: ${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ', ...' : ''}. Give their A_V, or set visual_extinction to values.`,
      { file: pipeline.file, field: 'conditions.visual_extinction' },
    );
  }
  return observations.sightlines.map((s) => s.av!);
}

/**
 * The grid plan of a pipeline: the one policy every verb meets. With the
 * model A_V tied to the sightlines, every sightline needs an A_V (none is
 * dropped); `observations` is asked for only then.
 */
export async function pipelineGridPlan(pipeline: Pipeline, observations: () => Promise<ObservationSet>): Promise<GridPlan> {
  const { planGrid } = await import('../grid/plan.ts');
  const { checkLayeredObservations } = await import('./columns.ts');
  checkLayeredObservations(pipeline);
  return planGrid(pipeline, needsSightlineTie(pipeline) ? sightlineAvs(await observations(), pipeline) : undefined);
}

/** The exclusion rules of a plan that match no point: a likely typo in the pipeline. */
export function unusedRuleWarnings(plan: GridPlan): string[] {
  return plan.grid.unusedRules.map((i) => `exclusion rule ${i + 1} matches no grid point.`);
}

/** The grid plan of a pipeline outside a run of the stages (slurm, merge, a shard, --status): the observations read as the observe stage reads them. */
export function standaloneGridPlan(pipeline: Pipeline): Promise<GridPlan> {
  return pipelineGridPlan(pipeline, async () => (await readObservations(pipeline)).observations);
}

/** A grid stopped by a signal before it was complete; the finished models are kept. */
export class GridStopped extends UserError {
  constructor(readonly result: GridRunResult) {
    super(`the grid was stopped with ${result.remaining} of ${result.share} models still to compute; the finished ones are kept in the store. Run again to go on.`, { file: result.storeFile });
  }
}

export interface GridStageOptions {
  /** Recompute models that failed before. */
  retryFailed?: boolean;
  onStart?: RunGridOptions['onStart'];
  /** Progress after each model; by default a line through the stage's progress at most every few seconds. */
  onProgress?: RunGridOptions['onProgress'];
  /** Stop signals of a caller that handles Ctrl-C and SIGTERM itself; without them the stage handles Ctrl-C. */
  signals?: { drain: AbortSignal; abort: AbortSignal };
}

/**
 * The grid stage's work: compute the plan's missing and stale models, of
 * the whole grid or, for a batch system's array task, of one shard into its
 * own store (a shard is not the stage: the stage state is left alone). A grid
 * stopped before it is complete throws GridStopped.
 */
export async function computeGrid(pipeline: Pipeline, plan: GridPlan, options: GridStageOptions & { workers?: number; shard?: Shard; progress(line: string): void }): Promise<GridRunResult> {
  const { runGrid } = await import('../grid/run.ts');
  const { progress } = options;
  let signals = options.signals;
  let onSigint: (() => void) | undefined;
  if (!signals) {
    const drain = new AbortController();
    signals = { drain: drain.signal, abort: new AbortController().signal };
    onSigint = () => {
      progress('stopping: letting the models in flight finish (Ctrl-C again to stop at once)');
      drain.abort();
      process.once('SIGINT', () => process.exit(130));
    };
    process.once('SIGINT', onSigint);
  }
  let lastLine = 0;
  try {
    const r = await runGrid(pipeline, {
      plan,
      workers: options.workers,
      shard: options.shard,
      retryFailed: options.retryFailed,
      drainSignal: signals.drain,
      abortSignal: signals.abort,
      onStart: options.onStart ?? ((info) => progress(`grid: ${info.share} models, ${info.upToDate} already in the store, ${info.todo} to compute on ${info.workers} worker${info.workers === 1 ? '' : 's'}${info.note ? ` (${info.note})` : ''}`)),
      onProgress:
        options.onProgress ??
        ((p) => {
          const now = performance.now();
          if (p.done < p.total && now - lastLine < GRID_PROGRESS_INTERVAL_MS) return;
          lastLine = now;
          const left = p.remainingMs === undefined ? '' : `, about ${Math.ceil(p.remainingMs / 1000)} s left`;
          progress(`grid: ${p.done}/${p.total} models${p.failed ? `, ${p.failed} failed` : ''}, ${p.ratePerMinute.toFixed(0)} per minute${left}`);
        }),
    });
    if (r.interrupted || r.remaining > 0) throw new GridStopped(r);
    return r;
  } finally {
    if (onSigint) process.removeListener('SIGINT', onSigint);
  }
}

function gridStage(options: GridStageOptions): StageImpl<PipelineData, 'grid'> {
  let planned: Promise<GridPlan> | undefined;
  const plan = (ctx: StageContext<PipelineData>) => (planned ??= pipelineGridPlan(ctx.pipeline, async () => (await ctx.upstream('observe')).observations));
  return {
    // The grid hash covers every point's conditions and model hash, and so the
    // whole model setup (network contents, options, tool version): nothing
    // else of the pipeline changes a model. With the model A_V tied to the
    // sightlines it holds their A_V bins alone, so a change of the observed
    // columns leaves the grid as it is.
    inputs: async (ctx) => ({ config: { grid: (await plan(ctx)).gridHash }, files: {}, after: [] }),
    run: async (ctx) => {
      const { pipeline, outDir, progress } = ctx;
      const planned = await plan(ctx);
      const r = await computeGrid(pipeline, planned, { ...options, workers: ctx.workers, progress });
      const ok = r.share - Object.values(r.failureReasons).reduce((a, b) => a + b, 0);
      const reasons = Object.entries(r.failureReasons).map(([reason, n]) => `${n} x ${reason}`);
      const warnings = unusedRuleWarnings(planned);
      if (reasons.length) warnings.push(`failed models (left out of the fit): ${reasons.join('; ')}`);
      else if (ok === 0) warnings.push('no model finished');
      return {
        summary: `${r.gridPoints} models (${r.computed} computed, ${r.upToDate} from the store${r.failed ? `, ${r.failed} failed` : ''})`,
        outputs: [relOut(outDir, r.storeFile)],
        data: { storeFile: r.storeFile, run: r },
        warnings,
      };
    },
    load: async ({ outDir }) => ({ storeFile: mainStoreFile({ storeDir: join(outDir, STORE_DIR) }) }),
    // The bytes of an SQLite file depend on write order: the store hashes its own content.
    outputHash: async ({ outDir }) => {
      const { storeContentHash } = await import('../grid/store.ts');
      return storeContentHash(mainStoreFile({ storeDir: join(outDir, STORE_DIR) }));
    },
  };
}

/** The fit and the report use exactly the finished grid the pipeline plans, or refuse saying what to run. */
async function checkStore(ctx: StageContext<PipelineData>, storeFile: string): Promise<void> {
  const { checkFinishedGrid } = await import('../grid/status.ts');
  checkFinishedGrid(storeFile, await pipelineGridPlan(ctx.pipeline, async () => (await ctx.upstream('observe')).observations));
}

function needsSightlineTie(pipeline: Pipeline): boolean {
  return Object.values(pipeline.config.conditions).some((a) => typeof a === 'object' && !Array.isArray(a) && (('tie' in a && a.tie === 'sightlines') || 'layers' in a));
}

const fit: StageImpl<PipelineData, 'fit'> = {
  inputs: ({ pipeline }) => ({
    config: { fit: fitSection(pipeline), conditions: pipeline.config.conditions, modelAvFraction: pipeline.config.observations?.model_av_fraction, realizations: pipeline.config.realizations, cautions: modelCautions(pipeline) },
    files: {},
    after: ['observe', 'grid'],
  }),
  run: async (ctx) => {
    const { pipeline, outDir } = ctx;
    const { runFitStage } = await import('../fit/stage.ts');
    const { mapJson } = await import('../fit/stage-files.ts');
    const { fitCandidates } = await import('./columns.ts');
    const { observations, quantities } = await ctx.upstream('observe');
    const { storeFile } = await ctx.upstream('grid');
    await checkStore(ctx, storeFile);
    const species = new Set<string>();
    for (const q of quantities) {
      species.add(q.numerator);
      if (q.denominator) species.add(q.denominator);
    }
    const { table, warnings: columnWarnings } = fitCandidates(pipeline, storeFile, [...species].sort(), observations);
    const fitInput = {
      table,
      section: fitSection(pipeline),
      observations,
      quantities,
      held: heldParameters(pipeline, observations),
      source: { file: pipeline.file, lineOf: pipeline.yaml.lineOf },
      modelCautions: modelCautions(pipeline),
    };
    let out = runFitStage(fitInput);
    const outputs: string[] = [];
    let spread: SpreadReport | undefined;
    const stageNotes: string[] = [];
    const realizations = pipeline.config.realizations;
    if (realizations && out.result.fits.length > 0) {
      const { spreadAtBestFits, modelSpreadOf, modelCovarianceOf, SENSITIVITY_CSV_HEADER, TOP_REACTIONS } = await import('./realizations.ts');
      const plan = await pipelineGridPlan(pipeline, async () => observations);
      const r = await spreadAtBestFits(pipeline, plan, out.result, realizations, { workers: ctx.workers, progress: ctx.progress });
      spread = r.report;
      writeOutput(outDir, SPREAD_JSON, `${JSON.stringify(spread, null, 1)}\n`);
      writeOutput(outDir, SENSITIVITY_CSV, toCsv(SENSITIVITY_CSV_HEADER, r.csvRows));
      // The rank is the fourth column: the top ten of every quantity and of chi^2, per sightline.
      writeOutput(outDir, SENSITIVITY_TOP_CSV, toCsv(SENSITIVITY_CSV_HEADER, r.csvRows.filter((row) => (row[3] as number) <= TOP_REACTIONS)));
      outputs.push(SPREAD_JSON, SENSITIVITY_CSV, SENSITIVITY_TOP_CSV);
      // One pass: the spread and covariance at the floor fit's best fits widen and correlate each sightline's quantities, and the fit is made again with them.
      if (fitInput.section.model_uncertainty !== 'floor') out = runFitStage({ ...fitInput, modelSpread: modelSpreadOf(spread), sightlineModelCovariance: modelCovarianceOf(spread), realizationLogs: r.logs });
    } else {
      if (realizations) stageNotes.push('realizations: not run: they run at the best fits of sightlines, and this fit has none (a map is fitted pixel by pixel; see docs/uncertainty.md section 8).');
      // A spread of an earlier run without realizations now would be read back as this run's.
      for (const rel of [SPREAD_JSON, SENSITIVITY_CSV, SENSITIVITY_TOP_CSV]) rmSync(join(outDir, rel), { force: true });
    }
    for (const [rel, text] of Object.entries(out.files)) {
      writeOutput(outDir, rel, text);
      outputs.push(rel);
    }
    const map = out.map ? mapJson(out.map) : undefined;
    const warnings = [...columnWarnings, ...out.result.warnings, ...stageNotes];
    if (map) {
      const { writeMapImages } = await import('../report/maps.ts');
      const files = writeMapImages(map, observations.map, warnings, MAP_IMAGE_NAMES, (name) => join(outDir, `${FIT_OUTPUT_FILES.mapImagePrefix}${name}.fits`));
      outputs.push(...files.map((f) => relOut(outDir, f)));
    }
    const poor = out.result.fits.filter((f) => f.warnings.length > 0).length;
    const n = out.map ? `${out.map.fittedPixels} pixels` : `${out.result.fits.length} sightlines`;
    return {
      summary: `${n} fitted against ${out.result.interpolation ? `${out.result.interpolation.gridCandidates} candidates (mesh x${out.result.interpolation.factor}: ${out.result.nCandidates})` : `${out.result.nCandidates} candidates`}${poor ? `, ${poor} with warnings` : ''}`,
      outputs: outputs.sort(),
      data: { result: out.result, profiles: out.profiles, map, spread },
      warnings,
    };
  },
  load: async ({ outDir }) => ({
    result: readJson<FitStageResult>(outDir, FIT_OUTPUT_FILES.fitJson, 'fit'),
    profiles: existsSync(join(outDir, FIT_OUTPUT_FILES.profilesJson)) ? readJson<ProfilesJson>(outDir, FIT_OUTPUT_FILES.profilesJson, 'fit') : undefined,
    map: existsSync(join(outDir, FIT_OUTPUT_FILES.mapJson)) ? readJson<MapFitJson>(outDir, FIT_OUTPUT_FILES.mapJson, 'fit') : undefined,
    spread: existsSync(join(outDir, SPREAD_JSON)) ? readJson<SpreadReport>(outDir, SPREAD_JSON, 'fit') : undefined,
  }),
};

const report: StageImpl<PipelineData, 'report'> = {
  inputs: ({ pipeline }) => ({ config: { name: pipeline.config.name, report: pipeline.config.report }, files: {}, after: ['observe', 'grid', 'fit'] }),
  run: async (ctx) => {
    const { pipeline, outDir } = ctx;
    const { writeReport } = await import('../report/index.ts');
    const { fitCandidates } = await import('./columns.ts');
    const { reportSection } = await import('../config/sections/report.ts');
    const { observations, quantities } = await ctx.upstream('observe');
    const { storeFile } = await ctx.upstream('grid');
    await checkStore(ctx, storeFile);
    const { result, profiles, map, spread } = await ctx.upstream('fit');
    const config = pipeline.config.report ?? reportSection.parse({});
    const { spreadForReport } = await import('./realizations.ts');
    const withSpread = spreadForReport(loadTracks(storeFile, result, config.runner_up_tracks, (species) => fitCandidates(pipeline, storeFile, species, observations).table), spread);
    const files = await writeReport(
      {
        title: config.title ?? pipeline.config.name,
        config,
        configFile: pipeline.file,
        fit: result,
        profiles,
        map,
        observations,
        quantities,
        tracks: withSpread.tracks,
        ...(withSpread.sensitivity ? { sensitivity: withSpread.sensitivity } : {}),
        provenance: reportProvenance(ctx),
      },
      join(outDir, REPORT_DIR),
    );
    return {
      summary: `${files.figures.length} figures, tables and ${relOut(outDir, files.html)}`,
      outputs: files.all.map((f) => relOut(outDir, f)).sort(),
      data: { html: files.html },
      warnings: files.warnings,
    };
  },
  load: async ({ outDir }) => ({ html: join(outDir, REPORT_DIR, 'index.html') }),
};

/**
 * The provenance shown in the report: versions and content hashes, no
 * timestamps (those are in OUT/provenance.json), so an unchanged run makes
 * the same page.
 */
function reportProvenance(ctx: StageContext<PipelineData>): ReportProvenance {
  const { pipeline } = ctx;
  const hashes: Record<string, string> = {
    pipeline: hashFile(pipeline.file) ?? 'missing',
    network: hashFile(pipeline.resolvePath(pipeline.config.network)) ?? 'missing',
  };
  for (const [key, stage] of [['observations', 'observe'], ['store', 'grid'], ['fit', 'fit']] as const) {
    const h = ctx.outputHashOf(stage);
    if (h) hashes[key] = h;
  }
  return {
    toolVersion: TOOL_VERSION,
    nodeVersion: process.version,
    commandLine: [...ctx.commandLine],
    pipelineFile: pipeline.file,
    hashes,
  };
}

export interface StageOptions {
  grid?: GridStageOptions;
}

export function defaultStages(options: StageOptions = {}): StageSet<PipelineData> {
  return { observe, grid: gridStage(options.grid ?? {}), fit, report };
}
