/**
 * From a table of cells (CSV, TSV, VOTable, FITS binary table, a YAML list
 * flattened, or the pixels of a FITS map) and a column mapping to sightlines:
 * units converted, limits read, every value checked. All problems of a file
 * are collected and reported together; nothing is dropped without a word.
 */
import { erf } from 'simple-statistics';
import { throwProblems, UserError, type ErrorLocation } from '../config/errors.ts';
import type { ColumnMapping, ObservationFormat, SpeciesColumns } from '../config/sections/observations.ts';
import { speciesNameProblem } from './species-name.ts';
import { parseAngle, parseCell, parseFlag, describeCell, type Cell } from './cells.ts';
import { parseUnit, CANONICAL_UNIT, type Dimension } from './units.ts';
import type { BandTable } from './bands.ts';
import type { Measurement, Sightline, MapGeometry, ObservationSet } from './types.ts';

export interface RawColumn {
  name: string;
  /** Unit declared in the file (VOTable `unit`, FITS TUNIT/BUNIT). */
  unit?: string;
  values: ArrayLike<Cell>;
  /** Set for FITS vector columns, which cannot hold one value per sightline. */
  vectorForm?: string;
}

export interface RowPlace {
  /** `line 12`, `row 3` or `pixel (4, 7)`, for messages. */
  text: string;
  loc: ErrorLocation;
  source: Sightline['source'];
  pixel?: { x: number; y: number };
}

export interface RawTable {
  file: string;
  format: ObservationFormat;
  columns: RawColumn[];
  nrows: number;
  /** True when the file declares its units (VOTable, FITS); a mapping's `unit` then only fills gaps. */
  declaredUnits: boolean;
  place(row: number): RowPlace;
  /** Pixels of a map: rows with nothing observed are not sightlines. */
  map?: MapGeometry;
  /** Problems the reader found before the mapping (kept in order). */
  warnings?: string[];
}

export interface TableOptions {
  mapping?: ColumnMapping;
  /** Where the mapping was written, for messages. */
  mappingSource?: string;
  knownSpecies?: ReadonlySet<string>;
  bands: () => BandTable;
  akPerAv: number;
  maxErrorRatio: number;
}

/** Row warnings of one kind and column listed one by one before the rest are counted. */
const MAX_WARNINGS_EACH = 5;

const DEFAULT_NAMES = {
  id: ['id', 'name', 'sightline', 'source', 'star', 'object', 'target'],
  av: ['av', 'a_v', 'a(v)'],
  av_error: ['av_err', 'e_av', 'av_error', 'a_v_err', 'e_a_v', 'sigma_av', 'av_sigma'],
  ak: ['ak', 'a_k', 'a(k)'],
  ak_error: ['ak_err', 'e_ak', 'ak_error', 'a_k_err', 'e_a_k', 'sigma_ak'],
  ra: ['ra', 'raj2000', 'ra_deg', '_ra'],
  dec: ['dec', 'de', 'dej2000', 'dec_deg', '_de'],
} as const;

/** Naming convention for tables without a mapping: `N(H2O(s))` with `N(H2O(s))_err` (or `e_N(H2O(s))`), `_errlo`/`_errhi`, a flag `l_N(H2O(s))`; `tau(X)` for optical depths. */
const VALUE_COLUMN = /^N\((.+)\)$/i;
const TAU_COLUMN = /^tau\((.+)\)$/i;

function companions(base: string): { error: string[]; lo: string[]; hi: string[]; limit: string[]; conf: string[] } {
  return {
    error: [`${base}_err`, `e_${base}`, `${base}_error`, `${base}_sigma`],
    lo: [`${base}_errlo`, `${base}_err_lo`, `${base}_lo`],
    hi: [`${base}_errhi`, `${base}_err_hi`, `${base}_hi`],
    limit: [`l_${base}`, `${base}_flag`, `${base}_limit`],
    conf: [`${base}_conf`, `${base}_confidence`],
  };
}

interface SpeciesPlan {
  name: string;
  value?: number;
  error?: number;
  errorLo?: number;
  errorHi?: number;
  limit?: number;
  confidence?: number;
  limitConfidence?: number;
  tau?: number;
  tauError?: number;
  band?: { name: string; strength: number };
  /** Multipliers into cm^-2 (or cm^-1 for tau) of each column. */
  factors: Map<number, number>;
}

interface Plan {
  id?: number;
  av?: number;
  avError?: number;
  ak?: number;
  akError?: number;
  ra?: number;
  dec?: number;
  extinctionFactors: Map<number, number>;
  species: SpeciesPlan[];
  used: Set<number>;
}

function findColumn(table: RawTable, candidates: readonly string[], exact: boolean): number | undefined {
  for (const c of candidates) {
    const i = table.columns.findIndex((col) => col.name === c);
    if (i >= 0) return i;
  }
  if (exact) {
    for (const c of candidates) {
      const hits = table.columns.flatMap((col, i) => (col.name.toLowerCase() === c.toLowerCase() ? [i] : []));
      if (hits.length === 1) return hits[0];
    }
    return undefined;
  }
  const lower = candidates.map((c) => c.toLowerCase());
  const i = table.columns.findIndex((col) => lower.includes(col.name.toLowerCase()));
  return i >= 0 ? i : undefined;
}

function columnList(table: RawTable): string {
  const names = table.columns.map((c) => `'${c.name}'`);
  return names.length > 12 ? `${names.slice(0, 12).join(', ')} and ${names.length - 12} more` : names.join(', ');
}

/**
 * The species a conventional column name means. FITS writers often upper-case
 * EXTNAME (astropy does by default), so `(S)` is read as the ice suffix `(s)`,
 * and with a network at hand an upper-cased name is matched to the one
 * network species it can be.
 */
function conventionSpecies(written: string, known: ReadonlySet<string> | undefined): string {
  const name = written.replace(/\(S\)$/, '(s)');
  if (!known || known.has(name)) return name;
  const hits = [...known].filter((k) => k.toUpperCase() === name.toUpperCase());
  return hits.length === 1 ? hits[0] : name;
}

function buildPlan(table: RawTable, opts: TableOptions, problems: UserError[], warnings: string[]): Plan {
  const m = opts.mapping ?? {};
  const mapSrc = opts.mappingSource ?? 'the column mapping';
  const what = table.map ? 'image' : 'column';
  const plan: Plan = { extinctionFactors: new Map(), species: [], used: new Set() };
  const file = table.file;

  const explicit = (key: string, name: string | undefined): number | undefined => {
    if (name === undefined) return undefined;
    const i = findColumn(table, [name], true);
    if (i === undefined) problems.push(new UserError(`${mapSrc} names ${what} '${name}' for '${key}', but the file has no such ${what}. The file has: ${columnList(table)}.`, { file, field: key }));
    else plan.used.add(i);
    return i;
  };
  const pick = (key: keyof typeof DEFAULT_NAMES): number | undefined => {
    const name = (m as Record<string, string | undefined>)[key];
    if (name !== undefined) return explicit(key, name);
    const i = findColumn(table, DEFAULT_NAMES[key], false);
    if (i !== undefined) plan.used.add(i);
    return i;
  };
  plan.id = pick('id');
  plan.av = pick('av');
  plan.avError = pick('av_error');
  plan.ak = pick('ak');
  plan.akError = pick('ak_error');
  plan.ra = pick('ra');
  plan.dec = pick('dec');

  const unitFactor = (col: number, fallback: string | undefined, dim: Dimension, field: string): number => {
    const c = table.columns[col];
    let unit = table.declaredUnits ? c.unit : undefined;
    if (unit === undefined) unit = fallback;
    if (unit === undefined) {
      if (table.declaredUnits && dim !== 'none') warnings.push(`${file}: ${what} '${c.name}' declares no unit; read as ${CANONICAL_UNIT[dim]}.`);
      return 1;
    }
    const u = parseUnit(unit);
    if (!u || u.dim !== dim) {
      problems.push(new UserError(`${what} '${c.name}' has unit '${unit}', but ${field} needs ${CANONICAL_UNIT[dim]}${dim === 'column' ? " (or m-2, or a scaled unit such as '1e17 cm-2')" : dim === 'tau' ? ' (integrated optical depth over wavenumber)' : ''}. Correct the unit${table.declaredUnits ? ' in the file' : " ('unit' in the mapping)"} or map another ${what}.`, { file, field: c.name }));
      return NaN;
    }
    return u.factor;
  };
  for (const col of [plan.av, plan.avError, plan.ak, plan.akError]) {
    if (col !== undefined) plan.extinctionFactors.set(col, unitFactor(col, m.extinction_unit, 'extinction', 'an extinction'));
  }

  // Species: the mapping's, or every column following the naming convention.
  const entries: [string, SpeciesColumns, boolean][] = [];
  if (m.species) {
    for (const [name, cols] of Object.entries(m.species)) entries.push([name, cols, true]);
  } else {
    for (const col of table.columns) {
      const v = VALUE_COLUMN.exec(col.name);
      const t = TAU_COLUMN.exec(col.name);
      const written = v?.[1] ?? t?.[1];
      if (!written) continue;
      const sp = conventionSpecies(written, opts.knownSpecies);
      const base = col.name;
      const find = (names: string[]) => {
        const i = findColumn(table, names, false);
        return i === undefined ? undefined : table.columns[i].name;
      };
      const c = companions(base);
      const prev = entries.find((e) => e[0] === sp);
      const cols: SpeciesColumns = prev ? prev[1] : {};
      if (v) Object.assign(cols, { value: base, error: find(c.error), error_lo: find(c.lo), error_hi: find(c.hi), limit: find(c.limit), confidence: find(c.conf) });
      else Object.assign(cols, { tau_int: base, tau_int_error: find(c.error) });
      if (!prev) entries.push([sp, cols, false]);
    }
  }

  for (const [name, cols, fromMapping] of entries) {
    const field = fromMapping ? `species.${name}` : `N(${name})`;
    const bad = speciesNameProblem(name);
    if (bad) {
      problems.push(new UserError(`'${name}' is not a species name: ${bad}. Write a formula such as H2O, HCO+ or CO(s) (ices end in '(s)').`, { file, field }));
      continue;
    }
    if (opts.knownSpecies && !opts.knownSpecies.has(name)) {
      // Observers list every column they measured; one no model gives is still shown. Fitting it is refused (deriveQuantities).
      warnings.push(`${file}: species '${name}' (${what} '${cols.value ?? cols.tau_int}') is not in the network: its column is read and kept, but it cannot be fitted. If it should be, check the spelling (ices end in '(s)', e.g. CO(s)) or add the species to the network.`);
    }
    if (cols.value !== undefined && cols.tau_int !== undefined) {
      problems.push(new UserError(`species '${name}' has both a column density ('${cols.value}') and an optical depth ('${cols.tau_int}'); map one of them.`, { file, field }));
      continue;
    }
    if (cols.value === undefined && cols.tau_int === undefined) {
      problems.push(new UserError(`species '${name}' has neither 'value' nor 'tau_int'; name the ${what} holding its column density.`, { file, field }));
      continue;
    }
    if (cols.error !== undefined && (cols.error_lo !== undefined || cols.error_hi !== undefined)) {
      problems.push(new UserError(`species '${name}' has both a symmetric error and error_lo/error_hi; give one kind.`, { file, field }));
      continue;
    }
    if ((cols.error_lo === undefined) !== (cols.error_hi === undefined)) {
      problems.push(new UserError(`species '${name}' has only one of error_lo and error_hi; give both, or a symmetric 'error'.`, { file, field }));
      continue;
    }
    const get = (key: string, col: string | undefined) => (fromMapping ? explicit(`${field}.${key}`, col) : col === undefined ? undefined : explicit(key, col));
    const sp: SpeciesPlan = {
      name,
      value: get('value', cols.value),
      error: get('error', cols.error),
      errorLo: get('error_lo', cols.error_lo),
      errorHi: get('error_hi', cols.error_hi),
      limit: get('limit', cols.limit),
      confidence: get('confidence', cols.confidence),
      limitConfidence: cols.limit_confidence,
      tau: get('tau_int', cols.tau_int),
      tauError: get('tau_int_error', cols.tau_int_error),
      factors: new Map(),
    };
    if (sp.tau !== undefined) {
      let band;
      try {
        band = opts.bands().find(name, cols.band);
      } catch (e) {
        problems.push(e as UserError);
        continue;
      }
      if (!band) {
        problems.push(new UserError(`no band strength for '${name}'${cols.band ? ` in band '${cols.band}'` : ''} in ${opts.bands().file}; add one there (or point 'band_strengths' at your own table), or give the column density instead.`, { file, field }));
        continue;
      }
      sp.band = { name: band.name, strength: band.strengthCm };
      for (const c of [sp.tau, sp.tauError]) if (c !== undefined) sp.factors.set(c, unitFactor(c, cols.unit, 'tau', 'an integrated optical depth'));
    }
    for (const c of [sp.value, sp.error, sp.errorLo, sp.errorHi]) if (c !== undefined) sp.factors.set(c, unitFactor(c, cols.unit, 'column', 'a column density'));
    for (const c of [sp.value, sp.tau, sp.error, sp.errorLo, sp.errorHi, sp.tauError, sp.limit, sp.confidence]) {
      if (c !== undefined && table.columns[c].vectorForm) problems.push(new UserError(`${what} '${table.columns[c].name}' holds a vector per row (TFORM ${table.columns[c].vectorForm}); a sightline needs one value.`, { file, field: table.columns[c].name }));
    }
    plan.species.push(sp);
  }

  if (m.species) {
    const ignored = table.columns.filter((c, i) => !plan.used.has(i) && (VALUE_COLUMN.test(c.name) || TAU_COLUMN.test(c.name))).map((c) => `'${c.name}'`);
    if (ignored.length > 0) warnings.push(`${file}: ${what}${ignored.length > 1 ? 's' : ''} ${ignored.join(', ')} look${ignored.length > 1 ? '' : 's'} like column densities but ${ignored.length > 1 ? 'are' : 'is'} not in ${mapSrc}; not read.`);
  } else if (plan.species.length === 0 && problems.length === 0) {
    problems.push(new UserError(`no species ${what}s found. Name them N(species) (for example 'N(H2O(s))', with errors in 'N(H2O(s))_err'), or give a column mapping ('columns:' in the pipeline or a .columns.yaml file beside the data). The file has: ${columnList(table)}.`, { file }));
  }
  return plan;
}

/** Confidence from a cell: a fraction in (0, 1), or a number of sigma (>= 1), two-sided Gaussian (erf(n / sqrt 2)). */
function confidenceOf(v: number): number | undefined {
  if (v > 0 && v < 1) return v;
  if (v >= 1) return erf(v / Math.SQRT2);
  return undefined;
}

/**
 * The reading of one table, row by row: where the row being read is, and the
 * problems and warnings found at it. Made once per table and moved from row
 * to row (nothing is allocated per cell for the bookkeeping).
 */
class RowReader {
  readonly problems: UserError[] = [];
  /** Row warnings grouped by column and kind, so a map with many such pixels gives a few lines and a count. */
  private readonly rowWarnings = new Map<string, { col: number; lines: string[] }>();
  /** The row being read, and where it is for messages (set once the row is known not to be blank). */
  r = 0;
  place: RowPlace;

  constructor(
    readonly table: RawTable,
    readonly plan: Plan,
  ) {
    this.place = { text: '', loc: {}, source: { file: table.file } };
  }

  cell(col: number | undefined): Cell {
    return col === undefined ? undefined : this.table.columns[col].values[this.r];
  }

  colName(col: number): string {
    return this.table.columns[col].name;
  }

  isBlank(c: Cell): boolean {
    return c === null || c === undefined || (typeof c === 'number' ? Number.isNaN(c) : parseCell(c).kind === 'blank');
  }

  fail(col: number | undefined, msg: string): void {
    this.problems.push(new UserError(this.table.map ? `${this.place.text}: ${msg}` : msg, { ...this.place.loc, field: col === undefined ? undefined : this.colName(col) }));
  }

  warn(col: number, kind: string, msg: string): void {
    const key = `${col}\u0000${kind}`;
    const g = this.rowWarnings.get(key) ?? { col, lines: [] };
    this.rowWarnings.set(key, g);
    g.lines.push(`${this.table.file}, ${this.place.text}, ${this.table.map ? 'image' : 'column'} '${this.colName(col)}': ${msg}`);
  }

  /** A plain number or blank; anything else is a problem at (row, column). */
  plainNumber(col: number | undefined, what: string): number | undefined {
    if (col === undefined) return undefined;
    const raw = this.cell(col);
    const p = parseCell(raw);
    if (p.kind === 'blank') return undefined;
    if (p.kind === 'bad') return this.fail(col, `cannot read ${describeCell(raw)} as ${what}; expected a number such as 1.2e17, or a blank cell.`), undefined;
    if (p.kind !== 'detection') return this.fail(col, `${what} cannot be a limit (found ${describeCell(raw)}).`), undefined;
    return p.value;
  }

  /** An extinction in magnitudes (the column's unit factor applied). */
  extinction(col: number | undefined, what: string): number | undefined {
    const v = this.plainNumber(col, what);
    return v === undefined || col === undefined ? v : v * (this.plan.extinctionFactors.get(col) ?? 1);
  }

  /** The warnings, at most MAX_WARNINGS_EACH of each kind and column, the rest counted. */
  warnings(): string[] {
    const out: string[] = [];
    for (const g of this.rowWarnings.values()) {
      out.push(...g.lines.slice(0, MAX_WARNINGS_EACH));
      const more = g.lines.length - MAX_WARNINGS_EACH;
      if (more > 0) out.push(`${this.table.file}: ... and ${more} more ${this.table.map ? 'pixels' : 'rows'} with the same warning for ${this.table.map ? 'image' : 'column'} '${this.colName(g.col)}'.`);
    }
    return out;
  }
}

/** The sightline's name: the pixel of a map, the id cell, or (with a warning) the row's place; a name used twice is a problem. */
function readId(rd: RowReader, seen: Map<string, string>): string {
  const { place, plan } = rd;
  let id: string;
  const idCell = rd.cell(plan.id);
  if (place.pixel) id = `${place.pixel.x},${place.pixel.y}`;
  else if (idCell === undefined || idCell === null || String(idCell).trim() === '') {
    id = place.text.replace(/\s+/g, '-');
    if (plan.id !== undefined) rd.warn(plan.id, 'unnamed', `the sightline has no name; it is called '${id}' in the results. Give it a name in this column.`);
  } else id = String(idCell).trim();
  const prev = seen.get(id);
  if (prev !== undefined) rd.fail(plan.id, `sightline '${id}' appears twice (also at ${prev}); give every sightline its own name.`);
  seen.set(id, place.text);
  return id;
}

/** An extinction and its error (either may be absent), checked: the value positive, the error not negative. */
function checkExtinction(rd: RowReader, name: string, value: number | undefined, error: number | undefined, col: number | undefined, errorCol: number | undefined): void {
  if (value === undefined) return;
  if (value <= 0) rd.fail(col, `${name} must be positive, found ${value} mag.`);
  if (error !== undefined && error < 0) rd.fail(errorCol, `the ${name} error must not be negative, found ${error}.`);
}

/** A_V and A_K with their errors, checked; A_V from A_K when only A_K is given. */
function readExtinction(rd: RowReader, s: Sightline, akPerAv: number): void {
  const { plan } = rd;
  const av = rd.extinction(plan.av, 'A_V');
  const avErr = rd.extinction(plan.avError, 'the A_V error');
  const ak = rd.extinction(plan.ak, 'A_K');
  const akErr = rd.extinction(plan.akError, 'the A_K error');
  checkExtinction(rd, 'A_V', av, avErr, plan.av, plan.avError);
  if (av !== undefined) {
    s.av = av;
    if (avErr !== undefined) s.avErr = avErr;
  }
  checkExtinction(rd, 'A_K', ak, akErr, plan.ak, plan.akError);
  if (ak !== undefined) {
    s.ak = ak;
    if (akErr !== undefined) s.akErr = akErr;
    if (av !== undefined) rd.warn(plan.ak!, 'both', `both A_V (${av}) and A_K (${ak}) are given; A_V is used.`);
    else {
      // A_V = A_K / (A_K/A_V), A_K/A_V = 0.112 by default (Rieke & Lebofsky 1985).
      s.av = ak / akPerAv;
      if (akErr !== undefined) s.avErr = akErr / akPerAv;
    }
  }
}

/** Right ascension and declination in degrees, from degrees or sexagesimal text. */
function readPosition(rd: RowReader, s: Sightline): void {
  for (const [col, axis] of [[rd.plan.ra, 'ra'], [rd.plan.dec, 'dec']] as const) {
    const raw = rd.cell(col);
    if (col === undefined || rd.isBlank(raw)) continue;
    const deg = parseAngle(raw, axis);
    if (deg === undefined) rd.fail(col, `cannot read ${describeCell(raw)} as ${axis === 'ra' ? 'a right ascension' : 'a declination'}; expected degrees (70.1021) or sexagesimal text (${axis === 'ra' ? '04:40:24.5, in hours' : '+25:48:51, in degrees'}).`);
    else s[axis] = deg;
  }
}

/** The kind of the value once its limit flag column is read: undefined (a problem was reported) when the flag is unreadable or disagrees with the value. */
function limitKind(rd: RowReader, sp: SpeciesPlan, valueCol: number, kind: Measurement['kind']): Measurement['kind'] | undefined {
  if (sp.limit === undefined) return kind;
  const flagCell = rd.cell(sp.limit);
  const f = parseFlag(flagCell);
  if (f === 'bad') {
    rd.fail(sp.limit, `cannot read the limit flag ${describeCell(flagCell)}; expected '<' (upper limit), '>' (lower limit) or blank (detection).`);
    return undefined;
  }
  if (f === 'detection') return kind;
  if (kind !== 'detection' && kind !== f) {
    rd.fail(valueCol, `the value ${describeCell(rd.cell(valueCol))} and the limit flag ${describeCell(flagCell)} ('${rd.colName(sp.limit)}') disagree.`);
    return undefined;
  }
  return f;
}

/** The confidence of a limit: its confidence cell, else the mapping's limit_confidence. */
function limitConfidence(rd: RowReader, sp: SpeciesPlan): number | undefined {
  let conf = sp.limitConfidence;
  if (sp.confidence !== undefined) {
    const c = rd.plainNumber(sp.confidence, 'a confidence level');
    if (c !== undefined) {
      conf = confidenceOf(c);
      if (conf === undefined) rd.fail(sp.confidence, `a confidence level must be a fraction in (0, 1) or a number of sigma (>= 1), found ${c}.`);
    }
  }
  return conf;
}

/**
 * One species' cells of the row as a measurement: value, limit flag, errors
 * and confidence, each checked. Undefined when the value is blank (not
 * observed) or a problem was reported.
 */
function readMeasurement(rd: RowReader, sp: SpeciesPlan, maxErrorRatio: number): Measurement | undefined {
  const valueCol = (sp.value ?? sp.tau)!;
  const raw = rd.cell(valueCol);
  const p = parseCell(raw);
  if (p.kind === 'blank') {
    for (const c of [sp.error, sp.errorLo, sp.errorHi, sp.tauError]) {
      if (c !== undefined && parseCell(rd.cell(c)).kind !== 'blank') rd.warn(c, 'orphan-error', `an error is given but the value ('${rd.colName(valueCol)}') is blank; read as not observed.`);
    }
    return undefined;
  }
  if (p.kind === 'bad') {
    rd.fail(valueCol, `cannot read ${describeCell(raw)} as a ${sp.tau !== undefined ? 'optical depth' : 'column density'}; expected a number (1.2e17), an upper limit (<1.2e17), a lower limit (>1.2e17), or a blank cell for not observed.`);
    return undefined;
  }
  const kind = limitKind(rd, sp, valueCol, p.kind);
  if (kind === undefined) return undefined;
  const factor = sp.factors.get(valueCol) ?? 1;
  // N = tau_int / A for optical depths (docs/physics.md section 5).
  const toColumn = (x: number) => (sp.band ? x / sp.band.strength : x);
  const value = toColumn(p.value * factor);
  if (!(p.value > 0)) {
    rd.fail(valueCol, `a ${sp.tau !== undefined ? 'optical depth' : 'column density'} must be positive, found ${describeCell(raw)}. Leave the cell blank if '${sp.name}' was not observed, or give an upper limit (<value).`);
    return undefined;
  }
  const errCols = sp.tau !== undefined ? [sp.tauError] : [sp.error, sp.errorLo, sp.errorHi];
  const rawErrs = errCols.map((c) => {
    const v = rd.plainNumber(c, 'an error');
    return v === undefined || c === undefined ? undefined : v * (sp.factors.get(c) ?? 1);
  });
  const errs = rawErrs.map((e) => (e === undefined ? undefined : toColumn(e)));
  const given = errCols.filter((c, i) => c !== undefined && errs[i] !== undefined) as number[];
  const meas: Measurement = { kind, value };
  if (kind !== 'detection') {
    if (given.length > 0) {
      rd.fail(given[0], `'${sp.name}' is ${kind === 'upper' ? 'an upper' : 'a lower'} limit (${describeCell(raw)}) but has an error (${describeCell(rd.cell(given[0]))}). A limit carries no error: blank the error cell, or give the value as a detection.`);
      return undefined;
    }
    const conf = limitConfidence(rd, sp);
    if (conf !== undefined) meas.confidence = conf;
  } else {
    const [lo, hi] = sp.tau !== undefined || sp.error !== undefined ? [errs[0], errs[0]] : [errs[1], errs[2]];
    if (lo === undefined || hi === undefined) {
      const col = errCols.find((c) => c !== undefined);
      rd.fail(col ?? valueCol, `the detection ${describeCell(raw)} of '${sp.name}' has no error. Give its 1-sigma error${col === undefined ? ` (map an error ${rd.table.map ? 'image' : 'column'} for '${sp.name}')` : ''}, or mark the value as a limit (<value).`);
      return undefined;
    }
    if (!(lo > 0) || !(hi > 0)) {
      rd.fail(errCols.find((c, i) => c !== undefined && !((errs[i] ?? 0) > 0)) ?? valueCol, `errors must be positive, found ${lo === hi ? lo : `${lo} below and ${hi} above`}.`);
      return undefined;
    }
    const biggest = Math.max(lo, hi);
    if (biggest > maxErrorRatio * value) rd.warn(given[given.length - 1], 'error-ratio', `the error (${biggest.toPrecision(3)}) is more than ${maxErrorRatio} times the value (${value.toPrecision(3)}) of '${sp.name}'; check the units or the exponent.`);
    meas.errLo = lo;
    meas.errHi = hi;
  }
  if (sp.band) {
    meas.fromTau = { tauInt: p.value * factor, band: sp.band.name, bandStrength: sp.band.strength };
    if (rawErrs[0] !== undefined) meas.fromTau.tauIntErr = rawErrs[0];
  }
  return meas;
}

export function tableToObservations(table: RawTable, opts: TableOptions): ObservationSet {
  const planProblems: UserError[] = [];
  const warnings: string[] = [...(table.warnings ?? [])];
  const plan = buildPlan(table, opts, planProblems, warnings);
  throwProblems(planProblems, `${planProblems.length} problems:`, { file: table.file });
  const rd = new RowReader(table, plan);
  const sightlines: Sightline[] = [];
  const seen = new Map<string, string>();
  let extinctionOnly = 0;
  const usedCols = [...plan.used];
  const rowBlank = (c: number) => rd.isBlank(rd.cell(c));
  const speciesBlank = (sp: SpeciesPlan) => rd.isBlank(rd.cell(sp.value ?? sp.tau));

  for (let r = 0; r < table.nrows; r++) {
    rd.r = r;
    if (usedCols.every(rowBlank)) continue;
    if (table.map && plan.species.every(speciesBlank)) {
      extinctionOnly++;
      continue;
    }
    rd.place = table.place(r);
    const s: Sightline = { id: readId(rd, seen), columns: {}, source: rd.place.source };
    if (rd.place.pixel) s.pixel = rd.place.pixel;
    readExtinction(rd, s, opts.akPerAv);
    readPosition(rd, s);
    for (const sp of plan.species) {
      const meas = readMeasurement(rd, sp, opts.maxErrorRatio);
      if (meas) s.columns[sp.name] = meas;
    }
    sightlines.push(s);
  }
  throwProblems(rd.problems, `${rd.problems.length} problems:`, { file: table.file });
  warnings.push(...rd.warnings());
  if (!sightlines.some((s) => Object.keys(s.columns).length > 0)) {
    const what = table.map ? 'pixel' : 'row';
    throw new UserError(table.nrows === 0 ? `the table has no rows.` : `none of its ${table.nrows} ${what}${table.nrows > 1 ? 's' : ''} holds a column density; every species value is blank or not observed.`, { file: table.file });
  }
  if (extinctionOnly > 0) warnings.push(`${table.file}: ${extinctionOnly} pixel${extinctionOnly > 1 ? 's have' : ' has'} an extinction but no column density of any species; not read as sightlines.`);
  const set: ObservationSet = {
    file: table.file,
    kind: table.map ? 'map' : 'table',
    sightlines,
    warnings,
    format: table.format,
    species: plan.species.map((s) => s.name),
  };
  const outside = opts.knownSpecies ? set.species!.filter((n) => !opts.knownSpecies!.has(n)) : [];
  if (outside.length > 0) set.outsideNetwork = outside;
  if (table.map) set.map = table.map;
  return set;
}
