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
import { MODEL_CAUTIONS } from './cautions.ts';
import type { FitContext, FitOptions } from './context.ts';
import { fitSightline } from './fit-sightline.ts';
import { holdParameters } from './held.ts';
import { fitJoint } from './joint.ts';
import { fitMap, type MapPixel } from './map.ts';
import { buildModelQuantities, collectTerms, termKey } from './model-quantities.ts';
import { buildObservationVector, usedCount, type ObservationVector } from './observation-vector.ts';
import { regionLevels, TABLE_LEVEL } from './regions.ts';
import { stageFiles } from './stage-files.ts';
import {
  AGE_PARAMETER,
  type CandidateTable,
  type FitStageResult,
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
  source?: FitSource;
  /** Cautions of the model setup beyond the general ones (layered columns, a first stage, a physical track), each a sentence. */
  modelCautions?: readonly string[];
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
  throwProblems(problems, 'the fit section names parameters the model grid lacks:');
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

export function fitOptions(section: FitSection): FitOptions {
  return {
    modelSigmaDex: section.model_sigma_dex,
    limitSigmaDex: section.limit_sigma_dex,
    levels: [],
    pairs: section.pairs.map(([x, y]) => [x, y] as [string, string]),
    agreementDex: Math.log10(section.agreement_factor),
    runnerUps: section.runner_ups,
    limitsInDof: section.limits_in_dof,
    poorFitP: section.poor_fit_p,
  };
}

export function runFitStage(input: FitStageInput): FitStageOutput {
  const { table, section, observations, quantities, source } = input;
  if (table.nModels === 0) throw new UserError('the model store holds no finished model to fit. Run the grid first (`hoarfrost grid`), and check its failures.', { file: source?.file });
  const axes = buildAxes(table);
  checkOptions(section, axes, table, source);
  checkRatioReferences(observations, quantities, source);
  checkWidths(section, quantities, source);

  const terms = collectTerms(quantities);
  if (terms.length === 0) {
    throw located(source, ['fit', 'quantities'], `no sightline of ${observations.file} has a value of any quantity in fit.quantities; check the species names against the observation columns.`);
  }
  const model = buildModelQuantities(table, terms, { file: source?.file });
  const options = fitOptions(section);
  options.termModelSigmaDex = termFloors(section, quantities);
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
  const warnings: string[] = [...observations.warnings];
  const unfitted: string[] = [];
  const isMap = observations.kind === 'map';
  if (isMap && section.joint.length > 0) {
    throw located(source, ['fit', 'joint'], 'joint groups combine sightlines of a table; this observation set is a map. Remove fit.joint, or fit a table of the positions to group.');
  }
  for (const s of isMap ? [] : observations.sightlines) {
    const v = buildObservationVector(s.id, byId.get(s.id) ?? [], terms, options);
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
    const out = fitJoint(ctx, g.name, members, g.share);
    if (!Number.isFinite(out.fit.chi2)) {
      throw located(source, ['fit', 'joint', i], `the members of group ${g.name} have no common value of ${g.share.join(' and ')} among the models open to them (held parameters differ); share another parameter or split the group.`);
    }
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
      `${tooGood} of ${fits.length} fits have chi2 far below their dof (p > ${SUSPICIOUSLY_GOOD_P}): the errors, or the ${section.model_sigma_dex} dex model floor, exceed the scatter of the data about the models; the regions are then wider (more cautious) than the data alone would give.`,
    );
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
    modelSigmaDex: section.model_sigma_dex,
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
