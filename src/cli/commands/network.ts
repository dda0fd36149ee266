/**
 * `hoarfrost network check FILE [--json] [--mapping FILE]`: load a network
 * and report its counts and problems. Exit 0 when there is no error
 * (warnings are printed), 1 when the check finds errors; a file that does
 * not load is a UserError (exit 2) listing every problem found.
 */
import type { Command } from 'commander';
import type { CommandContext } from '../main.ts';

export function register(program: Command, ctx: CommandContext): void {
  const network = program.command('network').description('work with chemical network files');
  network
    .command('check')
    .description('load a network (YAML, or CSV/TSV with a column mapping) and report counts, conservation errors, duplicates, orphan species and temperature-range problems')
    .argument('<file>', 'network file: .yaml/.yml network or table mapping, or a .csv/.tsv table')
    .option('--mapping <file>', 'column mapping of a CSV/TSV table (default: <table>.mapping.yaml beside it)')
    .option('--json', 'print the report as JSON')
    .action(async (file: string, opts: { json?: boolean; mapping?: string }) => {
      const { loadNetwork } = await import('../../chem/network.ts');
      const { checkNetwork, formatReport } = await import('../../chem/network-check.ts');
      const report = checkNetwork(loadNetwork(file, { mapping: opts.mapping }));
      ctx.stdout.write(opts.json ? JSON.stringify(report, null, 2) + '\n' : formatReport(report));
      ctx.setExitCode(report.errors > 0 ? 1 : 0);
    });
}
