/**
 * The fit stage as one call: candidate table, fit options and observed
 * quantities in; best fits, profiles, intervals, joint fits, map images and
 * the text of every table and JSON file out. It reads and writes nothing:
 * the caller (the `fit` command, the pipeline runner) loads the inputs and
 * writes `files` under the output folder.
 */
import type { FitSection } from '../config/sections/fit.ts';
import { throwProblems, UserError } from '../config/errors.ts';
import type { ObservationSet, ObservedQuantity } from '../obs/types.ts';
import { buildAxes, type GridAxes } from './axes.ts';
import type { ModelCovariance } from './covariance.ts';
import { MODEL_CAUTIONS } from './cautions.ts';
import type { FitContext, FitOptions } from './context.ts';
import { fitSightline } from './fit-sightline.ts';
import { holdParameters } from './held.ts';
import { fitJoint, type JointModelCovariance } from './joint.ts';
import { fitMap, type MapPixel } from './map.ts';
import { buildModelQuantities, collectTerms, termKey, type ModelQuantities, type QuantityTerm } from './model-quantities.ts';
import { interpolationError, refinableAxes, refinedSize, refineTable } from './refine.ts';
import { logCovariance, modelSigmaDex, type ModelUncertaintyMode, type RealizationLogs } from './model-spread.ts';
import { buildObservationVector, detectionCovariance, usedCount, type ObservationVector } from './observation-vector.ts';
import { PAIR_PARAMETERS, regionLevels, TABLE_LEVEL } from './regions.ts';
import { stageFiles } from './stage-files.ts';
import {
  AGE_PARAMETER,
  type CandidateTable,
  type FitStageResult,
  type InterpolationSummary,
  type JointFit,
  type MapFitImages,
  type ProfilesJson,
  type SightlineFit,
  type SightlineProfiles,
} from './types.ts';

/** A p-value above this, with more than one dof, means the errors are larger than the misfit (common practice: the other tail of the chi-square test). */
const SUSPICIOUSLY_GOOD_P = 0.99;
/** Unfitted sightlines named in the warning before the rest are elided. */
const MAX_LISTED_SIGHTLINES = 20;

/** Where the pipeline file is, for located errors (a LoadedYaml fits). */
export interface FitSource {
  file: string;
  lineOf?(path: readonly (string | number)[]): number | undefined;
}

export interface FitStageInput {
  table: CandidateTable;
  section: FitSection;
  observations: ObservationSet;
  /** Every sightline's observed quantities (from the observations room's deriveQuantities). */
  quantities: readonly ObservedQuantity[];
  /** Per sightline id: grid parameters held at one value (model A_V tied to the sightline's A_V). */
  held?: Readonly<Record<string, Readonly<Record<string, number>>>>;
  /**
   * Per sightline id: the spread (dex) of each quantity term's log10 over the
   * Monte Carlo realizations of the rate coefficients, by term key
   * (src/fit/model-spread.ts). Used as fit.model_uncertainty says; a term
   * without a spread keeps its floor.
   */
  modelSpread?: ReadonlyMap<string, ReadonlyMap<string, number>>;
  source?: FitSource;
  /**
   * A model covariance between quantity terms (dex^2; covariance.ts), e.g.
   * from a Monte Carlo over rate coefficients: it replaces the diagonal model
   * floor of the terms it names and makes them covary in every sightline's
   * chi^2 (and every pixel's).
   */
  modelCovariance?: ModelCovariance;
  /** Cautions of the model setup beyond the general ones (layered columns, a first stage, a physical track), each a sentence. */
  modelCautions?: readonly string[];
  /**
   * Per sightline id: the covariance (dex^2) of the quantity terms' log10 over
   * the Monte Carlo realizations at that sightline's best fit (the pipeline's
   * realizations; src/pipeline/realizations.ts modelCovarianceOf). With
   * fit.model_uncertainty spread it is the model part of that sightline's
   * covariance, off the diagonal too; with spread-and-floor the floor squared
   * joins its diagonal. For its sightline it takes the place of `modelSpread`
   * and of the global `modelCovariance`; floor ignores it.
   */
  sightlineModelCovariance?: ReadonlyMap<string, ModelCovariance>;
  /**
   * Per sightline id: its quantity terms' log10 at its best fit in each
   * realization (model-spread.ts). With fit.model_uncertainty spread or
   * spread-and-floor, a joint group whose members all have them takes the
   * model covariance between members from their common realizations, in
   * place of the floor's shared part alone (docs/statistics.md section 6).
   */
  realizationLogs?: ReadonlyMap<string, RealizationLogs>;
}

export interface FitStageOutput {
  result: FitStageResult;
  profiles: ProfilesJson;
  map?: MapFitImages;
  /** File text by path relative to the output folder (FIT_OUTPUT_FILES); map FITS images are the caller's to encode from `map`. */
  files: Record<string, string>;
}

function located(source: FitSource | undefined, path: (string | number)[], message: string): UserError {
  return new UserError(message, { file: source?.file, line: source?.lineOf?.(path), field: path.join('.') });
}

function checkOptions(section: FitSection, axes: GridAxes, table: CandidateTable, source: FitSource | undefined): void {
  const known = [...table.parameterNames, AGE_PARAMETER];
  const problems: UserError[] = [];
  const unknown = (name: string, path: (string | number)[]) =>
    problems.push(located(source, path, `'${name}' is not a parameter of the model grid; use one of ${known.join(', ')}.`));
  section.pairs.forEach(([x, y], i) => {
    if (!axes.byName.has(x)) unknown(x, ['fit', 'pairs', i, 0]);
    if (!axes.byName.has(y)) unknown(y, ['fit', 'pairs', i, 1]);
    if (x === y) problems.push(located(source, ['fit', 'pairs', i], `a pair needs two different parameters, found '${x}' twice.`));
  });
  section.joint.forEach((g, i) => {
    g.share.forEach((s, k) => {
      if (!axes.byName.has(s)) unknown(s, ['fit', 'joint', i, 'share', k]);
    });
  });
  if (section.model_sigma_shared_dex !== undefined && section.model_sigma_shared_dex > section.model_sigma_dex) {
    problems.push(located(source, ['fit', 'model_sigma_shared_dex'], `the shared part of the model floor (${section.model_sigma_shared_dex} dex) exceeds the floor itself (model_sigma_dex: ${section.model_sigma_dex} dex); it is a part of it: give at most ${section.model_sigma_dex}.`));
  }
  throwProblems(problems, 'the fit section has problems:');
}

/**
 * A ratio needs a measured reference. Where the reference is a limit on one
 * sightline, the observations room turns the ratio into a limit (a detection
 * over an upper limit bounds the ratio from below), which the fit takes as it
 * is; but a reference with only limits on every sightline leaves no ratio
 * measured anywhere, and that is an error of the set-up.
 */
function checkRatioReferences(observations: ObservationSet, quantities: readonly ObservedQuantity[], source: FitSource | undefined): void {
  const references = [...new Set(quantities.flatMap((q) => (q.denominator === undefined ? [] : [q.denominator])))];
  const problems: UserError[] = [];
  for (const ref of references) {
    const measured = observations.sightlines.filter((s) => s.columns[ref] !== undefined);
    if (measured.length > 0 && measured.every((s) => s.columns[ref].kind !== 'detection')) {
      const labels = [...new Set(quantities.filter((q) => q.denominator === ref).map((q) => q.label))];
      problems.push(
        located(
          source,
          ['fit', 'quantities'],
          `the ratios ${labels.join(', ')} are to ${ref}, which ${observations.file} gives only as a limit (on all ${measured.length} sightline(s) that list it), so no ratio is measured. ` +
            `Fit these species as abundances (fit.quantities: { species: ..., as: abundance }), or choose a reference detected on the sightlines (the quantity's reference, or observations.reference).`,
        ),
      );
    }
  }
  throwProblems(problems, 'ratios to reference species that have only limits:');
}

/**
 * A sightline whose model uncertainty comes from the realizations: a
 * detection with a zero error and a zero spread has no width (chi^2
 * undefined), and the realizations' covariance with the observational one
 * must be positive definite.
 */
function checkSpreadWidths(id: string, quantities: readonly ObservedQuantity[], terms: readonly QuantityTerm[], widths: FitOptions, section: FitSection, source: FitSource | undefined): void {
  const mc = widths.modelCovariance;
  const modelVariance = (key: string) => {
    const a = mc ? mc.keys.indexOf(key) : -1;
    return a >= 0 ? mc!.matrix[a * (mc!.keys.length + 1)] : (widths.termModelSigmaDex?.get(key) ?? widths.modelSigmaDex) ** 2;
  };
  const fix =
    section.model_uncertainty === 'spread'
      ? 'Give the detection its error, or use fit.model_uncertainty: spread-and-floor with fit.model_sigma_dex above 0 (a reaction network whose factors are all 1 has no spread).'
      : 'Give the detection its error, or a model floor above 0 (fit.model_sigma_dex).';
  for (const q of quantities) {
    if (q.kind !== 'detection' || !Number.isFinite(q.log10)) continue;
    const m2 = modelVariance(termKey(q.numerator, q.denominator));
    if (!(q.sigmaLoDex ** 2 + m2 > 0 && q.sigmaHiDex ** 2 + m2 > 0)) {
      throw located(
        source,
        ['fit', 'model_uncertainty'],
        `sightline ${id}: ${q.label} has no width: its error is ${q.sigmaLoDex === q.sigmaHiDex ? q.sigmaLoDex : `${q.sigmaLoDex}/${q.sigmaHiDex}`} dex and the realizations' spread of it is ${Math.sqrt(Math.max(0, m2))} dex (fit.model_uncertainty: ${section.model_uncertainty}), so chi^2 is undefined. ${fix}`,
      );
    }
  }
}

/**
 * buildObservationVector, with the one failure realizations can cause named
 * for the user: their covariance (rank at most realizations - 1, exactly
 * singular for quantities tied to each other) with zero observational errors
 * is not positive definite.
 */
function buildSpreadVector(id: string, quantities: readonly ObservedQuantity[], terms: readonly QuantityTerm[], widths: FitOptions, fromSpread: boolean, section: FitSection, source: FitSource | undefined): ObservationVector {
  try {
    return buildObservationVector(id, quantities, terms, widths);
  } catch (e) {
    if (!fromSpread || !(e instanceof RangeError) || !/not positive definite/.test(e.message)) throw e;
    throw located(
      source,
      ['fit', 'model_uncertainty'],
      `sightline ${id}: the covariance of its detections with the realizations' model covariance (fit.model_uncertainty: ${section.model_uncertainty}) is singular: the detections without an error are tied to each other in every realization. ` +
        'Give those detections their errors, use spread-and-floor with fit.model_sigma_dex above 0, or run more realizations (realizations.count).',
    );
  }
}

function checkWidths(section: FitSection, quantities: readonly ObservedQuantity[], source: FitSource | undefined): void {
  const broken = quantities.filter((q) => q.kind === 'detection' && Number.isFinite(q.log10) && !(q.sigmaLoDex >= 0 && q.sigmaHiDex >= 0 && Number.isFinite(q.sigmaLoDex) && Number.isFinite(q.sigmaHiDex)));
  throwProblems(
    broken.map((q) => new UserError(`sightline ${q.sightline}: ${q.label} has error ${q.sigmaLoDex}/${q.sigmaHiDex} dex; an error must be a finite number, 0 or more. Check its error column.`, { field: q.label })),
    'detections without a usable error:',
  );
  const floors = termFloors(section, quantities);
  const floorOf = (q: ObservedQuantity) => floors.get(termKey(q.numerator, q.denominator)) ?? section.model_sigma_dex;
  const unbounded = quantities.filter((q) => floorOf(q) === 0 && (q.kind === 'detection' ? q.sigmaLoDex === 0 || q.sigmaHiDex === 0 : section.limit_sigma_dex === 0));
  if (unbounded.length > 0) {
    const first = unbounded[0];
    throw located(
      source,
      ['fit', 'model_sigma_dex'],
      `${unbounded.length} quantit${unbounded.length === 1 ? 'y has' : 'ies have'} no width at all (first: ${first.kind === 'detection' ? 'the detection' : 'the limit'} ${first.label} of ${first.sightline}): a zero error and a zero model floor leave chi^2 undefined. ` +
        'Give the errors, a model floor above 0, or for limits fit.limit_sigma_dex above 0 (dex).',
    );
  }
}

/**
 * Term floors set per quantity: `{ species: S, as: abundance }` is the term S
 * alone, `{ species: S, as: ratio, reference: R }` the term S/R, and
 * `{ species: S, as: ratio }` the ratio of S to the observations' reference:
 * the one ratio term of S whose denominator no entry of S names itself.
 */
function termFloors(section: FitSection, quantities: readonly ObservedQuantity[]): Map<string, number> {
  const floors = new Map<string, number>();
  const named = new Set(section.quantities.flatMap((fq) => (fq.reference === undefined ? [] : [termKey(fq.species, fq.reference)])));
  for (const fq of section.quantities) {
    if (fq.model_sigma_dex === undefined) continue;
    for (const q of quantities) {
      if (q.numerator !== fq.species || (q.denominator !== undefined) !== (fq.as === 'ratio')) continue;
      const key = termKey(q.numerator, q.denominator);
      if (q.denominator !== undefined && (fq.reference !== undefined ? q.denominator !== fq.reference : named.has(key))) continue;
      floors.set(key, fq.model_sigma_dex);
    }
  }
  return floors;
}

/**
 * The scoring widths of one sightline with its realizations' spread folded in
 * as fit.model_uncertainty says: their covariance where given (the floor of
 * each term added on its diagonal for spread-and-floor), else the spread of
 * each term alone.
 */
function withModelSpread(
  options: FitOptions,
  terms: readonly QuantityTerm[],
  mode: ModelUncertaintyMode,
  spread: ReadonlyMap<string, number> | undefined,
  covariance: ModelCovariance | undefined,
  floors: ReadonlyMap<string, number>,
  interpolationDex: ReadonlyMap<string, number> | undefined,
): FitOptions {
  if (mode === 'floor') return options;
  // The floor as the user set it (options.termModelSigmaDex also holds the interpolation error, which stays in every mode).
  const floorOf = (key: string) => floors.get(key) ?? options.modelSigmaDex;
  const interpolationOf = (key: string) => interpolationDex?.get(key) ?? 0;
  if (covariance !== undefined) {
    const n = covariance.keys.length;
    if (covariance.matrix.length !== n * n) throw new RangeError(`a model covariance of ${n} terms has ${covariance.matrix.length} elements`);
    const matrix = Float64Array.from(covariance.matrix);
    covariance.keys.forEach((key, a) => {
      const extra = mode === 'spread-and-floor' ? Math.hypot(floorOf(key), interpolationOf(key)) : interpolationOf(key);
      matrix[a * (n + 1)] += extra * extra;
    });
    return { ...options, modelCovariance: { keys: [...covariance.keys], matrix } };
  }
  if (spread === undefined) return options;
  const perTerm = new Map(options.termModelSigmaDex ?? []);
  for (const t of terms) {
    const s = spread.get(t.key);
    if (s !== undefined) perTerm.set(t.key, Math.hypot(modelSigmaDex(mode, floorOf(t.key), s), interpolationOf(t.key)));
  }
  return { ...options, termModelSigmaDex: perTerm };
}

/**
 * A joint group's model covariance from the realizations (joint.ts
 * JointModelCovariance): each member's own block as its fit has it, and
 * between members the sample covariance of their model values over the
 * realizations they have in common, plus for spread-and-floor the floor's
 * shared part between the same term of two members. Undefined (the floor's
 * shared part alone, with a warning) when a member has no realizations or
 * fewer than two are common.
 */
function jointModelCovariance(
  members: readonly ObservationVector[],
  terms: readonly QuantityTerm[],
  widthsById: ReadonlyMap<string, FitOptions>,
  logs: ReadonlyMap<string, RealizationLogs> | undefined,
  options: FitOptions,
  floors: ReadonlyMap<string, number>,
  mode: ModelUncertaintyMode,
  name: string,
  warnings: string[],
): JointModelCovariance | undefined {
  if (logs === undefined) return undefined;
  const fallback =
    mode === 'spread'
      ? "no model error is shared by the members (fit.model_uncertainty: spread has no floor to share), so an error the rates make for all of them shrinks with their number; not the realizations' covariance. Run realizations at every member (realizations.sightlines)."
      : "the model error shared by the members is the floor's shared part (fit.model_sigma_shared_dex), not the realizations' covariance. Run realizations at every member (realizations.sightlines).";
  const missing = members.filter((m) => !logs.has(m.sightline)).map((m) => m.sightline);
  if (missing.length > 0) {
    warnings.push(`joint group ${name}: no realizations at the best fit of ${missing.join(', ')}: ${fallback}`);
    return undefined;
  }
  const memberLogs = members.map((m) => logs.get(m.sightline)!);
  const rowOf = memberLogs.map((l) => new Map(l.realizations.map((r, i) => [r, i])));
  const common = memberLogs[0].realizations.filter((r) => rowOf.every((rows) => rows.has(r)));
  if (common.length < 2) {
    warnings.push(`joint group ${name}: its members have ${common.length} realization(s) in common: ${fallback}`);
    return undefined;
  }
  // Each detection's column in its member's realization values (-1: a term without realizations, constant 0, so it covaries with nothing).
  const columns = members.flatMap((m, k) => Array.from(m.detections, (j) => memberLogs[k].keys.indexOf(terms[j].key)));
  const memberOf = members.flatMap((m, k) => Array.from(m.detections, () => k));
  const termOf = members.flatMap((m) => Array.from(m.detections));
  const d = columns.length;
  const vectors = common.map((r) => Float64Array.from({ length: d }, (_, a) => (columns[a] < 0 ? 0 : memberLogs[memberOf[a]].values[rowOf[memberOf[a]].get(r)!][columns[a]])));
  const between = logCovariance(vectors);
  if (mode === 'spread-and-floor') {
    for (let a = 0; a < d; a++) {
      for (let b = 0; b < d; b++) {
        if (memberOf[a] === memberOf[b] || termOf[a] !== termOf[b]) continue;
        const shared = Math.min(options.sharedModelSigmaDex, floors.get(terms[termOf[a]].key) ?? options.modelSigmaDex);
        between[a * d + b] += shared * shared;
      }
    }
  }
  const blocks = members.map((m) => detectionCovariance(m, terms, widthsById.get(m.sightline) ?? options));
  return { blocks, between };
}

export function fitOptions(section: FitSection): FitOptions {
  return {
    modelSigmaDex: section.model_sigma_dex,
    limitSigmaDex: section.limit_sigma_dex,
    correlatedErrors: section.correlated_errors,
    posterior: section.method === 'profile+posterior',
    sharedModelSigmaDex: Math.min(section.model_sigma_shared_dex ?? section.model_sigma_dex / Math.SQRT2, section.model_sigma_dex),
    levels: [],
    pairs: section.pairs.map(([x, y]) => [x, y] as [string, string]),
    agreementDex: Math.log10(section.agreement_factor),
    runnerUps: section.runner_ups,
    limitsInDof: section.limits_in_dof,
    poorFitP: section.poor_fit_p,
  };
}

/** Candidates a refined mesh may hold: the refinement factor is lowered until the mesh fits (about 100 MB of model values for ten quantities). */
const REFINED_CANDIDATES_BUDGET = 1_000_000;
/**
 * A map scores every candidate against every pixel: its mesh is refined only
 * while pixels x refined candidates stays within this many pairs (about the
 * benchmark map's 1.6e9 at the grid's own resolution, some 25 s on one core).
 */
const MAP_REFINED_PAIRS_BUDGET = 2e9;

/**
 * The refined table of a sightline fit (refine.ts), with the interpolation
 * error per term folded into the term floors. fit.refine: 1, a grid with
 * nothing to refine, or one whose mesh would pass the budget (smaller for a
 * map, whose cost grows with its pixels) keeps the grid's own table.
 */
function refineForFit(
  table: CandidateTable,
  axes: GridAxes,
  model: ModelQuantities,
  section: FitSection,
  held: FitStageInput['held'],
  warnings: string[],
  budget = REFINED_CANDIDATES_BUDGET,
): { table: CandidateTable; axes: GridAxes; model: ModelQuantities; summary?: InterpolationSummary; errorDex?: Map<string, number> } {
  const heldNames = new Set(Object.values(held ?? {}).flatMap((h) => Object.keys(h)));
  const names = refinableAxes(axes, heldNames);
  if (section.refine <= 1 || names.length === 0) return { table, axes, model };
  let factor = section.refine;
  while (factor > 1 && refinedSize(table, axes, names, factor) > budget) factor--;
  if (factor <= 1) {
    warnings.push(`the grid (${table.nModels * table.nTimes} candidates) is too large to refine within ${Math.round(budget)} candidates${budget < REFINED_CANDIDATES_BUDGET ? ' (for this map\'s pixels)' : ''}: best fits and intervals are read between grid values from the profiles alone.`);
    return { table, axes, model };
  }
  const error = interpolationError(table, axes, model, names);
  const refined = refineTable(table, axes, names, factor);
  const refinedAxes = buildAxes(refined.table);
  const refinedModel = buildModelQuantities(refined.table, model.terms);
  const byLabel = (m: Map<string, number>) => Object.fromEntries(model.terms.map((t) => [t.label, m.get(t.key) ?? 0]));
  return {
    table: refined.table,
    axes: refinedAxes,
    model: refinedModel,
    errorDex: error.errorDex,
    summary: {
      factor,
      axes: refined.axes,
      gridCandidates: table.nModels * table.nTimes,
      refinedCandidates: refined.table.nModels * refined.table.nTimes,
      errorDex: byLabel(error.errorDex),
      leaveOneOutDex: byLabel(error.leaveOneOutDex),
    },
  };
}

/** The median step of each fitted axis of positive values, dex: what "one grid step" means for the lock file's tolerance. */
function medianStepsDex(axes: GridAxes): Record<string, number> {
  const out: Record<string, number> = {};
  for (const name of axes.independent) {
    const v = axes.byName.get(name)!.values;
    if (!(v[0] > 0) || v.length < 2) continue;
    const steps = Array.from({ length: v.length - 1 }, (_, i) => Math.log10(v[i + 1] / v[i])).sort((a, b) => a - b);
    out[name] = steps[Math.floor((steps.length - 1) / 2)];
  }
  return out;
}

export function runFitStage(input: FitStageInput): FitStageOutput {
  const { section, observations, quantities, source } = input;
  let table = input.table;
  if (table.nModels === 0) throw new UserError('the model store holds no finished model to fit. Run the grid first (`hoarfrost grid`), and check its failures.', { file: source?.file });
  let axes = buildAxes(table);
  checkOptions(section, axes, table, source);
  const gridStepsDex = medianStepsDex(axes);
  checkRatioReferences(observations, quantities, source);
  checkWidths(section, quantities, source);

  const terms = collectTerms(quantities);
  if (terms.length === 0) {
    throw located(source, ['fit', 'quantities'], `no sightline of ${observations.file} has a value of any quantity in fit.quantities; check the species names against the observation columns.`);
  }
  let model = buildModelQuantities(table, terms, { file: source?.file });
  const options = fitOptions(section);
  const userFloors = termFloors(section, quantities);
  options.termModelSigmaDex = userFloors;
  let interpolationDex: Map<string, number> | undefined;
  if (input.modelCovariance) options.modelCovariance = input.modelCovariance;
  const refineWarnings: string[] = [];
  let interpolation: InterpolationSummary | undefined;
  {
    const budget = observations.kind === 'map' ? Math.min(REFINED_CANDIDATES_BUDGET, MAP_REFINED_PAIRS_BUDGET / Math.max(1, observations.sightlines.length)) : REFINED_CANDIDATES_BUDGET;
    const refined = refineForFit(table, axes, model, section, input.held, refineWarnings, budget);
    if (refined.summary && refined.errorDex) {
      ({ table, axes, model } = refined);
      interpolation = refined.summary;
      // The interpolation error joins each quantity's model floor in quadrature.
      const floors = new Map<string, number>();
      for (const t of model.terms) floors.set(t.key, Math.hypot(options.termModelSigmaDex.get(t.key) ?? options.modelSigmaDex, refined.errorDex.get(t.key) ?? 0));
      options.termModelSigmaDex = floors;
      interpolationDex = refined.errorDex;
    }
  }
  options.levels = regionLevels([...section.levels, TABLE_LEVEL], section.parameters_of_interest);
  const ctx: FitContext = { table, model, axes, options, chi2: new Float64Array(model.nCandidates) };

  const seen = new Map<string, string>();
  const duplicates: UserError[] = [];
  for (const s of observations.sightlines) {
    const where = s.source.row !== undefined ? `row ${s.source.row}` : s.source.line !== undefined ? `line ${s.source.line}` : s.pixel ? `pixel (${s.pixel.x}, ${s.pixel.y})` : 'an earlier entry';
    const first = seen.get(s.id);
    if (first !== undefined) duplicates.push(new UserError(`sightline id '${s.id}' is used twice (${first} and ${where}); each sightline needs its own id for its fit. Rename one.`, { file: s.source.file, row: s.source.row, line: s.source.line }));
    else seen.set(s.id, where);
  }
  throwProblems(duplicates, 'sightline ids used more than once:');
  const byId = new Map<string, ObservedQuantity[]>();
  for (const q of quantities) {
    const list = byId.get(q.sightline);
    if (list) list.push(q);
    else byId.set(q.sightline, [q]);
  }
  const vectors: ObservationVector[] = [];
  const widthsById = new Map<string, FitOptions>();
  const warnings: string[] = [...observations.warnings, ...refineWarnings];
  const unfitted: string[] = [];
  const isMap = observations.kind === 'map';
  if (isMap && section.joint.length > 0) {
    throw located(source, ['fit', 'joint'], 'joint groups combine sightlines of a table; this observation set is a map. Remove fit.joint, or fit a table of the positions to group.');
  }
  for (const s of isMap ? [] : observations.sightlines) {
    const widths = withModelSpread(options, terms, section.model_uncertainty, input.modelSpread?.get(s.id), input.sightlineModelCovariance?.get(s.id), userFloors, interpolationDex);
    if (widths !== options) checkSpreadWidths(s.id, byId.get(s.id) ?? [], terms, widths, section, source);
    const v = buildSpreadVector(s.id, byId.get(s.id) ?? [], terms, widths, widths !== options, section, source);
    widthsById.set(s.id, widths);
    if (usedCount(v) === 0) {
      unfitted.push(s.id);
      continue;
    }
    holdParameters(v, input.held?.[s.id] ?? {}, table, axes, { file: source?.file });
    vectors.push(v);
  }
  if (unfitted.length > 0) {
    warnings.push(`${unfitted.length} sightline(s) have none of the fitted quantities and are not fitted: ${unfitted.slice(0, MAX_LISTED_SIGHTLINES).join(', ')}${unfitted.length > MAX_LISTED_SIGHTLINES ? ', ...' : ''}.`);
  }

  const fits: SightlineFit[] = [];
  const profiles: SightlineProfiles[] = [];
  let map: MapFitImages | undefined;
  const tableLevel = options.levels.find((l) => l.level === TABLE_LEVEL)!;
  if (isMap) {
    if (!observations.map) throw new RangeError('a map observation set has no geometry');
    const { nx, ny } = observations.map;
    const pixels: MapPixel[] = [];
    for (const s of observations.sightlines) {
      if (!s.pixel || s.pixel.x < 0 || s.pixel.x >= nx || s.pixel.y < 0 || s.pixel.y >= ny) throw new RangeError(`map sightline ${s.id} has no pixel inside the ${nx} x ${ny} map`);
      pixels.push({ x: s.pixel.x, y: s.pixel.y, obs: buildObservationVector(s.id, byId.get(s.id) ?? [], terms, options) });
    }
    // The map loop compares held values by key; it needs no per-pixel model mask.
    for (const px of pixels) holdParameters(px.obs, input.held?.[px.obs.sightline] ?? {}, table, axes, { file: source?.file }, false);
    map = fitMap(ctx, nx, ny, pixels, tableLevel, { file: observations.file });
    warnings.push(...map.warnings);
  } else {
    if (vectors.length === 0) {
      throw located(source, ['fit', 'quantities'], `no sightline of ${observations.file} has a value of any quantity in fit.quantities (${terms.map((t) => t.label).join(', ')}).`);
    }
    for (const v of vectors) {
      const out = fitSightline(ctx, v);
      fits.push(out.fit);
      profiles.push(out.profiles);
    }
  }

  const joint: JointFit[] = [];
  const fromRealizations = new Set<string>();
  const jointProfiles: SightlineProfiles[] = [];
  const vectorById = new Map(vectors.map((v) => [v.sightline, v]));
  section.joint.forEach((g, i) => {
    const ids = g.sightlines === 'all' ? vectors.map((v) => v.sightline) : g.sightlines;
    const problems: UserError[] = [];
    const twice = ids.filter((id, k) => ids.indexOf(id) !== k);
    if (twice.length > 0) problems.push(located(source, ['fit', 'joint', i, 'sightlines'], `group ${g.name} lists ${[...new Set(twice)].join(', ')} more than once; each member counts once.`));
    const members: ObservationVector[] = [];
    ids.forEach((id, k) => {
      const v = vectorById.get(id);
      if (v === undefined) {
        const known = observations.sightlines.some((s) => s.id === id);
        problems.push(
          located(source, ['fit', 'joint', i, 'sightlines', k], known ? `sightline '${id}' has none of the fitted quantities, so it cannot join group ${g.name}; remove it from the group.` : `no sightline '${id}' in ${observations.file}; check the id.`),
        );
        return;
      }
      for (const s of g.share) {
        if (s in v.held) problems.push(located(source, ['fit', 'joint', i, 'share'], `group ${g.name} shares ${s}, but sightline '${id}' is held at its own ${s} (a tie to the sightlines in conditions): a held parameter cannot be shared.`));
      }
      members.push(v);
    });
    if (members.length < 2 && problems.length === 0) problems.push(located(source, ['fit', 'joint', i, 'sightlines'], `group ${g.name} needs at least two fitted sightlines, found ${members.length}.`));
    throwProblems(problems, `joint group ${g.name}:`);
    const realizations = section.model_uncertainty === 'floor' ? undefined : jointModelCovariance(members, terms, widthsById, input.realizationLogs, options, userFloors, section.model_uncertainty, g.name, warnings);
    let out: ReturnType<typeof fitJoint>;
    try {
      out = fitJoint(ctx, g.name, members, g.share, {
        modelCovariance: realizations,
        memberWidths: members.map((m) => widthsById.get(m.sightline) ?? options),
        // fit.model_uncertainty spread uses no floor, so there is no floor part to share; the realizations give the shared error where they ran.
        sharedFloor: section.model_uncertainty !== 'spread',
      });
    } catch (e) {
      if (realizations === undefined || !(e instanceof RangeError) || !/not positive definite/.test(e.message)) throw e;
      throw located(source, ['fit', 'joint', i], `joint group ${g.name}: the covariance of its members' detections with the realizations' model covariance (fit.model_uncertainty: ${section.model_uncertainty}) is singular. Give every detection its error, use spread-and-floor with fit.model_sigma_dex above 0, or run more realizations (realizations.count).`);
    }
    if (!Number.isFinite(out.fit.chi2)) {
      throw located(source, ['fit', 'joint', i], `the members of group ${g.name} have no common value of ${g.share.join(' and ')} among the models open to them (held parameters differ); share another parameter or split the group.`);
    }
    if (realizations !== undefined) fromRealizations.add(g.name);
    joint.push(out.fit);
    jointProfiles.push(out.profiles);
  });

  for (const [x, y] of options.pairs) {
    const dropped = vectors.filter((v) => x in v.held || y in v.held).length;
    const heldNames = [x, y].filter((n) => vectors.some((v) => n in v.held));
    if (dropped > 0) warnings.push(`no 2-D profile of (${x}, ${y}) for ${dropped} sightline(s): ${heldNames.join(' and ')} is held at each sightline's own value there, not fitted.`);
  }
  const tooGood = fits.filter((f) => f.pValue > SUSPICIOUSLY_GOOD_P && f.dof > 1).length;
  if (tooGood > 0) {
    warnings.push(
      `${tooGood} of ${fits.length} fits have chi2 far below their dof (p > ${SUSPICIOUSLY_GOOD_P}): the errors, or the ${section.model_sigma_dex} dex model floor, exceed the scatter of the data about the models, so the regions are set by the assumed floor rather than by the data; such a p-value does not show that the model is right (an error the model makes for every sightline alike is invisible in each fit).`,
    );
  }
  for (const j of joint) {
    if (!(j.pValue > SUSPICIOUSLY_GOOD_P && j.dof > 1)) continue;
    const head = `joint group ${j.name}: chi2 = ${j.chi2.toFixed(2)} is far below its dof (${j.dof}; p = ${j.pValue.toFixed(3)}): `;
    const tail = 'p near 1 does not show that the model is right, and a model error common to the members would not show in chi2.';
    if (fromRealizations.has(j.name)) {
      j.warnings.push(
        head +
          `the errors and the model uncertainty from the realizations${section.model_uncertainty === 'spread-and-floor' ? ` with the ${section.model_sigma_dex} dex floor` : ''} exceed the members' scatter about the models, so the regions are set by the model uncertainty, not by the data. ` +
          `Between members the model error is the realizations' covariance (the same rates for every sightline), not reduced by their number; ${tail}`,
      );
    } else if (section.model_uncertainty === 'spread') {
      j.warnings.push(head + `the errors and the realizations' spread exceed the members' scatter about the models, so the regions are set by the spread, not by the data. No model error is shared by the members here (no realizations at every member); ${tail}`);
    } else {
      j.warnings.push(
        head +
          `the errors and the ${section.model_sigma_dex} dex model floor exceed the members' scatter about the models, so the regions are set by the floor, not by the data. ` +
          `Of the floor, ${options.sharedModelSigmaDex.toFixed(2)} dex is one error shared by all ${j.members.length} members (fit.model_sigma_shared_dex), not reduced by their number; ${tail}`,
      );
    }
  }
  for (const f of fits) warnings.push(...f.warnings);
  for (const j of joint) warnings.push(...j.warnings);
  const fixedParameters: Record<string, number> = {};
  for (const a of axes.axes) if (!a.varied && a.name !== AGE_PARAMETER) fixedParameters[a.name] = a.values[0];
  const result: FitStageResult = {
    format: 'hoarfrost-fit/1',
    fittedParameters: [...axes.independent],
    fixedParameters,
    levels: options.levels,
    regionLevels: regionLevels([...section.levels, TABLE_LEVEL], PAIR_PARAMETERS),
    modelSigmaDex: section.model_sigma_dex,
    gridStepsDex,
    ...(interpolation ? { interpolation } : {}),
    poorFitP: section.poor_fit_p,
    nCandidates: model.nCandidates,
    fits,
    joint,
    warnings,
    cautions: [...MODEL_CAUTIONS, ...(input.modelCautions ?? [])],
  };
  const profilesJson: ProfilesJson = { format: 'hoarfrost-fit-profiles/1', levels: options.levels, sightlines: profiles, joint: jointProfiles };
  return { result, profiles: profilesJson, map, files: stageFiles(result, profilesJson, map, table, observations) };
}
