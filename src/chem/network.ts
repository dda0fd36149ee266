/**
 * Loading a chemical network: our YAML network format, or a CSV/TSV table
 * with a YAML column mapping (network-table.ts). `loadNetwork` picks the
 * reader from the file; both end in assembleNetwork, which checks every
 * entry against the rate-law table and reports all problems of a file at
 * once.
 *
 * The YAML network format (`format: hoarfrost-network 1`):
 *
 *   format: hoarfrost-network 1
 *   name: dark-cloud
 *   description: free text            (optional)
 *   origin: where the values come from (optional; default origin of entries)
 *   species:                           (binding energy E_D/k_B in K; mass in u only
 *     - {name: CO, binding_energy: 1150, origin: "..."}   where not from the formula;
 *                                       no_surface_sink: why no surface reaction
 *                                       destroys the ice, where none does on purpose)
 *   reactions:
 *     - {reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius,
 *        alpha: 1.6e-9, beta: 0, gamma: 0, temperature: [10, 300], origin: "..."}
 *
 * A reaction names its law and that law's parameters as keys of its own
 * (src/chem/laws.ts lists them with their defaults); a parameter the law does
 * not take is an error. `temperature` is allowed on gas-phase laws only and
 * defaults to [DEFAULT_TMIN, DEFAULT_TMAX]. One species entry serves both the
 * gas form and the ice form `X(s)`.
 */
import { extname } from 'node:path';
import { z } from 'zod';
import { UserError, type ErrorLocation } from '../config/errors.ts';
import { decodeText, parseYamlText, validate, type LoadedYaml, type PathKey } from '../config/yaml.ts';
import { RATE_LAWS } from './laws.ts';
import { assembleNetwork, type RawReaction, type RawSpecies } from './network-assemble.ts';
import { collect, readBytes, sha256, speciesEntrySchema } from './network-read.ts';
import { isTableFile, loadNetworkTable, loadNetworkTableFromMapping, TABLE_MAPPING_FORMAT } from './network-table.ts';
import type { Network } from './network-types.ts';

export { DEFAULT_TMAX, DEFAULT_TMIN } from './network-assemble.ts';

export const NETWORK_FORMAT = 'hoarfrost-network 1';

export interface LoadNetworkOptions {
  /** Column mapping of a CSV/TSV network; by default `<table stem>.mapping.yaml` beside the table. */
  mapping?: string;
}

/** Every parameter name of every law, so the reaction schema can be strict. */
const PARAM_NAMES = [...new Set(Object.values(RATE_LAWS).flatMap((law) => law.params.map((p) => p.name)))];

const reactionSchema = z.strictObject({
  reactants: z.array(z.string()),
  products: z.array(z.string()),
  law: z.string(),
  temperature: z.tuple([z.number(), z.number()]).optional(),
  origin: z.string().optional(),
  uncertainty_factor: z.number().optional(),
  ...Object.fromEntries(PARAM_NAMES.map((name) => [name, z.number().optional()])),
});

const networkSchema = z.strictObject({
  format: z.literal(NETWORK_FORMAT),
  name: z.string().min(1),
  description: z.string().optional(),
  origin: z.string().optional(),
  species: z.array(z.unknown()).optional(),
  reactions: z.array(z.unknown()),
});

/** Load a network file: YAML network, table mapping (YAML), or CSV/TSV table. */
export function loadNetwork(file: string, options: LoadNetworkOptions = {}): Network {
  if (isTableFile(file)) return loadNetworkTable(file, options.mapping);
  const ext = extname(file).toLowerCase();
  if (ext !== '.yaml' && ext !== '.yml') {
    throw new UserError(`cannot tell the network format from the extension '${ext}'; expected a YAML network (.yaml, .yml) or a table (.csv, .tsv) with a column mapping.`, { file });
  }
  if (options.mapping) {
    throw new UserError('a column mapping applies to a CSV/TSV table, not to a YAML network; drop the mapping or give the table.', { file });
  }
  const bytes = readBytes(file, 'network file');
  const loaded = parseYamlText(decodeText(bytes, file, 'network file'), file);
  const format = (loaded.data as { format?: unknown } | null)?.format;
  if (format === TABLE_MAPPING_FORMAT) return loadNetworkTableFromMapping(loaded, bytes);
  return readYamlNetwork(loaded, sha256(bytes));
}

function readYamlNetwork(loaded: LoadedYaml, contentHash: string): Network {
  const { file } = loaded;
  if (loaded.data === null || typeof loaded.data !== 'object' || Array.isArray(loaded.data)) {
    throw new UserError(`expected a mapping with format: ${NETWORK_FORMAT}, name, species and reactions.`, { file, line: 1 });
  }
  const format = (loaded.data as { format?: unknown }).format;
  if (format !== NETWORK_FORMAT) {
    throw new UserError(
      format === undefined
        ? `missing 'format'. Start the file with 'format: ${NETWORK_FORMAT}' (or 'format: ${TABLE_MAPPING_FORMAT}' for a table mapping).`
        : `unknown format '${String(format)}'; expected '${NETWORK_FORMAT}' or '${TABLE_MAPPING_FORMAT}'.`,
      { file, line: loaded.lineOf(['format']), field: 'format' },
    );
  }
  const top = validate(networkSchema, loaded);
  const problems: UserError[] = [];
  const locateAt =
    (base: PathKey[]) =>
    (field?: string): ErrorLocation => {
      const path = field ? [...base, ...splitField(field)] : base;
      return { file, line: loaded.lineOf(path), field: formatField(path) };
    };

  const species: RawSpecies[] = [];
  (top.species ?? []).forEach((entry, i) => {
    const base: PathKey[] = ['species', i];
    const s = collect(problems, () => validate(speciesEntrySchema, loaded, base, entry));
    if (!s) return;
    species.push({
      name: s.name,
      bindingEnergy: s.binding_energy,
      mass: s.mass,
      noSurfaceSink: s.no_surface_sink,
      origin: s.origin,
      source: { file, line: loaded.lineOf(base) },
      locate: locateAt(base),
    });
  });

  const reactions: RawReaction[] = [];
  top.reactions.forEach((entry, i) => {
    const base: PathKey[] = ['reactions', i];
    const r = collect(problems, () => validate(reactionSchema, loaded, base, entry));
    if (!r) return;
    const params: Record<string, number> = {};
    for (const name of PARAM_NAMES) {
      const v = (r as Record<string, unknown>)[name];
      if (typeof v === 'number') params[name] = v;
    }
    reactions.push({
      reactants: r.reactants,
      products: r.products,
      law: r.law,
      params,
      temperature: r.temperature,
      origin: r.origin,
      uncertaintyFactor: r.uncertainty_factor,
      source: { file, line: loaded.lineOf(base) },
      locate: locateAt(base),
    });
  });

  return assembleNetwork({
    name: top.name,
    file,
    description: top.description,
    origin: top.origin,
    species,
    reactions,
    contentHash,
    problems,
  });
}

function splitField(field: string): PathKey[] {
  const out: PathKey[] = [];
  for (const m of field.matchAll(/([^.[\]]+)|\[(\d+)\]/g)) out.push(m[2] !== undefined ? Number(m[2]) : m[1]);
  return out;
}

function formatField(path: readonly PathKey[]): string {
  return path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${p}`)).join('').replace(/^\./, '');
}
