/** `hoarfrost run PIPELINE`: the whole job, stage by stage, skipping what is unchanged. */
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import type { CommandContext } from '../main.ts';

function parseNumber(flag: string) {
  return (value: string): number => {
    const n = Number(value);
    if (value.trim() === '' || !Number.isFinite(n)) throw new UserError(`${flag} expects a number, found '${value}'.`);
    return n;
  };
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('run')
    .description('run a pipeline: observe, grid, fit, report; each stage is skipped when its inputs are unchanged')
    .argument('<pipeline>', 'pipeline file (YAML)')
    .option('--from <stage>', 'rerun this stage and every later one (observe, grid, fit, report)')
    .option('--only <stage>', 'run this stage alone, on the results the earlier stages left')
    .option('--workers <n>', 'worker threads for the grid (default: one per core)', parseNumber('--workers'))
    .option('--lock <file>', "write the run's best fits, intervals and table hashes to a lock file")
    .option('--check <file>', 'compare the run with a lock file; exit 1 listing every sightline whose fit moved beyond the tolerance')
    .option('--density-tolerance <dex>', 'tolerance in density, dex (stored by --lock; overrides the lock file with --check; default 1.5 grid steps of density, 0.1 dex without a stated step)', parseNumber('--density-tolerance'))
    .option('--age-tolerance <dex>', 'tolerance in age, dex (stored by --lock; overrides the lock file with --check; default 1.5 grid steps of age)', parseNumber('--age-tolerance'))
    .action(async (file: string, opts: { from?: string; only?: string; workers?: number; lock?: string; check?: string; densityTolerance?: number; ageTolerance?: number }) => {
      const { executeRun } = await import('../../pipeline/execute.ts');
      const { parseStageName } = await import('../../pipeline/stages.ts');
      const code = await executeRun({
        pipelineFile: file,
        from: opts.from === undefined ? undefined : parseStageName(opts.from, '--from'),
        only: opts.only === undefined ? undefined : parseStageName(opts.only, '--only'),
        workers: opts.workers,
        lock: opts.lock,
        check: opts.check,
        densityToleranceDex: opts.densityTolerance,
        ageToleranceDex: opts.ageTolerance,
        commandLine: ['hoarfrost', ...process.argv.slice(2)],
        stdout: ctx.stdout,
        stderr: ctx.stderr,
      });
      ctx.setExitCode(code);
    });
}
