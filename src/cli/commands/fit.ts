/**
 * `hoarfrost fit PIPELINE`: the observe and fit stages of `hoarfrost run`
 * (the observe stage skipped when unchanged, the fit always run, both
 * recorded): score every (model, time) candidate of the pipeline's model
 * store against its observations, write the fit's tables and JSON under
 * OUT/fit/ (and FITS images for a map), and print the best fits with their
 * 68.3% intervals, every warning, and the model cautions.
 */
import { relative } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import { intervalReading, levelStatement, TABLE_LEVEL } from '../../fit/regions.ts';
import type { FitStageResult, MapFitJson, ParameterInterval, SightlineFit } from '../../fit/types.ts';
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
export function formatFitSummary(result: FitStageResult, map: Pick<MapFitJson, 'nx' | 'ny' | 'fittedPixels' | 'level'> | undefined, maxRows = DEFAULT_ROWS, held: Readonly<Record<string, Readonly<Record<string, number>>>> = {}): string {
  const out: string[] = [];
  const heldSets = Object.values(held);
  const heldEverywhere = heldSets.length > 0 ? result.fittedParameters.filter((p) => heldSets.every((h) => p in h)) : [];
  const fitted = result.fittedParameters.filter((p) => !heldEverywhere.includes(p));
  const levels = result.levels.map((l) => `${(l.level * 100).toFixed(1)}% (Delta chi2 ${l.deltaChi2.toFixed(2)})`).join(', ');
  const heldText = heldEverywhere.length > 0 ? `; held at each sightline's own value: ${heldEverywhere.join(', ')}` : '';
  const mesh = result.interpolation ? ` (${result.interpolation.gridCandidates} of the grid, interpolated onto a mesh ${result.interpolation.factor} times finer)` : '';
  out.push(`${result.nCandidates} candidates${mesh}; fitted parameters: ${fitted.join(', ')}${heldText}; intervals ${intervalReading(result.levels[0].parametersOfInterest)} at ${levels}; model floor ${result.modelSigmaDex} dex.`);
  if (map) {
    const m = map;
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
    const tableLevel = result.levels.find((l) => l.level === TABLE_LEVEL);
    out.push(`Best fits, with ${tableLevel ? levelStatement(tableLevel) : `${(TABLE_LEVEL * 100).toFixed(1)}%`} intervals ([<=lo, >=hi]: the interval reaches the grid's edge; *: narrower than the grid spacing):`);
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

export interface FitCommandResult {
  result: FitStageResult;
  map?: MapFitJson;
  /** Grid parameters held per sightline (model A_V tied to the sightlines). */
  held: Record<string, Record<string, number>>;
  outDir: string;
  written: string[];
  warnings: string[];
}

/** Runs the observe stage (when changed) and the fit stage of the pipeline, on the grid stage's recorded store. */
export async function runFitCommand(pipelineFile: string): Promise<FitCommandResult> {
  const { loadPipeline } = await import('../../config/pipeline.ts');
  const { heldParameters } = await import('../../pipeline/held.ts');
  const { runStages } = await import('../../pipeline/runner.ts');
  const { defaultStages } = await import('../../pipeline/default-stages.ts');
  const pipeline = loadPipeline(pipelineFile);
  const run = await runStages(pipeline, defaultStages(), {
    stages: ['observe', 'fit'],
    force: ['fit'],
    asked: 'hoarfrost fit',
    commandLine: ['hoarfrost', ...process.argv.slice(2)],
  });
  const fit = run.data.fit!;
  const { observations } = await run.dataOf('observe');
  return {
    result: fit.result,
    map: fit.map,
    held: heldParameters(pipeline, observations) ?? {},
    outDir: run.outDir,
    written: run.stages.find((r) => r.name === 'fit')!.outputs,
    // The fit result's warnings are in its summary; these are the rest (an out-of-date grid, the observations, the map images).
    warnings: run.stages.flatMap((r) => r.warnings).filter((w) => !fit.result.warnings.includes(w)),
  };
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
      const { result, map, held, outDir, written, warnings } = await runFitCommand(file);
      for (const w of warnings) ctx.stderr.write(`hoarfrost: warning: ${w}\n`);
      ctx.stdout.write(`${formatFitSummary(result, map, opts.rows ?? DEFAULT_ROWS, held)}\n\n`);
      const rel = relative(process.cwd(), outDir) || '.';
      ctx.stdout.write(`written under ${rel}: ${written.join(', ')}\n`);
    });
}
