/**
 * `hoarfrost spread PIPELINE.yaml [--set key=value ...] [--realizations N]
 * [--seed S] [--workers N] [--species LIST] [--at-yr T] [--method pearson|spearman]
 * [--out DIR] [--shard K/N | --merge-shards]`: error bars on the abundances of one model from its rate
 * coefficients' uncertainties, with no fit (docs/uncertainty.md). Runs N
 * Monte Carlo realizations of the model on the worker pool (stored and
 * resumable in OUT/store/realizations.sqlite), then writes the spread of
 * every species over time (CSV, JSON), a figure of the chosen species with
 * their one-sigma bands, and the correlation of every reaction's log k with
 * each chosen species at one time (CSV, figure of the top ten).
 */
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Command } from 'commander';
import { toCsv } from '../../config/csv.ts';
import { UserError } from '../../config/errors.ts';
import { writeOutput } from '../../config/write.ts';
import type { CommandContext } from '../main.ts';
import { chooseSpecies, resolveConditions } from './model.ts';

const DEFAULT_REALIZATIONS = 100;
const DEFAULT_SEED = 1;
/** Reactions listed per species on the terminal and in the figure (the CSV has all). */
const TOP_REACTIONS = 10;
const TERMINAL_REACTIONS = 3;

interface SpreadOptions {
  set?: string[];
  realizations: number;
  seed: number;
  workers?: number;
  species?: string;
  atYr?: number;
  method: 'pearson' | 'spearman';
  out?: string;
  shard?: string;
  mergeShards?: boolean;
}

function wholeNumber(option: string, min: number) {
  return (value: string): number => {
    const n = Number(value);
    if (!/^\s*\d+\s*$/.test(value) || !(n >= min)) throw new UserError(`${option} expects a whole number of at least ${min}, found '${value}'.`, { field: option });
    return n;
  };
}

function positiveNumber(option: string) {
  return (value: string): number => {
    const n = Number(value);
    if (value.trim() === '' || !(n > 0) || !Number.isFinite(n)) throw new UserError(`${option} expects a positive time in years, found '${value}'.`, { field: option });
    return n;
  };
}

function method(value: string): 'pearson' | 'spearman' {
  if (value !== 'pearson' && value !== 'spearman') throw new UserError(`--method expects pearson or spearman, found '${value}'.`, { field: '--method' });
  return value;
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('spread')
    .description("error bars on one model's abundances from its rate coefficients' uncertainty factors: Monte Carlo realizations, spread over time and the reactions each species hangs on")
    .argument('<pipeline>', 'pipeline YAML file (its network, conditions, grain, initial, times and solver sections are used)')
    .option('--set <key=value...>', 'override physical conditions, e.g. --set density=2e4 gas_temperature=10')
    .option('--realizations <n>', `number of realizations (default ${DEFAULT_REALIZATIONS})`, wholeNumber('--realizations', 2), DEFAULT_REALIZATIONS)
    .option('--seed <n>', `seed of the draws (default ${DEFAULT_SEED}); the same seed gives the same realizations on any number of workers`, wholeNumber('--seed', 0), DEFAULT_SEED)
    .option('--workers <n>', 'worker threads (default: one per core)', wholeNumber('--workers', 1))
    .option('--species <list>', 'comma-separated species for the figure and the sensitivity table (default: as hoarfrost model)')
    .option('--at-yr <t>', 'time of the sensitivity table, yr (the nearest output time; default the last)', positiveNumber('--at-yr'))
    .option('--method <name>', 'correlation coefficient: pearson (Wakelam et al. 2010) or spearman (ranks)', method, 'pearson')
    .option('--out <dir>', 'output folder (default: <output of the pipeline>/spread)')
    .option('--shard <K/N>', 'run only shard K of N of the realizations into its own store and stop (a batch system runs one per array task); then run again with --merge-shards')
    .option('--merge-shards', "merge the shards' stores of these realizations first, then write the spread from the merged store")
    .action(async (file: string, opts: SpreadOptions) => {
      await runSpreadCommand(file, opts, ctx);
    });
}

async function runSpreadCommand(file: string, opts: SpreadOptions, ctx: CommandContext): Promise<void> {
  const { loadPipeline } = await import('../../config/pipeline.ts');
  const { buildModelSetup, modelInput, runModel } = await import('../../model/run.ts');
  const { setupBatchPlan } = await import('../../grid/plan.ts');
  const { modelHash, sharedInputsHash } = await import('../../grid/hash.ts');
  const { readRealizations, realizationStoreFile, runRealizations } = await import('../../grid/realizations.ts');
  const { drawRateFactors, uncertaintyFactor } = await import('../../chem/uncertainty.ts');
  const { describeReaction } = await import('../../chem/reaction-text.ts');
  const { logRealizations, logSpread } = await import('../../fit/model-spread.ts');
  const { chanceCoefficient, rankReactions } = await import('../../fit/sensitivity.ts');
  const { spreadBandsSpec, sensitivityBarsSpec } = await import('../../report/figures/model-spread.ts');
  const { renderSvg } = await import('../../report/render.ts');

  const pipeline = loadPipeline(file);
  const conditions = resolveConditions(pipeline, opts.set ?? []);
  const setup = buildModelSetup(pipeline);
  for (const note of (await import('../../model/setup.ts')).trackAxisNotes(pipeline.config.physical_track)) ctx.stderr.write(`note: ${note}\n`);
  const { network } = setup;
  const plan = setupBatchPlan(pipeline, setup);
  const figureSpecies = chooseSpecies(opts.species, plan.species);
  const outDir = opts.out ? resolve(opts.out) : join(pipeline.resolvePath(pipeline.config.output), 'spread');
  const base = { id: `m${modelHash(sharedInputsHash(plan.shared), conditions).slice(0, 16)}`, conditions };
  const settings = { count: opts.realizations, seed: opts.seed };

  const started = performance.now();
  if (opts.shard !== undefined && opts.mergeShards) throw new UserError('give --shard (run one shard) or --merge-shards (combine them), not both.', { field: '--shard' });
  if (opts.shard !== undefined) {
    const { parseShard, shardLabel } = await import('../../grid/shard.ts');
    const shard = parseShard(opts.shard);
    const r = await runRealizations(pipeline, plan, [base], settings, { workers: opts.workers, shard });
    ctx.stdout.write(`shard ${shardLabel(shard)}: ${r.share} realizations (${r.computed} computed, ${r.upToDate} already there${r.failed ? `, ${r.failed} failed` : ''}) in ${r.storeFile}\n`);
    ctx.setExitCode(r.failed > 0 || r.remaining > 0 ? 1 : 0);
    return;
  }
  if (opts.mergeShards) {
    const { mergeShards } = await import('../../grid/merge.ts');
    const { planRealizations, realizationShardStores } = await import('../../grid/realizations.ts');
    const shardFiles = realizationShardStores(plan);
    if (shardFiles.length === 0) throw new UserError(`no shard stores of realizations (realizations-shard-K-of-N.sqlite) in ${plan.storeDir}; run 'hoarfrost spread PIPELINE --shard K/N' for each shard first (with the same --set, --realizations and --seed).`);
    const m = mergeShards(planRealizations(plan, [base], settings), shardFiles, realizationStoreFile(plan));
    ctx.stderr.write(`merged ${m.shardFiles.length} shard stores: ${m.copied} realizations copied, ${m.alreadyPresent} already there, ${m.missing} missing\n`);
  }
  const run = await runRealizations(pipeline, plan, [base], settings, {
    workers: opts.workers,
    onStart: (i) => ctx.stderr.write(`realizations: ${i.todo} to run on ${i.workers} worker${i.workers > 1 ? 's' : ''}, ${i.upToDate} already in ${i.storeFile}\n`),
  });
  const [set] = readRealizations(realizationStoreFile(plan), run.plan, [base], settings);
  if (set.abundances.length < 2) {
    throw new UserError(`only ${set.abundances.length} of ${settings.count} realizations finished (failures: ${JSON.stringify(run.failureReasons)}); a spread needs two. See 'hoarfrost grid --status' for the model failures, or change the solver settings.`);
  }
  const nominal = runModel(modelInput(setup, conditions));
  const wallMs = performance.now() - started;

  const species = set.species;
  const nSpecies = species.length;
  const times = set.timesYr;
  const logs = logRealizations(set.abundances);
  const spread = logSpread(logs);
  const epsilon = set.realizations.map((r) => drawRateFactors(network, { seed: settings.seed, realization: r }).epsilon);

  const drawn = network.reactions.filter((r) => uncertaintyFactor(r) !== 1).length;
  const chance = chanceCoefficient(set.realizations.length, drawn);
  let at = times.length - 1;
  if (opts.atYr !== undefined) {
    let best = Infinity;
    times.forEach((t, k) => {
      const d = Math.abs(Math.log10(t / opts.atYr!));
      if (d < best) [best, at] = [d, k];
    });
  }

  mkdirSync(outDir, { recursive: true });
  const spreadRows: (string | number)[][] = [];
  for (let k = 0; k < times.length; k++) {
    for (let i = 0; i < nSpecies; i++) {
      const c = k * nSpecies + i;
      spreadRows.push([times[k], species[i], nominal.abundances[c], 10 ** spread.median[c], 10 ** spread.lo[c], 10 ** spread.hi[c], spread.mean[c], spread.sd[c]]);
    }
  }
  writeOutput(join(outDir, 'spread.csv'), toCsv(['age_yr', 'species', 'nominal', 'median', 'lo_16', 'hi_84', 'mean_log10', 'sd_dex'], spreadRows));

  const sensitivityRows: (string | number)[][] = [];
  const top: Record<string, { reaction: number; equation: string; law: string; factor: number; coefficient: number }[]> = {};
  for (const s of figureSpecies) {
    const i = species.indexOf(s);
    const value = logs.map((l) => l[at * nSpecies + i]);
    const ranked = rankReactions(epsilon, value, opts.method);
    top[s] = ranked.slice(0, TOP_REACTIONS).map((c) => {
      const r = network.reactions[c.reaction];
      return { reaction: c.reaction + 1, equation: describeReaction(r), law: r.law, factor: uncertaintyFactor(r), coefficient: c.coefficient };
    });
    ranked.forEach((c, rank) => {
      const r = network.reactions[c.reaction];
      sensitivityRows.push([s, times[at], rank + 1, c.reaction + 1, describeReaction(r), r.law, uncertaintyFactor(r), c.coefficient]);
    });
  }
  writeOutput(join(outDir, 'sensitivity.csv'), toCsv(['species', 'age_yr', 'rank', 'reaction', 'equation', 'law', 'uncertainty_factor', `${opts.method}_coefficient`], sensitivityRows));

  const json = {
    network: { name: network.name, file: network.file, content_hash: network.contentHash },
    conditions,
    realizations: { requested: settings.count, finished: set.realizations.length, missing: set.missing, seed: settings.seed },
    method: opts.method,
    chance_coefficient: Number.isFinite(chance) ? chance : null,
    sensitivity_age_yr: times[at],
    times_yr: Array.from(times),
    species,
    spread_dex: Object.fromEntries(species.map((s, i) => [s, Array.from(times, (_, k) => spread.sd[k * nSpecies + i])])),
    top_reactions: top,
    wall_ms: wallMs,
  };
  writeOutput(join(outDir, 'spread.json'), JSON.stringify(json, null, 1) + '\n');

  const bandRows = [];
  for (const s of figureSpecies) {
    const i = species.indexOf(s);
    for (let k = 0; k < times.length; k++) {
      const c = k * nSpecies + i;
      bandRows.push({ time_yr: times[k], species: s, median: 10 ** spread.median[c], lo: 10 ** spread.lo[c], hi: 10 ** spread.hi[c] });
    }
  }
  const title = `${network.name}: n_H = ${conditions.density} cm⁻³, T = ${conditions.gas_temperature} K, A_V = ${conditions.visual_extinction} mag`;
  const bands = spreadBandsSpec(bandRows, figureSpecies, title, set.realizations.length);
  writeOutput(join(outDir, 'spread.vl.json'), JSON.stringify(bands, null, 1) + '\n');
  writeOutput(join(outDir, 'spread.svg'), (await renderSvg(bands)).svg);
  const first = figureSpecies[0];
  const bars = sensitivityBarsSpec(
    top[first].map((t) => ({ reaction: `${t.reaction}: ${t.equation}`, coefficient: t.coefficient })),
    `What ${first} hangs on at ${times[at].toPrecision(3)} yr`,
    `${opts.method === 'pearson' ? 'Pearson' : 'Spearman'} coefficient over ${set.realizations.length} realizations; top ${top[first].length}${Number.isFinite(chance) ? `; dashed: the chance level ${chance.toFixed(2)}` : ''}`,
    `log ${first}`,
    Number.isFinite(chance) ? chance : null,
  );
  writeOutput(join(outDir, 'sensitivity.vl.json'), JSON.stringify(bars, null, 1) + '\n');
  writeOutput(join(outDir, 'sensitivity.svg'), (await renderSvg(bars)).svg);

  const lines: string[] = [];
  lines.push(`${set.realizations.length} realizations of network ${network.name} (seed ${settings.seed}; ${run.computed} computed now, ${run.upToDate} from the store) in ${(wallMs / 1000).toFixed(1)} s`);
  if (set.missing.length > 0) lines.push(`missing or failed: ${set.missing.length} realizations (${set.missing.slice(0, 10).join(', ')}${set.missing.length > 10 ? ', ...' : ''}); the spread uses the rest`);
  lines.push(
    Number.isFinite(chance)
      ? `with ${set.realizations.length} realizations and ${drawn} reactions drawn, coefficients below |r| = ${chance.toFixed(2)} can arise by chance (Fisher z, Bonferroni, 5 %): read the ranking above it only`
      : `with ${set.realizations.length} realizations the coefficients are not yet meaningful (4 or more needed)`,
  );
  lines.push(`at ${times[at].toPrecision(4)} yr (spread: standard deviation of log10 X; ${opts.method} coefficient of log k with log X):`);
  for (const s of figureSpecies) {
    const c = at * nSpecies + species.indexOf(s);
    const reactions = top[s].slice(0, TERMINAL_REACTIONS).map((t) => `${t.reaction} ${t.equation} (${t.coefficient.toFixed(2)})`);
    lines.push(`  ${s.padEnd(10)} median ${(10 ** spread.median[c]).toExponential(2)}  spread ${spread.sd[c].toFixed(2)} dex  ${reactions.join('; ')}`);
  }
  lines.push(`wrote ${outDir}/spread.csv, spread.json, spread.svg, sensitivity.csv, sensitivity.svg (and their .vl.json specs)`);
  ctx.stdout.write(lines.join('\n') + '\n');
  ctx.setExitCode(set.missing.length > 0 ? 1 : 0);
}
