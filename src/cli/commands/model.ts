/**
 * `hoarfrost model PIPELINE.yaml [--set key=value ...] [--out DIR] [--species LIST]
 * [--emit-system FILE] [--mass-action-only]`: run one gas-grain model for the
 * fixed conditions of a pipeline file and write abundances against time
 * (CSV, JSON), a figure of chosen species (SVG and its Vega-Lite spec), and a
 * summary on the terminal.
 */
import { mkdirSync } from 'node:fs';
import { writeOutput as writeOutputFile } from '../../config/write.ts';
import { join, resolve } from 'node:path';
import type { Command } from 'commander';
import type { TopLevelSpec } from 'vega-lite';
import type { CommandContext } from '../main.ts';
import { CONDITION_NAMES, checkConditionValue, defaultConditions, isConditionName, type PhysicalConditions } from '../../config/conditions.ts';
import { toCsv } from '../../config/csv.ts';
import { throwProblems, UserError } from '../../config/errors.ts';
import type { Pipeline } from '../../config/pipeline.ts';
import type { ModelResult } from '../../model/types.ts';
import { logAxis } from '../../report/figures/axes.ts';
import { numberText } from '../../report/numbers.ts';
import { CATEGORY_COLOURS, CATEGORY_DASHES, figureConfig } from '../../report/theme.ts';

/** Species drawn when --species is not given, those of them the network has (the ices and gas a dark-cloud study looks at first). */
const DEFAULT_FIGURE_SPECIES = ['CO', 'CO(s)', 'H2O(s)', 'CO2(s)', 'CH3OH(s)', 'NH3(s)', 'HCO+', 'e-'];
/** Abundances below this are not drawn on the log axis (they are all in the CSV). */
const FIGURE_FLOOR = 1e-14;
/** Ices given relative to water ice in the summary, as observers quote them (Boogert, Gerakines & Whittet 2015). */
const WATER_ICE = 'H2O(s)';
const ICE_RATIO_SPECIES = ['CO(s)', 'CO2(s)', 'CH3OH(s)', 'NH3(s)', 'CH4(s)'];
/** Species listed in the terminal summary. */
const SUMMARY_COUNT = 8;
/** Resolution of the quick-look PNG, dots per inch (journals ask 300 for raster art: common practice). */
const MODEL_PNG_DPI = 300;

interface ModelOptions {
  set?: string[];
  out?: string;
  species?: string;
  emitSystem?: string;
  massActionOnly?: boolean;
  selfShielding?: boolean;
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('model')
    .description('run one gas-grain model for the fixed conditions of a pipeline file and write its abundances against time')
    .argument('<pipeline>', 'pipeline YAML file (its network, conditions, grain, initial, times and solver sections are used)')
    .option('--set <key=value...>', 'override physical conditions, e.g. --set density=2e4 gas_temperature=10')
    .option('--out <dir>', 'output folder (default: <output of the pipeline>/model)')
    .option('--species <list>', `comma-separated species for the figure (default: those of ${DEFAULT_FIGURE_SPECIES.join(', ')} in the network)`)
    .option('--emit-system <file>', 'also write the compiled mass-action system as JSON (species, y0, times_s, terms, and omitted: every term left out, named with why)')
    .option('--mass-action-only', 'leave out the terms that are not mass-action (all photodesorption, H2 self-shielding, parametric H2)')
    .option('--no-self-shielding', 'photodissociate H2 at the unshielded rate (default: shielded by its column, Draine & Bertoldi 1996)')
    .action(async (file: string, opts: ModelOptions) => {
      await runModelCommand(file, opts, ctx);
    });
}

async function runModelCommand(file: string, opts: ModelOptions, ctx: CommandContext): Promise<void> {
  const { loadPipeline } = await import('../../config/pipeline.ts');
  const { compile } = await import('../../chem/system.ts');
  const { YEAR_SECONDS } = await import('../../chem/constants.ts');
  const { buildModelSetup, modelInput, runModel, initialState } = await import('../../model/run.ts');
  const { trackAxisNotes } = await import('../../model/setup.ts');

  const pipeline = loadPipeline(file);
  const cfg = pipeline.config;
  const conditions = resolveConditions(pipeline, opts.set ?? []);
  const setup = buildModelSetup(pipeline, { massActionOnly: opts.massActionOnly, noSelfShielding: opts.selfShielding === false });
  const { network } = setup;
  const { modelNetwork, outputSpeciesNames } = await import('../../chem/mantle.ts');
  const initialNotes = [...setup.notes, ...trackAxisNotes(cfg.physical_track)];
  const input = modelInput(setup, conditions);
  const figureSpecies = chooseSpecies(opts.species, outputSpeciesNames(network, input.grain));
  const outDir = opts.out ? resolve(opts.out) : join(pipeline.resolvePath(cfg.output), 'model');

  let emittedNote: string | undefined;
  if (opts.emitSystem) {
    const system = compile(network, conditions, input.grain, { massActionOnly: input.massActionOnly, selfShielding: input.photochemistry?.h2SelfShielding });
    // The model's own species (with the mantle twins when the three-phase ice is on).
    const emitted = system.emitSystem(initialState({ network: modelNetwork(network, input.grain), initial: input.initial }), input.timesYr.map((t) => t * YEAR_SECONDS));
    writeOutput(opts.emitSystem, JSON.stringify(emitted) + '\n');
    emittedNote = `${opts.emitSystem} (mass-action part; ${emitted.omitted.length === 0 ? 'nothing left out' : `${emitted.omitted.length} terms that are not mass action left out, each named with why under "omitted"`})`;
  }
  const result = runModel(input);

  try {
    mkdirSync(outDir, { recursive: true });
  } catch (e) {
    throw new UserError(`cannot create the output folder: ${(e as Error).message}. Choose another with --out.`, { file: outDir });
  }
  const reached = reachedRows(result);
  writeOutput(join(outDir, 'abundances.csv'), abundanceCsv(result, reached));
  const json = {
    network: { name: network.name, file: network.file, content_hash: network.contentHash },
    conditions,
    grain: cfg.grain,
    mass_action_only: input.massActionOnly,
    self_shielding: input.photochemistry?.h2SelfShielding,
    status: result.status,
    failure: result.failure ?? null,
    species: result.species,
    times_yr: Array.from(result.timesYr.subarray(0, reached)),
    abundances: Object.fromEntries(result.species.map((s, i) => [s, Array.from({ length: reached }, (_, k) => result.abundances[k * result.species.length + i])])),
    conservation: result.conservation,
    solver: result.stats,
    initial: Object.fromEntries(Object.entries(input.initial)),
    physical_track: cfg.physical_track ?? null,
    track_conditions: result.trackConditions ?? null,
    notes: [...initialNotes, ...result.clampNotes, ...(result.skippedNotes ?? [])],
    wall_ms: result.wallMs,
  };
  writeOutput(join(outDir, 'abundances.json'), JSON.stringify(json, null, 1) + '\n');

  // A quick-look figure keeps its conditions in its title; subscripts as Unicode (n_H has no subscript capital, so n(H); DejaVu has U+1D65 for A with subscript v).
  const spec = figureSpec(result, reached, figureSpecies, `${network.name}: n(H) = ${numberText(conditions.density)} cm⁻³, T = ${numberText(conditions.gas_temperature)} K, Aᵥ = ${numberText(conditions.visual_extinction)} mag`);
  const { renderSvg, svgToPdf, svgToPng } = await import('../../report/render.ts');
  const rendered = await renderSvg(spec);
  writeOutput(join(outDir, 'abundances.vl.json'), JSON.stringify(spec, null, 1) + '\n');
  writeOutput(join(outDir, 'abundances.svg'), rendered.svg);
  writeOutput(join(outDir, 'abundances.png'), svgToPng(rendered.svg, MODEL_PNG_DPI));
  writeOutput(join(outDir, 'abundances.pdf'), await svgToPdf(rendered, `Model abundances of ${network.name}`));

  ctx.stdout.write(summary(result, reached, network.name, outDir, emittedNote, initialNotes));
  ctx.setExitCode(result.status === 'ok' ? 0 : 1);
}

/**
 * Conditions: defaults, then the pipeline's fixed values and ties to other
 * conditions, then --set (which may also stand in for a grid axis of the
 * pipeline); every value checked.
 */
export function resolveConditions(pipeline: Pipeline, sets: string[]): PhysicalConditions {
  const conditions = defaultConditions();
  const problems: UserError[] = [];
  const known = `Known conditions: ${CONDITION_NAMES.join(', ')}.`;

  const overrides = new Map<string, number>();
  for (const assignment of sets) {
    const m = /^([^=]+)=(.*)$/.exec(assignment);
    const where = { field: `--set ${assignment}` };
    if (!m) {
      problems.push(new UserError(`expected key=value, e.g. --set density=2e4 (give the pipeline file before --set, whose values run to the next option).`, where));
      continue;
    }
    const name = m[1].trim();
    const text = m[2].trim();
    if (!isConditionName(name)) {
      problems.push(new UserError(`unknown physical condition '${name}'. ${known}`, where));
      continue;
    }
    const value = text === '' ? Number.NaN : Number(text);
    const bad = Number.isNaN(value) ? `${name} must be a number, found '${text}'` : checkConditionValue(name, value);
    if (bad) problems.push(new UserError(`${bad}.`, where));
    else overrides.set(name, value);
  }

  const ties: { name: keyof PhysicalConditions; target: keyof PhysicalConditions; factor: number; where: { file: string; line?: number; field: string } }[] = [];
  for (const [name, value] of Object.entries(pipeline.config.conditions)) {
    const where = { file: pipeline.file, line: pipeline.yaml.lineOf(['conditions', name]), field: `conditions.${name}` };
    if (!isConditionName(name)) {
      problems.push(new UserError(`unknown physical condition '${name}'. ${known}`, where));
      continue;
    }
    if (overrides.has(name)) continue;
    if (typeof value === 'number') {
      const bad = checkConditionValue(name, value);
      if (bad) problems.push(new UserError(`${bad}.`, where));
      else conditions[name] = value;
      continue;
    }
    if (!Array.isArray(value) && 'tie' in value && isConditionName(value.tie)) {
      ties.push({ name, target: value.tie, factor: value.factor ?? 1, where });
      continue;
    }
    const what = Array.isArray(value) ? 'a list' : 'tie' in value ? `a tie to ${value.tie}` : 'layers' in value ? `layers through a ${value.layers}` : 'a range';
    problems.push(
      new UserError(
        `'hoarfrost model' runs one model, so each condition must be a single number (or a tie to another condition); found ${what}. Give one value here or with --set ${name}=VALUE, or run the grid with 'hoarfrost grid'.`,
        where,
      ),
    );
  }
  for (const [name, value] of overrides) conditions[name as keyof PhysicalConditions] = value;
  // Ties may chain (a tied to b tied to c): resolve them in passes, as many as there are ties.
  const pending = new Set(ties.map((t) => t.name));
  for (let pass = 0; pass < ties.length && pending.size > 0; pass++) {
    for (const tie of ties) {
      if (!pending.has(tie.name) || pending.has(tie.target)) continue;
      conditions[tie.name] = tie.factor * conditions[tie.target];
      pending.delete(tie.name);
      const bad = checkConditionValue(tie.name, conditions[tie.name]);
      if (bad) problems.push(new UserError(`${bad} (tied to ${tie.target}).`, tie.where));
    }
  }
  for (const tie of ties) {
    if (pending.has(tie.name)) problems.push(new UserError(`the ties of ${[...pending].join(', ')} go round in a circle; give one of them a value.`, tie.where));
  }
  throwProblems(problems, `${problems.length} problems with the physical conditions:`);
  return conditions;
}

export function chooseSpecies(list: string | undefined, names: string[]): string[] {
  if (list === undefined) {
    const present = DEFAULT_FIGURE_SPECIES.filter((s) => names.includes(s));
    return present.length > 0 ? present : names.slice(0, SUMMARY_COUNT);
  }
  const wanted = list
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  const missing = wanted.filter((s) => !names.includes(s));
  if (wanted.length === 0) throw new UserError('--species needs at least one species name, e.g. --species CO,H2O(s).', { field: '--species' });
  if (missing.length > 0) {
    throw new UserError(
      `the model has no species ${missing.map((s) => `'${s}'`).join(', ')}. Check the spelling (ices are written like H2O(s); with grain.mantle on, also H2O(surface) and H2O(mantle)).`,
      { field: '--species' },
    );
  }
  return wanted;
}

function writeOutput(path: string, text: string | Buffer): void {
  try {
    writeOutputFile(path, text);
  } catch (e) {
    if (e instanceof UserError) throw e;
    throw new UserError(`cannot write output: ${(e as Error).message}. Check that the folder exists and is writable.`, { file: path });
  }
}

/** Output rows the solver reached (all of them unless it failed). */
function reachedRows(result: ModelResult): number {
  const n = result.species.length;
  let k = 0;
  while (k < result.timesYr.length && !Number.isNaN(result.abundances[k * n])) k++;
  return k;
}

/** Time to 6 significant figures, abundances to 6 in exponent form (0 written as 0). */
function formatCell(x: number, column: number): string {
  if (column === 0) return x.toPrecision(6);
  return x === 0 ? '0' : x.toExponential(5);
}

function abundanceCsv(result: ModelResult, rows: number): string {
  const n = result.species.length;
  const table: number[][] = [];
  for (let k = 0; k < rows; k++) table.push([result.timesYr[k], ...result.abundances.subarray(k * n, (k + 1) * n)]);
  return toCsv(['time_yr', ...result.species], table, { formatNumber: formatCell });
}

function figureSpec(result: ModelResult, rows: number, species: string[], title: string): TopLevelSpec {
  const n = result.species.length;
  const values: { time_yr: number; abundance: number; species: string }[] = [];
  for (const s of species) {
    const i = result.species.indexOf(s);
    for (let k = 0; k < rows; k++) {
      const x = result.abundances[k * n + i];
      if (x >= FIGURE_FLOOR) values.push({ time_yr: result.timesYr[k], abundance: x, species: s });
    }
  }
  const tLo = result.timesYr[0];
  const tHi = result.timesYr[Math.max(0, rows - 1)];
  const yHi = values.reduce((m, v) => Math.max(m, v.abundance), FIGURE_FLOOR * 10);
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: title, subtitle: `abundances below ${numberText(FIGURE_FLOOR)} relative to H not drawn` },
    width: 300,
    height: 220,
    data: { values },
    mark: { type: 'line', strokeWidth: 1.2, clip: true },
    encoding: {
      x: { field: 'time_yr', type: 'quantitative', title: 'Time (yr)', scale: { type: 'log', domain: [tLo, tHi], nice: false }, axis: logAxis(tLo, tHi) },
      y: { field: 'abundance', type: 'quantitative', title: 'Abundance relative to H', scale: { type: 'log', domain: [FIGURE_FLOOR, yHi], nice: false }, axis: logAxis(FIGURE_FLOOR, yHi) },
      color: { field: 'species', type: 'nominal', title: 'Species', sort: species, scale: { domain: species, range: CATEGORY_COLOURS } },
      strokeDash: { field: 'species', type: 'nominal', sort: species, scale: { domain: species, range: CATEGORY_DASHES } },
    },
    config: figureConfig(),
  };
}

function summary(result: ModelResult, rows: number, networkName: string, outDir: string, emitted: string | undefined, initialNotes: string[]): string {
  const n = result.species.length;
  const lines: string[] = [];
  lines.push(`model of network ${networkName}: ${n} species, ${result.timesYr.length} output times`);
  if (result.status !== 'ok') lines.push(`FAILED: ${result.failure}`);
  if (rows > 0) {
    const k = rows - 1;
    const last = result.species.map((s, i) => ({ s, x: result.abundances[k * n + i] })).sort((a, b) => b.x - a.x);
    lines.push(`most abundant at ${result.timesYr[k].toPrecision(4)} yr (relative to H):`);
    for (const { s, x } of last.slice(0, SUMMARY_COUNT)) lines.push(`  ${s.padEnd(12)} ${x.toExponential(3)}`);
    const water = result.species.indexOf(WATER_ICE);
    const ratios = ICE_RATIO_SPECIES.filter((s) => result.species.includes(s)).map((s) => `${s.replace('(s)', '')} ${(result.abundances[k * n + result.species.indexOf(s)] / result.abundances[k * n + water]).toPrecision(2)}`);
    if (water >= 0 && result.abundances[k * n + water] > 0 && ratios.length > 0) lines.push(`ices relative to H2O: ${ratios.join(', ')}`);
  }
  const c = result.conservation;
  lines.push(`conservation: largest relative drift ${c.maxRelativeDrift.toExponential(2)} (${c.worst})`);
  const st = result.stats;
  lines.push(`solver: ${st.steps} steps (${st.failedSteps} rejected), ${st.rhsEvals} rhs, ${st.jacobianEvals} Jacobians, ${st.factorizations} LU factorisations, ${st.newtonFailures} Newton failures`);
  lines.push(`time taken: ${result.wallMs.toFixed(0)} ms`);
  for (const note of initialNotes) lines.push(`note: ${note}`);
  for (const note of result.clampNotes) lines.push(`note: ${note}`);
  for (const note of result.skippedNotes ?? []) lines.push(`left out: ${note}`);
  lines.push(`wrote ${outDir}/abundances.csv, abundances.json, abundances.svg, .png, .pdf, abundances.vl.json${emitted ? `; system: ${emitted}` : ''}`);
  return lines.join('\n') + '\n';
}
