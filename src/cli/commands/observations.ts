/**
 * `hoarfrost observations FILE|PIPELINE`: read an observation file (or the
 * one a pipeline names, with the pipeline's settings) and print what was
 * understood: sightlines, A_V, column densities and limits, the abundances
 * and ratios derived from them, and every warning. No model is run. A
 * pipeline with a `fit:` section is read by the observe stage of `hoarfrost
 * run`, which is recorded; without one, or with --format or --network, the
 * file is read by the same reader and every quantity it allows is shown.
 */
import type { Command } from 'commander';
import { UserError } from '../../config/errors.ts';
import type { CommandContext } from '../main.ts';
import type { ObservationSet, ObservedQuantity, Measurement, Sightline } from '../../obs/types.ts';
import type { ObservationsSection } from '../../config/sections/observations.ts';

/** Rows printed by default before the rest are counted (maps have many pixels). */
const DEFAULT_ROWS = 50;

interface Options {
  network?: string | false;
  format?: string;
  rows?: number;
  json?: boolean;
}

function num(x: number, digits = 3): string {
  return x.toPrecision(digits).replace(/e\+?/, 'e');
}

function columnText(m: Measurement | undefined): string {
  if (!m) return '-';
  if (m.kind === 'upper') return `<${num(m.value)}`;
  if (m.kind === 'lower') return `>${num(m.value)}`;
  if (m.errLo === m.errHi) return `${num(m.value)} ± ${num(m.errLo!, 2)}`;
  return `${num(m.value)} -${num(m.errLo!, 2)}/+${num(m.errHi!, 2)}`;
}

function quantityText(q: ObservedQuantity | undefined): string {
  if (!q) return '-';
  const v = q.log10.toFixed(2);
  if (q.kind === 'upper') return `<${v}`;
  if (q.kind === 'lower') return `>${v}`;
  const lo = q.sigmaLoDex.toFixed(2);
  const hi = q.sigmaHiDex.toFixed(2);
  return lo === hi ? `${v} ± ${lo}` : `${v} -${lo}/+${hi}`;
}

function avText(s: Sightline, akPerAv: number): string {
  if (s.av === undefined) return '-';
  const err = s.avErr !== undefined ? ` ± ${num(s.avErr, 2)}` : '';
  const fromAk = s.ak !== undefined && s.av === s.ak / akPerAv;
  return `${num(s.av)}${err}${fromAk ? ' (A_K)' : ''}`;
}

function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (r: string[]) => r.map((cell, c) => cell.padEnd(widths[c])).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

function describeSet(set: ObservationSet, section: ObservationsSection, quantities: ObservedQuantity[], maxRows: number): string {
  const species = set.species ?? [];
  const out: string[] = [];
  const what = set.kind === 'map' ? `map of ${set.map!.nx} x ${set.map!.ny} pixels, ${set.sightlines.length} with data` : `table of ${set.sightlines.length} sightlines`;
  out.push(`${set.file}: ${set.format ?? ''} ${what}, ${species.length} species`);
  if (set.map) {
    const w = set.map.wcs;
    const axes = [w.CTYPE1, w.CTYPE2].filter((x) => x !== undefined).join(', ');
    out.push(`  WCS: ${axes ? `axes ${axes}` : 'none in the header'}${w.CDELT1 !== undefined ? `, CDELT ${w.CDELT1}, ${w.CDELT2}` : ''}`);
  }
  out.push(`  N_H/A_V = ${section.nh_per_av} cm-2 mag-1, A_K/A_V = ${section.ak_per_av}, ice threshold ${section.ice_threshold_av} mag, model A_V = ${section.model_av_fraction} x observed, reference ${section.reference}`);
  const fromTau = new Map<string, string>();
  const fromAk = set.sightlines.filter((s) => s.ak !== undefined && s.av === s.ak / section.ak_per_av).length;
  for (const s of set.sightlines) for (const [sp, m] of Object.entries(s.columns)) if (m.fromTau) fromTau.set(sp, `${m.fromTau.band}, A = ${m.fromTau.bandStrength} cm/molecule`);
  for (const [sp, band] of fromTau) out.push(`  ${sp}: column from integrated optical depth (${band})`);
  if (fromAk > 0) out.push(`  A_V from A_K toward ${fromAk} sightline${fromAk > 1 ? 's' : ''}`);
  out.push('');
  const shown = set.sightlines.slice(0, maxRows);
  const more = set.sightlines.length - shown.length;
  out.push('Column densities, cm-2 (<: upper limit, >: lower limit, -: not observed)');
  out.push(table(['sightline', 'A_V (mag)', ...species], shown.map((s) => [s.id, avText(s, section.ak_per_av), ...species.map((sp) => columnText(s.columns[sp]))])));
  if (more > 0) out.push(`... and ${more} more (show them with --rows ${set.sightlines.length})`);
  if (quantities.length > 0) {
    const labels = [...new Set(quantities.map((q) => q.label))];
    const by = new Map<string, ObservedQuantity>();
    for (const q of quantities) by.set(`${q.sightline}\u0000${q.label}`, q);
    out.push('');
    out.push('Derived, log10 (errors in dex; X = N/N_H)');
    out.push(table(['sightline', ...labels], shown.map((s) => [s.id, ...labels.map((l) => quantityText(by.get(`${s.id}\u0000${l}`)))])));
  }
  return out.join('\n');
}

export function register(program: Command, ctx: CommandContext): void {
  program
    .command('observations')
    .description('read an observation file (or the one a pipeline names) and print what was understood: sightlines, columns, limits, abundances, ratios, warnings')
    .argument('<file>', 'observation file (.csv, .tsv, .yaml, .xml/.vot, .fits) or pipeline file')
    .option('--format <format>', 'reader to use instead of the one the extension implies (csv, tsv, yaml, votable, fits)')
    .option('--network <file>', 'check species names against this network (a pipeline\'s own network is used by default)')
    .option('--no-network', "do not check species against a network")
    .option('--rows <n>', `sightlines to print (default ${DEFAULT_ROWS})`, (v: string) => {
      const n = Number(v);
      if (!/^\s*\d+\s*$/.test(v) || n < 1) throw new UserError(`--rows expects a whole number of at least 1, found '${v}'.`);
      return n;
    })
    .option('--json', 'print the observation set and derived quantities as JSON')
    .action(async (file: string, opts: Options) => {
      const { resolve, dirname } = await import('node:path');
      const { observationsSection, observationFormats } = await import('../../config/sections/observations.ts');
      const { loadObservations, formatOf } = await import('../../obs/load.ts');
      const { deriveQuantities } = await import('../../obs/derive.ts');
      const { parseYamlText, readTextFile } = await import('../../config/yaml.ts');

      let section: ObservationsSection;
      let baseDir: string;
      let networkFile: string | undefined;
      let wanted: { species: string; as: 'abundance' | 'ratio' }[] | undefined;
      const isYaml = /\.ya?ml$/i.test(file);
      const looksLikePipeline = isYaml && (() => {
        const data = parseYamlText(readTextFile(file, 'file'), file).data;
        return !!data && typeof data === 'object' && !Array.isArray(data) && 'observations' in data;
      })();
      if (looksLikePipeline) {
        const { loadPipeline } = await import('../../config/pipeline.ts');
        const p = loadPipeline(file);
        if (!p.config.observations) throw new UserError("the pipeline has no 'observations' section.", { file, field: 'observations' });
        if (p.config.fit && opts.format === undefined && typeof opts.network !== 'string' && opts.network !== false) {
          const { runStages } = await import('../../pipeline/runner.ts');
          const { defaultStages } = await import('../../pipeline/default-stages.ts');
          const run = await runStages(p, defaultStages(), { stages: ['observe'], force: ['observe'], asked: 'hoarfrost observations', commandLine: ['hoarfrost', ...process.argv.slice(2)] });
          const { observations, quantities } = run.data.observe!;
          printSet(observations, p.config.observations, quantities, run.stages.find((r) => r.name === 'observe')!.warnings, opts, ctx);
          return;
        }
        section = p.config.observations;
        if (opts.format) section = { ...section, format: opts.format as ObservationsSection['format'] };
        baseDir = p.dir;
        networkFile = p.resolvePath(p.config.network);
        wanted = p.config.fit?.quantities;
      } else {
        if (opts.format !== undefined && !(observationFormats as readonly string[]).includes(opts.format)) {
          throw new UserError(`--format expects one of ${observationFormats.join(', ')}, found '${opts.format}'.`);
        }
        if (!opts.format && !formatOf(file)) throw new UserError('cannot tell the format from the file name; give --format.', { file });
        section = observationsSection.parse({ file: resolve(file), format: opts.format });
        baseDir = dirname(resolve(file));
      }
      if (typeof opts.network === 'string') networkFile = resolve(opts.network);
      if (opts.network === false) networkFile = undefined;
      let known: Set<string> | undefined;
      if (networkFile) {
        const { loadNetwork } = await import('../../chem/network.ts');
        known = new Set(loadNetwork(networkFile).species.map((s) => s.name));
      }
      const set = loadObservations(section, baseDir, known);
      const warnings = [...set.warnings];
      let quantities: ObservedQuantity[] = [];
      if (wanted) {
        const d = deriveQuantities(set, section, wanted);
        quantities = d.quantities;
        warnings.push(...d.warnings);
      } else {
        // Species outside the network are shown as columns only: no model gives their abundances or ratios.
        const species = (set.species ?? []).filter((sp) => !set.outsideNetwork?.includes(sp));
        const ratios = species.filter((s) => s !== section.reference).map((s) => ({ species: s, as: 'ratio' as const }));
        const abundances = species.map((s) => ({ species: s, as: 'abundance' as const }));
        const hasAv = set.sightlines.some((s) => s.av !== undefined);
        const hasRef = species.includes(section.reference);
        try {
          const d = deriveQuantities(set, section, [...(hasAv ? abundances : []), ...(hasRef ? ratios : [])]);
          quantities = d.quantities;
          warnings.push(...d.warnings);
        } catch (e) {
          if (!(e instanceof UserError)) throw e;
          warnings.push(`abundances not derived: ${e.message}`);
          if (hasRef) {
            const d = deriveQuantities(set, section, ratios);
            quantities = d.quantities;
            warnings.push(...d.warnings);
          }
        }
        if (!hasAv) warnings.push('no A_V or A_K: abundances relative to H not derived (ratios need none).');
        if (!hasRef) warnings.push(`the reference species ${section.reference} is not in the file: no ratios derived (set 'reference' in the pipeline's observations section).`);
      }
      printSet(set, section, quantities, warnings, opts, ctx);
    });
}

function printSet(set: ObservationSet, section: ObservationsSection, quantities: ObservedQuantity[], warnings: readonly string[], opts: Options, ctx: CommandContext): void {
  if (opts.json) {
    ctx.stdout.write(`${JSON.stringify({ observations: { ...set, warnings: undefined }, quantities, warnings }, null, 2)}\n`);
    return;
  }
  ctx.stdout.write(`${describeSet(set, section, quantities, opts.rows ?? DEFAULT_ROWS)}\n`);
  if (warnings.length > 0) ctx.stdout.write(`\nWarnings (${warnings.length}):\n${warnings.map((w) => `  - ${w.replace(/\n/g, '\n    ')}`).join('\n')}\n`);
}
