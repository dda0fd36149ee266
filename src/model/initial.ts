/**
 * Initial compositions: a preset named after a file of config/initial/
 * (`low-metal`), a path to such a file, or an explicit mapping from species to
 * fractional abundance. Electrons are added to balance the ions' charge when
 * the composition does not give them, so a model starts neutral.
 *
 * File format (`format: hoarfrost-initial 1`):
 *
 *   format: hoarfrost-initial 1
 *   name: low-metal
 *   abundances:
 *     H2: { value: 0.5, origin: "..." }   # or a bare number
 *     P+: { value: 2.0e-10, optional: true, origin: "..." }
 *
 * An entry marked `optional` is a trace element a network may leave out: when
 * the network lacks it, it is dropped and a note says so. Every other species
 * must be in the network.
 */
import { existsSync, readdirSync } from 'node:fs';
import { dirname, isAbsolute, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { throwProblems, UserError } from '../config/errors.ts';
import { loadYamlFile, validate, type LoadedYaml } from '../config/yaml.ts';
import type { Network } from '../chem/network-types.ts';

export const INITIAL_FORMAT = 'hoarfrost-initial 1';

/** Folder of the presets shipped with the tool. */
export const PRESET_DIR = resolve(dirname(fileURLToPath(import.meta.url)), '../../config/initial');

const ELECTRON = 'e-';

const entrySchema = z.union([z.number().min(0), z.strictObject({ value: z.number().min(0), optional: z.boolean().optional(), origin: z.string().optional() })]);

const fileSchema = z.strictObject({
  format: z.literal(INITIAL_FORMAT),
  name: z.string().optional(),
  description: z.string().optional(),
  abundances: z.record(z.string(), entrySchema),
});

function presetNames(): string[] {
  if (!existsSync(PRESET_DIR)) return [];
  return readdirSync(PRESET_DIR)
    .filter((f) => f.endsWith('.yaml'))
    .map((f) => f.slice(0, -'.yaml'.length))
    .sort();
}

function looksLikePath(spec: string): boolean {
  return spec.includes('/') || spec.includes('\\') || /\.ya?ml$/i.test(spec);
}

interface Composition {
  abundances: Record<string, number>;
  optional: Set<string>;
  /** Where each species was given, for errors. */
  lineOf(name: string): number | undefined;
  file?: string;
}

function readFile(file: string): Composition {
  const loaded: LoadedYaml = loadYamlFile(file, 'initial composition file');
  const parsed = validate(fileSchema, loaded);
  const abundances: Record<string, number> = {};
  const optional = new Set<string>();
  for (const [name, entry] of Object.entries(parsed.abundances)) {
    abundances[name] = typeof entry === 'number' ? entry : entry.value;
    if (typeof entry !== 'number' && entry.optional) optional.add(name);
  }
  return { abundances, optional, lineOf: (name) => loaded.lineOf(['abundances', name]), file };
}

/** Where the `initial` section was written (the pipeline file), for errors about a preset name or an inline mapping. */
export interface InitialSpecAt {
  file: string;
  lineOf(path: readonly (string | number)[]): number | undefined;
}

function resolveSpec(spec: string | Record<string, number>, baseDir: string, at?: InitialSpecAt): Composition {
  if (typeof spec !== 'string') return { abundances: { ...spec }, optional: new Set(), lineOf: (name) => at?.lineOf(['initial', name]), file: at?.file };
  if (looksLikePath(spec)) return readFile(isAbsolute(spec) ? spec : resolve(baseDir, spec));
  const preset = join(PRESET_DIR, `${spec}.yaml`);
  if (!existsSync(preset)) {
    throw new UserError(
      `unknown initial composition preset '${spec}'. Known presets: ${presetNames().join(', ') || '(none)'}; or give a path to a YAML file (format: ${INITIAL_FORMAT}) or a mapping of species to abundances.`,
      { file: at?.file, line: at?.lineOf(['initial']), field: 'initial' },
    );
  }
  return readFile(preset);
}

/**
 * The initial fractional abundances for a network. Every species must be in the
 * network (except optional ones, dropped with a note pushed to `notes`) and every
 * value finite and non-negative; all problems are reported at once.
 */
export function loadInitialComposition(spec: string | Record<string, number>, baseDir: string, network: Network, notes: string[] = [], at?: InitialSpecAt): Record<string, number> {
  const comp = resolveSpec(spec, baseDir, at);
  const inline = typeof spec !== 'string';
  const where = (name: string) => ({ file: comp.file, line: comp.lineOf(name), field: inline ? `initial.${name}` : `abundances.${name}` });
  const problems: UserError[] = [];
  let charge = 0;
  const result: Record<string, number> = {};
  for (const [name, value] of Object.entries(comp.abundances)) {
    if (!Number.isFinite(value) || value < 0) {
      problems.push(new UserError(`the abundance of ${name} must be a finite number of at least 0, found ${value}.`, where(name)));
      continue;
    }
    const i = network.speciesIndex.get(name);
    if (i === undefined && comp.optional.has(name)) {
      notes.push(`initial composition: network '${network.name}' has no ${name}; this optional trace species (x = ${value}) is left out`);
      continue;
    }
    if (i === undefined) {
      problems.push(
        new UserError(
          `the initial composition needs species '${name}', which network '${network.name}' (${network.file}) does not have. Add it to the network or remove it from the initial composition.`,
          where(name),
        ),
      );
      continue;
    }
    charge += network.species[i].charge * value;
    result[name] = value;
  }
  throwProblems(problems, `${problems.length} problems with the initial composition:`, { file: comp.file });
  if (!(ELECTRON in result) && charge !== 0) {
    if (!network.speciesIndex.has(ELECTRON) || charge < 0) {
      throw new UserError(
        `the initial composition carries a net charge of ${charge.toExponential(3)} per H nucleus and network '${network.name}' has no electrons to balance it. Give the abundances of charged species so that they sum to zero charge.`,
        { file: comp.file, field: inline ? 'initial' : 'abundances' },
      );
    }
    result[ELECTRON] = charge;
  }
  return result;
}
