/**
 * `hoarfrost fit PIPELINE`: score every (model, time) candidate of the
 * pipeline's model store against its observations, write the fit's tables
 * and JSON under OUT/fit/ (and FITS images for a map), and print the best
 * fits with their 68.3% intervals, every warning, and the model cautions.
 */
import { existsSync, mkdirSync } from 'node:fs';
import { writeOutput } from '../../config/write.ts';
import { dirname, join, relative } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import type { Pipeline } from '../../config/pipeline.ts';
import { TABLE_LEVEL } from '../../fit/regions.ts';
import type { FitStageOutput } from '../../fit/stage.ts';
import type { FitStageResult, ParameterInterval, SightlineFit } from '../../fit/types.ts';
import type { ObservationSet, ObservedQuantity } from '../../obs/types.ts';
import type { CommandContext } from '../main.ts';

/** Sightlines printed before the rest are counted (the CSV holds them all). */
const DEFAULT_ROWS = 40;

interface Options {
  rows?: number;
}

function num(x: number): string {
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e4 || a < 1e-2 ? x.toExponential(1).replace('e+', 'e') : String(Number(x.toPrecision(3)));
}

function textTable(header: string[], rows: string[][]): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (r: string[]) => r.map((cell, c) => cell.padEnd(widths[c])).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

function intervalText(fit: SightlineFit, parameter: string, best: number): string {
  const iv: ParameterInterval | undefined = fit.intervals.find((i) => i.parameter === parameter && i.level === TABLE_LEVEL);
  if (!iv) return `${num(best)} (held)`;
  const lo = `${iv.loAtEdge ? '<=' : ''}${num(iv.lo)}`;
  const hi = `${iv.hiAtEdge ? '>=' : ''}${num(iv.hi)}`;
  return `${num(best)} [${lo}, ${hi}]${iv.unresolved ? '*' : ''}`;
}

/** The printed summary: best fits with 68.3% intervals, joint fits, warnings, cautions. */
export function formatFitSummary(result: FitStageResult, output: FitStageOutput, maxRows = DEFAULT_ROWS, held: Readonly<Record<string, Readonly<Record<string, number>>>> = {}): string {
  const out: string[] = [];
  const heldSets = Object.values(held);
  const heldEverywhere = heldSets.length > 0 ? result.fittedParameters.filter((p) => heldSets.every((h) => p in h)) : [];
  const fitted = result.fittedParameters.filter((p) => !heldEverywhere.includes(p));
  const levels = result.levels.map((l) => `${(l.level * 100).toFixed(1)}% (Delta chi2 ${l.deltaChi2.toFixed(2)})`).join(', ');
  const heldText = heldEverywhere.length > 0 ? `; held at each sightline's own value: ${heldEverywhere.join(', ')}` : '';
  out.push(`${result.nCandidates} candidates; fitted parameters: ${fitted.join(', ')}${heldText}; regions for ${result.levels[0].parametersOfInterest} parameters of interest at ${levels}; model floor ${result.modelSigmaDex} dex.`);
  if (output.map) {
    const m = output.map;
    out.push(`Map of ${m.nx} x ${m.ny} pixels: ${m.fittedPixels} fitted. Images of best density, best age, chi2, p-value and ${(m.level.level * 100).toFixed(1)}% interval widths are in fit/map_*.fits and fit/map.json.`);
  } else {
    const others = fitted.filter((p) => p !== 'density' && p !== 'age_yr');
    const header = ['sightline', 'density (cm-3)', 'age (yr)', ...others, 'chi2/dof', 'p', 'agree'];
    const shown = result.fits.slice(0, maxRows);
    const rows = shown.map((f) => [
      f.sightline,
      intervalText(f, 'density', f.best.parameters.density),
      intervalText(f, 'age_yr', f.best.ageYr),
      ...others.map((p) => intervalText(f, p, f.best.parameters[p])),
      `${f.best.chi2.toFixed(1)}/${f.dof}`,
      f.pValue < 1e-3 ? f.pValue.toExponential(1) : f.pValue.toFixed(3),
      `${Math.round(f.agreementFraction * 100)}%`,
    ]);
    out.push(`Best fits, with ${(TABLE_LEVEL * 100).toFixed(1)}% intervals ([<=lo, >=hi]: the interval reaches the grid's edge; *: narrower than the grid spacing):`);
    out.push(textTable(header, rows));
    if (result.fits.length > shown.length) out.push(`... and ${result.fits.length - shown.length} more in fit/best_fits.csv (show them with --rows ${result.fits.length})`);
  }
  for (const j of result.joint) {
    const shared = j.shared.map((s) => `${s} = ${num(j.sharedBest[s])}`).join(', ');
    out.push(`Joint group ${j.name} (${j.members.length} sightlines sharing ${j.shared.join(', ')}): ${shared}; chi2/dof ${j.chi2.toFixed(1)}/${j.dof}, p = ${j.pValue.toPrecision(2)}.`);
  }
  if (result.warnings.length > 0) {
    out.push('');
    for (const w of result.warnings) out.push(`warning: ${w}`);
  }
  out.push('');
  out.push('Cautions:');
  for (const c of result.cautions) out.push(`  - ${c}`);
  return out.join('\n');
}

function requireSections(pipeline: Pipeline) {
  const { observations, fit } = pipeline.config;
  if (!observations) throw new UserError('the pipeline has no `observations:` section; `hoarfrost fit` needs one (give at least `file:`).', { file: pipeline.file });
  if (!fit) throw new UserError('the pipeline has no `fit:` section; name the quantities to fit under `fit: quantities:`.', { file: pipeline.file });
  return { observations, fit };
}

function writeText(outDir: string, rel: string, data: string | Uint8Array): void {
  const file = join(outDir, rel);
  mkdirSync(dirname(file), { recursive: true });
  writeOutput(file, data);
}

export interface FitCommandResult {
  output: FitStageOutput;
  /** Grid parameters held per sightline (model A_V tied to the sightlines). */
  held: Record<string, Record<string, number>>;
  outDir: string;
  written: string[];
}

/** Reads the pipeline's observations and model store, fits, and writes OUT/fit/. */
export async function runFitCommand(pipelineFile: string): Promise<FitCommandResult> {
  const { loadPipeline } = await import('../../config/pipeline.ts');
  const { loadNetwork } = await import('../../chem/network.ts');
  const { loadObservations, deriveQuantities } = await import('../../obs/index.ts');
  const { loadCandidates } = await import('../../grid/candidates.ts');
  const { mainStoreFile } = await import('../../grid/plan.ts');
  const { heldParameters } = await import('../../pipeline/held.ts');
  const { outputFolder } = await import('../../pipeline/runner.ts');
  const { runFitStage } = await import('../../fit/stage.ts');
  const { FIT_OUTPUT_FILES, MAP_IMAGE_NAMES } = await import('../../fit/types.ts');

  const pipeline = loadPipeline(pipelineFile);
  const sections = requireSections(pipeline);
  const outDir = outputFolder(pipeline);
  const storeFile = mainStoreFile({ storeDir: join(outDir, 'store') });
  if (!existsSync(storeFile)) {
    throw new UserError(`no model store at ${storeFile}. Compute the grid first: \`hoarfrost grid ${pipelineFile}\` (or \`hoarfrost run ${pipelineFile}\`).`, { file: pipeline.file });
  }
  const network = loadNetwork(pipeline.resolvePath(pipeline.config.network));
  const observations: ObservationSet = loadObservations(sections.observations, pipeline.dir, new Set(network.species.map((s) => s.name)));
  const derived = deriveQuantities(observations, sections.observations, sections.fit.quantities);
  const quantities: ObservedQuantity[] = derived.quantities;
  observations.warnings.push(...derived.warnings);
  const species = new Set<string>();
  for (const q of quantities) {
    species.add(q.numerator);
    if (q.denominator) species.add(q.denominator);
  }
  const table = loadCandidates(storeFile, [...species].sort());
  const held = heldParameters(pipeline, observations) ?? {};
  const output = runFitStage({
    table,
    section: sections.fit,
    observations,
    quantities,
    held,
    source: { file: pipeline.file, lineOf: pipeline.yaml.lineOf },
  });
  const written: string[] = [];
  for (const [rel, text] of Object.entries(output.files)) {
    writeText(outDir, rel, text);
    written.push(rel);
  }
  if (output.map) {
    const { encodeFits } = await import('../../report/fits.ts');
    for (const name of MAP_IMAGE_NAMES) {
      const rel = `${FIT_OUTPUT_FILES.mapImagePrefix}${name}.fits`;
      const bytes = encodeFits([{ type: 'image', name: name.toUpperCase(), data: output.map.images[name], nx: output.map.nx, ny: output.map.ny, header: { ...(observations.map?.wcs ?? {}) } }]);
      writeText(outDir, rel, bytes);
      written.push(rel);
    }
  }
  return { output, held, outDir, written: written.sort() };
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('fit')
    .description("score the pipeline's model grid against its observations: best fits, profiles and confidence intervals, written to OUT/fit/")
    .argument('<pipeline>', 'pipeline file (YAML)')
    .option('--rows <n>', `sightlines to print (default ${DEFAULT_ROWS}; every one is in fit/best_fits.csv)`, (v: string) => {
      const n = Number(v);
      if (!Number.isInteger(n) || n < 0) throw new UserError(`--rows expects a whole number, 0 or more; found '${v}'.`);
      return n;
    })
    .action(async (file: string, opts: Options) => {
      const { output, held, outDir, written } = await runFitCommand(file);
      ctx.stdout.write(`${formatFitSummary(output.result, output, opts.rows ?? DEFAULT_ROWS, held)}\n\n`);
      const rel = relative(process.cwd(), outDir) || '.';
      ctx.stdout.write(`written under ${rel}: ${written.join(', ')}\n`);
    });
}
