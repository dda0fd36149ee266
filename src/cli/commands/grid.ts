/**
 * `hoarfrost grid PIPELINE [--workers N] [--shard K/N] [--status] [--retry-failed]`:
 * compute the grid's missing and stale models on worker threads, into
 * OUT/store/models.sqlite (or OUT/store/shard-K-of-N.sqlite for a shard).
 * The whole grid runs as the grid stage of `hoarfrost run` (after the observe
 * stage when the model A_V is tied to the sightlines) and is recorded as it;
 * a shard and --status plan the grid as the stage does and leave the stage
 * state alone.
 * Ctrl-C once lets the models in flight finish and stops; twice stops at
 * once. SIGTERM (a batch system's time limit) stops at once. Finished models
 * are kept either way, and a rerun computes only what is left.
 */
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import type { GridProgress, GridRunResult } from '../../grid/run.ts';
import type { CommandContext } from '../main.ts';

/** Exit codes after a stop by signal: 128 + the signal number (shell convention). */
const EXIT_INTERRUPTED = 130;
const EXIT_TERMINATED = 143;

function parseWorkers(value: string): number {
  const n = Number(value);
  if (!/^\s*\d+\s*$/.test(value) || n < 1) throw new UserError(`--workers expects a whole number of at least 1, found '${value}'.`);
  return n;
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('grid')
    .description("compute the pipeline's grid of models (only those missing or stale), on worker threads")
    .argument('<pipeline>', 'pipeline file (YAML)')
    .option('--workers <n>', 'worker threads (default: one per core)', parseWorkers)
    .option('--shard <K/N>', 'compute only shard K of N (1-based) into its own store, for batch systems')
    .option('--status', 'report done, failed (by reason), missing and stale models; compute nothing')
    .option('--json', 'with --status: print the counts as JSON')
    .option('--retry-failed', 'recompute models that failed before')
    .action(async (file: string, opts: { workers?: number; shard?: string; status?: boolean; json?: boolean; retryFailed?: boolean }) => {
      const { loadPipeline } = await import('../../config/pipeline.ts');
      const { parseShard, shardLabel } = await import('../../grid/shard.ts');
      const { mainStoreFile, shardStoreFile, shardPoints } = await import('../../grid/plan.ts');
      const { standaloneGridPlan, unusedRuleWarnings } = await import('../../pipeline/default-stages.ts');
      const shard = opts.shard === undefined ? undefined : parseShard(opts.shard);
      const pipeline = loadPipeline(file);
      const warn = (w: string) => ctx.stderr.write(`hoarfrost: warning: ${w}\n`);

      if (opts.status) {
        const plan = await standaloneGridPlan(pipeline);
        for (const w of unusedRuleWarnings(plan)) warn(w);
        const { gridStatus } = await import('../../grid/status.ts');
        const { findShardStores } = await import('../../grid/merge.ts');
        const storeFile = shard ? shardStoreFile(plan, shard) : mainStoreFile(plan);
        const s = gridStatus(storeFile, shardPoints(plan.points, shard));
        if (opts.json) {
          ctx.stdout.write(JSON.stringify({ pipeline: pipeline.file, shard: shard ? shardLabel(shard) : null, gridHash: plan.gridHash, ...s }, null, 2) + '\n');
          return;
        }
        const out = [
          `grid of ${pipeline.file}${shard ? `, shard ${shardLabel(shard)}` : ''}: ${s.points} point${s.points === 1 ? '' : 's'} (${plan.grid.varied.length > 0 ? `varied: ${plan.grid.varied.join(', ')}` : 'a single point'}${plan.grid.excluded > 0 ? `; ${plan.grid.excluded} excluded` : ''})`,
          `store: ${storeFile}${s.storeExists ? '' : ' (not created yet)'}`,
          `  done     ${s.done}`,
          `  failed   ${s.failed}`,
          ...Object.entries(s.failedByReason)
            .sort((a, b) => b[1] - a[1])
            .map(([reason, n]) => `    ${String(n).padStart(6)}  ${reason}`),
          `  missing  ${s.missing}`,
          `  stale    ${s.stale}${s.stale > 0 ? ' (an input changed since they were computed; rerun the grid)' : ''}`,
        ];
        if (s.outsideGrid > 0) out.push(`  (${s.outsideGrid} stored models belong to points no longer in the grid; they are kept but not used)`);
        if (!shard && s.done + s.failed === 0) {
          const shards = findShardStores(plan.storeDir);
          if (shards.length > 0) out.push(`${shards.length} shard stores are waiting in ${plan.storeDir}: run \`hoarfrost merge ${file}\`.`);
        }
        ctx.stdout.write(out.join('\n') + '\n');
        return;
      }

      const { computeGrid, defaultStages, GridStopped } = await import('../../pipeline/default-stages.ts');
      const { ProgressPrinter, formatDuration } = await import('../../grid/progress.ts');
      const progress = new ProgressPrinter(ctx.stderr);
      const drain = new AbortController();
      const abort = new AbortController();
      let stoppedBy: 'SIGINT' | 'SIGTERM' | undefined;
      const onInt = () => {
        if (!drain.signal.aborted) {
          stoppedBy = 'SIGINT';
          progress.message('stopping: finishing the models in flight (Ctrl-C again to stop at once; finished models are kept)');
          drain.abort();
        } else {
          progress.message('stopping now');
          abort.abort();
        }
      };
      const onTerm = () => {
        stoppedBy ??= 'SIGTERM';
        abort.abort();
      };
      const gridOptions = {
        retryFailed: opts.retryFailed,
        signals: { drain: drain.signal, abort: abort.signal },
        onStart: (i: { storeFile: string; share: number; upToDate: number; todo: number; stale: number; workers: number; note?: string }) =>
          progress.message(
            `grid${shard ? ` shard ${shardLabel(shard)}` : ''}: ${i.share} models, ${i.upToDate} already in ${i.storeFile}, ${i.todo} to compute${i.stale > 0 ? ` (${i.stale} stale)` : ''}${i.todo > 0 ? ` on ${i.workers} worker${i.workers > 1 ? 's' : ''}` : ''}${i.note ? ` (${i.note})` : ''}`,
          ),
        onProgress: (p: GridProgress) => progress.update(p),
      };
      process.on('SIGINT', onInt);
      process.on('SIGTERM', onTerm);
      let r: GridRunResult;
      try {
        if (shard) {
          const plan = await standaloneGridPlan(pipeline);
          for (const w of unusedRuleWarnings(plan)) warn(w);
          r = await computeGrid(pipeline, plan, { ...gridOptions, shard, workers: opts.workers, progress: (line) => progress.message(line) });
        } else {
          const { runStages } = await import('../../pipeline/runner.ts');
          const { needsSightlines } = await import('../../grid/expand.ts');
          const run = await runStages(pipeline, defaultStages({ grid: gridOptions }), {
            stages: needsSightlines(pipeline.config.conditions) ? ['observe', 'grid'] : ['grid'],
            force: ['grid'],
            workers: opts.workers,
            asked: 'hoarfrost grid',
            commandLine: ['hoarfrost', ...process.argv.slice(2)],
            progress: (line) => progress.message(line),
            onStage: (report) => report.warnings.forEach(warn),
          });
          r = run.data.grid!.run!;
        }
      } catch (e) {
        if (!(e instanceof GridStopped)) throw e;
        r = e.result;
      } finally {
        process.off('SIGINT', onInt);
        process.off('SIGTERM', onTerm);
      }
      progress.finish();
      const reasons = Object.entries(r.failureReasons).sort((a, b) => b[1] - a[1]);
      const stopped = r.interrupted || r.remaining > 0;
      const lines = [
        `${stopped ? 'stopped' : 'done'}: ${r.computed} computed (${r.ok} ok, ${r.failed} failed) in ${formatDuration(r.wallMs)}; ${r.upToDate} were up to date; ${r.remaining} left.`,
        ...reasons.map(([reason, n]) => `  failed ${n}x: ${reason}`),
      ];
      if (stopped) lines.push(`rerun \`hoarfrost grid ${file}${shard ? ` --shard ${shardLabel(shard)}` : ''}\` to compute the rest.`);
      ctx.stdout.write(lines.join('\n') + '\n');
      if (stopped) ctx.setExitCode(stoppedBy === 'SIGTERM' ? EXIT_TERMINATED : EXIT_INTERRUPTED);
    });
}
