/**
 * `hoarfrost network check FILE [--json] [--mapping FILE] [--derive SWITCHES]`:
 * load a network and report its counts and problems; with --derive, also the
 * reactions the named grain switches would add (each named, checked for
 * conservation). Exit 0 when there is no error
 * (warnings are printed), 1 when the check finds errors; a file that does
 * not load is a UserError (exit 2) listing every problem found.
 */
import type { Command } from 'commander';
import type { CommandContext } from '../main.ts';
import { DEFAULT_GRAIN_OPTIONS } from '../../config/conditions.ts';
import { UserError } from '../../config/errors.ts';

/** The grain switches that add reactions, as the pipeline's grain section spells them. */
const DERIVING_SWITCHES = {
  ice_photolysis: 'icePhotolysis',
  three_body: 'threeBody',
  eley_rideal: 'eleyRideal',
  photodissociation_induced: 'photodissociationInduced',
} as const;

type DerivingSwitch = keyof typeof DERIVING_SWITCHES;

function parseSwitches(text: string): DerivingSwitch[] {
  const names = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  const bad = names.filter((n) => !Object.prototype.hasOwnProperty.call(DERIVING_SWITCHES, n));
  if (names.length === 0 || bad.length > 0) {
    throw new UserError(`--derive takes grain switches separated by commas (${Object.keys(DERIVING_SWITCHES).join(', ')}); ${names.length === 0 ? 'none given' : `unknown: ${bad.join(', ')}`}.`, { field: '--derive' });
  }
  return names as DerivingSwitch[];
}

export function register(program: Command, ctx: CommandContext): void {
  const network = program.command('network').description('work with chemical network files');
  network
    .command('check')
    .description('load a network (YAML, or CSV/TSV with a column mapping) and report counts, conservation errors, duplicates, orphan species and temperature-range problems')
    .argument('<file>', 'network file: .yaml/.yml network or table mapping, or a .csv/.tsv table')
    .option('--mapping <file>', 'column mapping of a CSV/TSV table (default: <table>.mapping.yaml beside it)')
    .option('--json', 'print the report as JSON')
    .option('--derive <switches>', `also derive and check the reactions these grain switches add (comma-separated: ${Object.keys(DERIVING_SWITCHES).join(', ')})`)
    .action(async (file: string, opts: { json?: boolean; mapping?: string; derive?: string }) => {
      const { loadNetwork } = await import('../../chem/network.ts');
      const { checkNetwork, formatReport } = await import('../../chem/network-check.ts');
      const { deriveReactions } = await import('../../chem/derive.ts');
      const loaded = loadNetwork(file, { mapping: opts.mapping });
      let derive: Parameters<typeof checkNetwork>[1];
      if (opts.derive !== undefined) {
        const options = parseSwitches(opts.derive);
        const grain = { ...DEFAULT_GRAIN_OPTIONS };
        for (const name of options) grain[DERIVING_SWITCHES[name]] = true;
        derive = { options, ...deriveReactions(loaded, grain) };
      }
      const report = checkNetwork(loaded, derive);
      ctx.stdout.write(opts.json ? JSON.stringify(report, null, 2) + '\n' : formatReport(report));
      ctx.setExitCode(report.errors > 0 ? 1 : 0);
    });
}
