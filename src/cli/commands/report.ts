/**
 * `hoarfrost report PIPELINE`: draw the report again (figures, tables, FITS
 * maps, HTML) from the results the observe, grid and fit stages left in the
 * output folder, for instance after changing the pipeline's `report:` section.
 */
import type { Command } from 'commander';
import type { CommandContext } from '../main.ts';

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('report')
    .description("redraw the report (figures, tables, HTML) from the fit results already in the pipeline's output folder")
    .argument('<pipeline>', 'pipeline file (YAML)')
    .action(async (file: string) => {
      const { executeRun } = await import('../../pipeline/execute.ts');
      const code = await executeRun({
        pipelineFile: file,
        only: 'report',
        commandLine: ['hoarfrost', ...process.argv.slice(2)],
        stdout: ctx.stdout,
        stderr: ctx.stderr,
      });
      ctx.setExitCode(code);
    });
}
