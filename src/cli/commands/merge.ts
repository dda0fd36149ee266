/**
 * `hoarfrost merge PIPELINE`: combine the shard stores of the pipeline's grid
 * (OUT/store/shard-K-of-N.sqlite) into OUT/store/models.sqlite. Stores made
 * from a different grid are refused; duplicates and missing points are
 * reported. Exit 1 when points are still missing, 0 when the grid is whole.
 */
import type { Command } from 'commander';
import type { CommandContext } from '../main.ts';

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('merge')
    .description("combine the grid's shard stores into its model store; report duplicates and missing points")
    .argument('<pipeline>', 'pipeline file (YAML)')
    .argument('[stores...]', 'shard store files (default: every shard-K-of-N.sqlite in the output store folder)')
    .action(async (file: string, stores: string[]) => {
      const { loadPipeline } = await import('../../config/pipeline.ts');
      const { standaloneGridPlan } = await import('../../pipeline/default-stages.ts');
      const { mergeShards } = await import('../../grid/merge.ts');
      const { resolve } = await import('node:path');
      const plan = await standaloneGridPlan(loadPipeline(file));
      const r = mergeShards(plan, stores.length > 0 ? stores.map((s) => resolve(s)) : undefined);
      const lines = [
        `merged ${r.shardFiles.length} shard stores into ${r.storeFile}: ${r.copied} models copied, ${r.alreadyPresent} already there.`,
        `grid: ${r.points} points, ${r.points - r.missing - r.failed} done, ${r.failed} failed, ${r.missing} missing.`,
      ];
      if (r.duplicates > 0) {
        lines.push(`${r.duplicates} points were in more than one shard store (copied once), e.g.:`);
        for (const d of r.duplicateSample) lines.push(`  ${d.id}: ${d.files.join(', ')}`);
      }
      if (r.staleInShards > 0) lines.push(`${r.staleInShards} models in the shard stores were computed with other inputs and were not copied.`);
      if (r.missing > 0) {
        lines.push(`missing points, e.g.: ${r.missingSample.join(', ')}${r.missing > r.missingSample.length ? ', ...' : ''}`);
        lines.push(`compute them with \`hoarfrost grid ${file}\` (or rerun the shards that stopped early, then merge again).`);
        ctx.setExitCode(1);
      }
      ctx.stdout.write(lines.join('\n') + '\n');
    });
}
