/**
 * Importing a network a user already holds as a CSV or TSV table, through a
 * YAML column mapping (`format: hoarfrost-network-table 1`):
 *
 *   format: hoarfrost-network-table 1
 *   name: my-network
 *   table: my-network.csv        (relative to the mapping; may be left out when the
 *                                 mapping sits beside the table as my-network.mapping.yaml)
 *   delimiter: ","               (default: "," for .csv, tab for .tsv)
 *   header: true                 (first data line names the columns; default true)
 *   comment: "#"                 (lines starting with it are skipped; default "#")
 *   columns:                     (a column is its header name, or its number from 1)
 *     reactants: [r1, r2]        (empty cells are no species)
 *     products: [p1, p2, p3]
 *     law: kind                  (or a fixed `law: arrhenius` at the top level)
 *     parameters: {alpha: a, beta: b, gamma: c}
 *     temperature: [tmin, tmax]  (optional; both cells empty = the default range)
 *     origin: ref                (optional)
 *     uncertainty_factor: F      (optional: the factor F of each coefficient, log-normal at
 *                                 one standard deviation; an empty cell leaves the law's
 *                                 default of src/chem/uncertainty.ts)
 *   law_codes: {"1": cosmic-ray} (optional: the law column holds codes of the user's own)
 *   law_parameters:              (optional: another column for a parameter of one law)
 *     cosmic-ray-uv: {alpha: c}
 *   unused_cells: error          (a non-empty, non-zero cell the row's law does not
 *                                 use is an error; `ignore` accepts it knowingly)
 *   not_species: [PHOTON, CR]    (cells naming the process rather than a species; the
 *                                 law says it, so they are left out of the reaction)
 *   rename: {their-name: CO(s)}  (the table's names for species, where they differ from ours)
 *   ice_prefix: "i_"             (a name starting with it is the ice form of the rest)
 *   species: [{name: CO, binding_energy: 1150}]   (as in a YAML network)
 *
 * A temperature range is kept for the gas-phase laws only; on grain-process
 * rows the temperature cells are ignored (tables fill them by habit).
 * Every bad row is reported with its line and data-row number; no row is
 * skipped silently. The content hash covers the mapping and the table.
 */
import { dsvFormat } from 'd3-dsv';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { existsSync } from 'node:fs';
import { z } from 'zod';
import { UserError, UserErrors, type ErrorLocation } from '../config/errors.ts';
import { decodeText, parseYamlText, validate, type LoadedYaml, type PathKey } from '../config/yaml.ts';
import { isRateLawName, RATE_LAW_NAMES, RATE_LAWS, type RateLawName } from './laws.ts';
import { assembleNetwork, GAS_TEMPERATURE_LAWS, type RawReaction, type RawSpecies } from './network-assemble.ts';
import { collect, readBytes, sha256, speciesEntrySchema } from './network-read.ts';
import type { Network } from './network-types.ts';
import { iceName } from './species.ts';

export const TABLE_MAPPING_FORMAT = 'hoarfrost-network-table 1';

const TABLE_EXTENSIONS: Readonly<Record<string, string>> = { '.csv': ',', '.tsv': '\t' };
const MAPPING_SUFFIX = '.mapping.yaml';
const DEFAULT_COMMENT = '#';

const column = z.union([z.string().min(1), z.number().int().positive()]);

const mappingSchema = z.strictObject({
  format: z.literal(TABLE_MAPPING_FORMAT),
  name: z.string().min(1),
  description: z.string().optional(),
  origin: z.string().optional(),
  table: z.string().min(1).optional(),
  delimiter: z.string().length(1).optional(),
  header: z.boolean().optional(),
  comment: z.string().min(1).optional(),
  columns: z.strictObject({
    reactants: z.array(column).min(1),
    products: z.array(column).min(1),
    law: column.optional(),
    parameters: z.record(z.string(), column).optional(),
    temperature: z.tuple([column, column]).optional(),
    origin: column.optional(),
    uncertainty_factor: column.optional(),
  }),
  law: z.string().optional(),
  law_codes: z.record(z.string(), z.string()).optional(),
  law_parameters: z.record(z.string(), z.record(z.string(), column)).optional(),
  unused_cells: z.enum(['error', 'ignore']).optional(),
  not_species: z.array(z.string().min(1)).optional(),
  rename: z.record(z.string(), z.string()).optional(),
  ice_prefix: z.string().min(1).optional(),
  species: z.array(z.unknown()).optional(),
});

type Mapping = z.infer<typeof mappingSchema>;
type Column = z.infer<typeof column>;

export function isTableFile(file: string): boolean {
  return extname(file).toLowerCase() in TABLE_EXTENSIONS;
}

/** Load a CSV/TSV network; the mapping is given or sits beside the table as `<stem>.mapping.yaml`. */
export function loadNetworkTable(tableFile: string, mappingFile?: string): Network {
  const mapping = mappingFile ?? join(dirname(tableFile), basename(tableFile, extname(tableFile)) + MAPPING_SUFFIX);
  if (mappingFile === undefined && !existsSync(mapping)) {
    throw new UserError(`a table network needs a column mapping; none found at ${mapping}. Write one there (format: ${TABLE_MAPPING_FORMAT}; its keys are in docs/formats.md section 2) or name it with --mapping.`, { file: tableFile });
  }
  const bytes = readBytes(mapping, 'column mapping');
  const loaded = parseYamlText(decodeText(bytes, mapping, 'column mapping'), mapping);
  return readTable(loaded, bytes, tableFile);
}

/** Load the table a mapping file names in its `table` field. */
export function loadNetworkTableFromMapping(loaded: LoadedYaml, bytes: Buffer): Network {
  return readTable(loaded, bytes, undefined);
}

function readTable(loaded: LoadedYaml, mappingBytes: Buffer, givenTable: string | undefined): Network {
  const mappingFile = loaded.file;
  const m = validate(mappingSchema, loaded);
  const at = (path: PathKey[]): ErrorLocation => ({ file: mappingFile, line: loaded.lineOf(path), field: path.join('.') });
  const named = m.table === undefined ? undefined : resolve(dirname(mappingFile), m.table);
  if (givenTable && named && resolve(givenTable) !== named) {
    throw new UserError(`the mapping names the table ${m.table}, but it was given for ${givenTable}. Remove 'table' or give the table it names.`, at(['table']));
  }
  const tableFile = givenTable ?? named;
  if (!tableFile) throw new UserError("missing 'table': name the CSV/TSV file this mapping reads (relative to the mapping).", { file: mappingFile, field: 'table' });
  if (m.law !== undefined && m.columns.law !== undefined) {
    throw new UserError("give either a law column (columns.law) or one law for every row (law), not both.", at(['law']));
  }
  if (m.law === undefined && m.columns.law === undefined) {
    throw new UserError(`missing the rate law: add columns.law (a column naming each row's law) or law (one of ${RATE_LAW_NAMES.join(', ')}) for every row.`, at(['columns']));
  }
  const problems: UserError[] = [];
  checkLawNames(m, at, problems);

  const tableBytes = readBytes(tableFile, 'network table');
  const delimiter = m.delimiter ?? TABLE_EXTENSIONS[extname(tableFile).toLowerCase()] ?? ',';
  const comment = m.comment ?? DEFAULT_COMMENT;
  const parser = dsvFormat(delimiter);
  const lines = decodeText(tableBytes, tableFile, 'network table').split(/\r?\n/);
  let header: string[] | undefined;
  const rows: { cells: string[]; line: number; row: number }[] = [];
  lines.forEach((text, i) => {
    if (text.trim() === '' || text.startsWith(comment)) return;
    const cells = parser.parseRows(text)[0] ?? [];
    if (m.header !== false && header === undefined) header = cells.map((c) => c.trim());
    else rows.push({ cells, line: i + 1, row: rows.length + 1 });
  });
  if (rows.length === 0) {
    throw new UserError(`the table has no data rows${header ? ' below its header' : ''}.`, { file: tableFile });
  }
  const width = header?.length ?? rows[0].cells.length;
  const resolveColumn = (col: Column, path: PathKey[]): number | undefined => {
    if (typeof col === 'number') {
      if (col > width) problems.push(new UserError(`column ${col} does not exist: the table has ${width} columns.`, at(path)));
      return col <= width ? col - 1 : undefined;
    }
    if (!header) {
      problems.push(new UserError(`with header: false, columns are numbers from 1; found the name '${col}'.`, at(path)));
      return undefined;
    }
    const idx = header.indexOf(col);
    if (idx < 0) problems.push(new UserError(`the table has no column '${col}' (its columns: ${header.join(', ')}).`, at(path)));
    return idx >= 0 ? idx : undefined;
  };
  const colName = (idx: number): string => header?.[idx] ?? `column ${idx + 1}`;

  const reactantCols = m.columns.reactants.map((c, i) => resolveColumn(c, ['columns', 'reactants', i]));
  const productCols = m.columns.products.map((c, i) => resolveColumn(c, ['columns', 'products', i]));
  const lawCol = m.columns.law === undefined ? undefined : resolveColumn(m.columns.law, ['columns', 'law']);
  const tempCols = m.columns.temperature?.map((c, i) => resolveColumn(c, ['columns', 'temperature', i]));
  const originCol = m.columns.origin === undefined ? undefined : resolveColumn(m.columns.origin, ['columns', 'origin']);
  const factorCol = m.columns.uncertainty_factor === undefined ? undefined : resolveColumn(m.columns.uncertainty_factor, ['columns', 'uncertainty_factor']);
  const baseParams = resolveParams(m.columns.parameters ?? {}, ['columns', 'parameters'], resolveColumn);
  const lawParams = new Map<string, Map<string, number>>();
  for (const [law, params] of Object.entries(m.law_parameters ?? {})) lawParams.set(law, resolveParams(params, ['law_parameters', law], resolveColumn));
  const species = readSpecies(m, loaded, problems);
  if (problems.length > 0) {
    throw new UserErrors(`${problems.length} problem${problems.length > 1 ? 's' : ''} in the column mapping:`, problems, { file: mappingFile });
  }

  const notSpecies = new Set(m.not_species ?? []);
  const speciesName = (text: string): string => {
    const renamed = m.rename?.[text];
    if (renamed !== undefined) return renamed;
    if (m.ice_prefix && text.startsWith(m.ice_prefix) && text.length > m.ice_prefix.length) return iceName(text.slice(m.ice_prefix.length));
    return text;
  };
  const reactions: RawReaction[] = [];
  for (const { cells, line, row } of rows) {
    const locate = (field?: string): ErrorLocation => ({ file: tableFile, line, row, field });
    if (cells.length !== width) {
      problems.push(new UserError(`this row has ${cells.length} cell${cells.length === 1 ? '' : 's'}, expected ${width}${header ? ' as in the header' : ' as in the first row'}. Add the missing cells (empty ones are allowed) or remove the extra ones.`, locate()));
      continue;
    }
    const cell = (idx: number): string => cells[idx].trim();
    /** Column name of each field the assembler may point at (reactants[i] is the i-th non-empty cell). */
    const fieldColumns = new Map<string, string>();
    const names = (cols: (number | undefined)[], field: string): string[] => {
      const out: string[] = [];
      for (const c of cols) {
        if (c === undefined || cell(c) === '' || notSpecies.has(cell(c))) continue;
        fieldColumns.set(`${field}[${out.length}]`, colName(c));
        out.push(speciesName(cell(c)));
      }
      fieldColumns.set(field, colName(cols.find((c) => c !== undefined) ?? 0));
      return out;
    };
    const rowProblems = problems.length;
    let law: string;
    if (lawCol !== undefined) {
      const code = cell(lawCol);
      const mapped = m.law_codes ? m.law_codes[code] : code;
      if (mapped === undefined) {
        problems.push(new UserError(`the law code '${code}' is not in law_codes (known codes: ${Object.keys(m.law_codes ?? {}).join(', ')}). Add it to the mapping.`, locate(colName(lawCol))));
        continue;
      }
      law = mapped;
    } else law = m.law as string;
    const params: Record<string, number> = {};
    if (isRateLawName(law)) {
      const effective = new Map([...baseParams, ...(lawParams.get(law) ?? [])]);
      const lawTakes = new Set(RATE_LAWS[law].params.map((p) => p.name));
      const used = new Set<number>();
      for (const [param, idx] of effective) {
        if (!lawTakes.has(param)) continue;
        used.add(idx);
        fieldColumns.set(param, colName(idx));
        const text = cell(idx);
        if (text === '') continue;
        const value = parseNumber(text);
        if (value === undefined) problems.push(new UserError(`expected a number for ${param}; found '${text}'.`, locate(colName(idx))));
        else params[param] = value;
      }
      if (m.unused_cells !== 'ignore') {
        const paramCols = new Set([...baseParams.values(), ...[...lawParams.values()].flatMap((p) => [...p.values()])]);
        for (const idx of paramCols) {
          const text = cell(idx);
          if (used.has(idx) || text === '' || parseNumber(text) === 0) continue;
          problems.push(new UserError(`the law ${law} does not use this column, but the cell holds '${text}'. Clear it, map it under law_parameters.${law}, or set unused_cells: ignore in the mapping.`, locate(colName(idx))));
        }
      }
    }
    let temperature: [number, number] | undefined;
    if (tempCols && tempCols[0] !== undefined && tempCols[1] !== undefined) {
      const [lo, hi] = [cell(tempCols[0]), cell(tempCols[1])];
      if (lo !== '' || hi !== '') {
        const a = parseNumber(lo);
        const b = parseNumber(hi);
        if (a === undefined || b === undefined) {
          problems.push(new UserError(`expected two temperatures in K (both cells, or neither for the default range); found '${lo}' and '${hi}'.`, locate(colName(a === undefined ? tempCols[0] : tempCols[1]))));
        } else if (isRateLawName(law) && GAS_TEMPERATURE_LAWS.has(law)) temperature = [a, b];
      }
    }
    let uncertaintyFactor: number | undefined;
    if (factorCol !== undefined && cell(factorCol) !== '') {
      uncertaintyFactor = parseNumber(cell(factorCol));
      if (uncertaintyFactor === undefined) problems.push(new UserError(`expected a number for the uncertainty factor F (at least 1); found '${cell(factorCol)}'.`, locate(colName(factorCol))));
      else fieldColumns.set('uncertainty_factor', colName(factorCol));
    }
    if (problems.length > rowProblems) continue;
    if (lawCol !== undefined) fieldColumns.set('law', colName(lawCol));
    if (tempCols?.[0] !== undefined) fieldColumns.set('temperature', colName(tempCols[0]));
    const origin = originCol !== undefined ? cell(originCol) : '';
    reactions.push({
      reactants: names(reactantCols, 'reactants'),
      products: names(productCols, 'products'),
      law,
      params,
      temperature,
      origin: origin === '' ? undefined : origin,
      uncertaintyFactor,
      source: { file: tableFile, line, row },
      locate: (field?: string) => locate(field === undefined ? undefined : (fieldColumns.get(field) ?? field)),
    });
  }
  return assembleNetwork({
    name: m.name,
    file: tableFile,
    description: m.description,
    origin: m.origin,
    species,
    reactions,
    contentHash: sha256(mappingBytes, tableBytes),
    problems,
  });
}

function checkLawNames(m: Mapping, at: (p: PathKey[]) => ErrorLocation, problems: UserError[]): void {
  const check = (name: string, path: PathKey[]): void => {
    if (!isRateLawName(name)) problems.push(new UserError(`unknown rate law '${name}'; expected one of ${RATE_LAW_NAMES.join(', ')}.`, at(path)));
  };
  if (m.law !== undefined) check(m.law, ['law']);
  for (const [code, name] of Object.entries(m.law_codes ?? {})) check(name, ['law_codes', code]);
  for (const [law, params] of Object.entries(m.law_parameters ?? {})) {
    check(law, ['law_parameters', law]);
    if (!isRateLawName(law)) continue;
    const takes = RATE_LAWS[law as RateLawName].params.map((p) => p.name);
    for (const p of Object.keys(params)) {
      if (!takes.includes(p)) problems.push(new UserError(`the law ${law} has no parameter '${p}' (it takes ${takes.join(', ') || 'none'}).`, at(['law_parameters', law, p])));
    }
  }
  const allParams = new Set(Object.values(RATE_LAWS).flatMap((l) => l.params.map((p) => p.name)));
  for (const p of Object.keys(m.columns.parameters ?? {})) {
    if (!allParams.has(p)) problems.push(new UserError(`no rate law has a parameter '${p}' (known: ${[...allParams].join(', ')}).`, at(['columns', 'parameters', p])));
  }
}

function resolveParams(params: Record<string, Column>, path: PathKey[], resolveColumn: (c: Column, p: PathKey[]) => number | undefined): Map<string, number> {
  const out = new Map<string, number>();
  for (const [name, col] of Object.entries(params)) {
    const idx = resolveColumn(col, [...path, name]);
    if (idx !== undefined) out.set(name, idx);
  }
  return out;
}

function readSpecies(m: Mapping, loaded: LoadedYaml, problems: UserError[]): RawSpecies[] {
  const out: RawSpecies[] = [];
  (m.species ?? []).forEach((entry, i) => {
    const base: PathKey[] = ['species', i];
    const s = collect(problems, () => validate(speciesEntrySchema, loaded, base, entry));
    if (!s) return;
    out.push({
      name: s.name,
      bindingEnergy: s.binding_energy,
      mass: s.mass,
      noSurfaceSink: s.no_surface_sink,
      origin: s.origin,
      source: { file: loaded.file, line: loaded.lineOf(base) },
      locate: (field?: string) => ({ file: loaded.file, line: loaded.lineOf(field ? [...base, field] : base), field: `species[${i}]${field ? '.' + field : ''}` }),
    });
  });
  return out;
}

/** A cell as a number: plain decimal or exponent notation (Fortran `D` exponents too). */
function parseNumber(text: string): number | undefined {
  const t = text.trim().replace(/[dD]/, 'e');
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t)) return undefined;
  const v = Number(t);
  return Number.isFinite(v) ? v : undefined;
}
