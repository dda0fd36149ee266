/** `hoarfrost init DIR`: a starting project folder. */
import type { Command } from 'commander';
import type { CommandContext } from '../main.ts';

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('init')
    .description('make a starting project folder: a pipeline file with every option, an example observations table, the default network and a README')
    .argument('<dir>', 'folder to create (or an existing folder without these files)')
    .action(async (dir: string) => {
      const { initProject } = await import('../../pipeline/init.ts');
      const { displayPath } = await import('../../pipeline/execute.ts');
      const r = initProject(dir);
      for (const f of r.files) ctx.stdout.write(`wrote ${displayPath(f)}\n`);
      ctx.stdout.write(`next: hoarfrost run ${displayPath(`${r.dir}/pipeline.yaml`)}\n`);
    });
}
