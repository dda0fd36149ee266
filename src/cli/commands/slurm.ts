/**
 * `hoarfrost slurm PIPELINE --shards N [--partition P] [--time T] [--cpus C] [--account A] [--mem M] [--qos Q] [--sbatch=--name=value ...]`:
 * write an sbatch job-array script that runs one grid shard per array task
 * (OUT/slurm/grid-array.sh), and say how to submit and merge it.
 */
import { mkdirSync } from 'node:fs';
import { writeOutput } from '../../config/write.ts';
import { join, resolve } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import type { CommandContext } from '../main.ts';

/** CPUs per array task when --cpus is not given: a small, widely available allocation. */
const DEFAULT_CPUS = 4;

function parseCount(flag: string) {
  return (value: string): number => {
    if (!/^\s*\d+\s*$/.test(value) || Number(value) < 1) throw new UserError(`${flag} expects a whole number of at least 1, found '${value}'.`);
    return Number(value);
  };
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('slurm')
    .description('write a Slurm job-array script that computes the grid in N shards (one per array task)')
    .argument('<pipeline>', 'pipeline file (YAML)')
    .requiredOption('--shards <n>', 'number of shards (array tasks)', parseCount('--shards'))
    .option('--partition <name>', 'Slurm partition')
    .option('--time <limit>', 'time limit per task (Slurm form: minutes, HH:MM:SS or D-HH:MM:SS)')
    .option('--cpus <n>', `CPUs per task, one worker thread each (default ${DEFAULT_CPUS})`, parseCount('--cpus'))
    .option('--account <name>', 'account charged for the job')
    .option('--mem <size>', 'memory per task, Slurm form (4G, 4000M)')
    .option('--qos <name>', 'quality of service')
    .option('--sbatch <option>', 'a further sbatch option as --name=value, written as an #SBATCH line (repeatable)', (v: string, prev: string[] = []) => [...prev, v])
    .action(async (file: string, opts: { shards: number; partition?: string; time?: string; cpus?: number; account?: string; mem?: string; qos?: string; sbatch?: string[] }) => {
      const { loadPipeline } = await import('../../config/pipeline.ts');
      const { standaloneGridPlan } = await import('../../pipeline/default-stages.ts');
      const { slurmScript, checkSlurmOptions, HOARFROST_BIN } = await import('../../grid/slurm.ts');
      const cpus = opts.cpus ?? DEFAULT_CPUS;
      const batch = { account: opts.account, mem: opts.mem, qos: opts.qos, extra: opts.sbatch };
      checkSlurmOptions({ shards: opts.shards, cpus, time: opts.time, partition: opts.partition, ...batch });
      const pipeline = loadPipeline(file);
      // Expanding the grid here catches a bad pipeline before anything is queued.
      const plan = await standaloneGridPlan(pipeline);
      if (opts.shards > plan.points.length) {
        throw new UserError(`--shards ${opts.shards} is more than the ${plan.points.length} points of the grid; use at most ${plan.points.length}.`);
      }
      const outDir = pipeline.resolvePath(pipeline.config.output);
      const slurmDir = join(outDir, 'slurm');
      mkdirSync(slurmDir, { recursive: true });
      const scriptFile = join(slurmDir, 'grid-array.sh');
      writeOutput(scriptFile, slurmScript({ pipelineFile: pipeline.file, outDir, name: pipeline.config.name, shards: opts.shards, partition: opts.partition, time: opts.time, cpus, ...batch }), { mode: 0o755 });
      const perShard = Math.ceil(plan.points.length / opts.shards);
      ctx.stdout.write(
        [
          `wrote ${scriptFile}: ${opts.shards} array tasks of up to ${perShard} models each (${plan.points.length} in all), ${cpus} CPUs per task.`,
          `submit:  sbatch ${scriptFile}`,
          `then:    ${process.execPath} ${HOARFROST_BIN} merge ${resolve(pipeline.file)}`,
          `         (check progress with: hoarfrost grid ${file} --shard K/${opts.shards} --status)`,
        ].join('\n') + '\n',
      );
    });
}
