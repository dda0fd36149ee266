/**
 * A YAML list of sightlines, for a handful of sightlines typed by hand:
 *
 *   sightlines:
 *     - id: star-1
 *       av: 12.1
 *       av_error: 0.6
 *       columns:
 *         H2O(s): { value: 2.1e18, error: 2.0e17 }
 *         CO(s): { value: 8.0e17, error_lo: 1.0e17, error_hi: 2.0e17 }
 *         CH3OH(s): '<1.2e17'
 *         NH3(s): { upper: 1.0e17, confidence: 0.997 }
 *         CO2(s): { tau_int: 1.2, tau_int_error: 0.1 }
 *
 * The list is flattened into a table following the naming convention of
 * table.ts and read with the same checks as every other table.
 */
import { UserError } from '../config/errors.ts';
import { parseYamlText, type LoadedYaml, type PathKey } from '../config/yaml.ts';
import type { ColumnMapping, SpeciesColumns } from '../config/sections/observations.ts';
import type { RawTable } from './table.ts';
import type { Cell } from './cells.ts';

const SIGHTLINE_KEYS = ['id', 'av', 'av_error', 'ak', 'ak_error', 'ra', 'dec', 'columns'] as const;
const ENTRY_KEYS: Record<string, string> = {
  value: '', error: '_err', error_lo: '_errlo', error_hi: '_errhi', upper: '', lower: '', confidence: '_conf', tau_int: '', tau_int_error: '_err', band: '',
};

export function readYamlList(file: string, text: string): { table: RawTable; mapping: ColumnMapping } {
  const y: LoadedYaml = parseYamlText(text, file);
  const at = (path: PathKey[], msg: string, field?: string) => new UserError(msg, { file, line: y.lineOf(path), field });
  const root = y.data as unknown;
  const list = Array.isArray(root) ? root : root && typeof root === 'object' ? (root as Record<string, unknown>).sightlines : undefined;
  const base: PathKey[] = Array.isArray(root) ? [] : ['sightlines'];
  if (!Array.isArray(list)) throw at([], "expected a list of sightlines, or a mapping with the key 'sightlines' holding one.", 'sightlines');
  const cols = new Map<string, Cell[]>();
  const lines: number[] = [];
  const species = new Map<string, SpeciesColumns>();
  const put = (name: string, row: number, v: Cell) => {
    if (!cols.has(name)) cols.set(name, []);
    cols.get(name)![row] = v;
  };
  // YAML reads .inf and 1e400 as infinity; the text readers refuse them as numbers, so this reader does too.
  const finite = (path: PathKey[], field: string, v: unknown): void => {
    if (typeof v === 'number' && (v === Infinity || v === -Infinity)) {
      throw at(path, `expected a finite number, found ${v > 0 ? '' : '-'}infinity (.inf, or a number beyond 1.8e308, the largest double). Give the measured value.`, field);
    }
  };
  list.forEach((entry, r) => {
    const p = [...base, r];
    lines.push(y.lineOf(p) ?? 0);
    if (!entry || typeof entry !== 'object' || Array.isArray(entry)) throw at(p, 'each sightline is a mapping with id, av, columns, ...');
    const e = entry as Record<string, unknown>;
    for (const k of Object.keys(e)) {
      if (!(SIGHTLINE_KEYS as readonly string[]).includes(k)) throw at([...p, k], `unknown key '${k}'; a sightline has ${SIGHTLINE_KEYS.join(', ')}.`, k);
    }
    const scalar = (k: string, v: unknown): Cell => {
      finite([...p, k], k, v);
      if (v === undefined || v === null || typeof v === 'number' || typeof v === 'string') return v as Cell;
      throw at([...p, k], `expected a number or text, found ${Array.isArray(v) ? 'a list' : typeof v}.`, k);
    };
    put('id', r, e.id === undefined ? undefined : String(scalar('id', e.id)));
    put('av', r, scalar('av', e.av));
    put('av_err', r, scalar('av_error', e.av_error));
    put('ak', r, scalar('ak', e.ak));
    put('ak_err', r, scalar('ak_error', e.ak_error));
    put('ra', r, scalar('ra', e.ra));
    put('dec', r, scalar('dec', e.dec));
    const columns = e.columns ?? {};
    if (typeof columns !== 'object' || Array.isArray(columns)) throw at([...p, 'columns'], 'columns is a mapping from species name to its column density.', 'columns');
    for (const [sp, v] of Object.entries(columns as Record<string, unknown>)) {
      const sp0 = species.get(sp) ?? {};
      species.set(sp, sp0);
      const cp = [...p, 'columns', sp];
      const n = `N(${sp})`;
      if (typeof v === 'number' || typeof v === 'string' || v === null) {
        finite(cp, sp, v);
        put(n, r, v);
        sp0.value = n;
        continue;
      }
      if (typeof v !== 'object' || Array.isArray(v)) throw at(cp, `expected a number, a limit such as '<1.2e17', or a mapping with value and error.`, sp);
      const o = v as Record<string, unknown>;
      for (const k of Object.keys(o)) if (!(k in ENTRY_KEYS)) throw at([...cp, k], `unknown key '${k}'; use ${Object.keys(ENTRY_KEYS).join(', ')}.`, `${sp}.${k}`);
      const kinds = ['value', 'upper', 'lower', 'tau_int'].filter((k) => o[k] !== undefined);
      if (kinds.length !== 1) throw at(cp, `give exactly one of value, upper, lower or tau_int for '${sp}'.`, sp);
      const num = (k: string): Cell => {
        const x = o[k];
        finite([...cp, k], `${sp}.${k}`, x);
        if (x === undefined || x === null || typeof x === 'number' || typeof x === 'string') return x as Cell;
        throw at([...cp, k], `expected a number.`, `${sp}.${k}`);
      };
      if (o.tau_int !== undefined) {
        const t = `tau(${sp})`;
        put(t, r, num('tau_int'));
        sp0.tau_int = t;
        if (o.tau_int_error !== undefined) {
          put(`${t}_err`, r, num('tau_int_error'));
          sp0.tau_int_error = `${t}_err`;
        }
        if (o.band !== undefined) {
          if (sp0.band !== undefined && sp0.band !== o.band) throw at([...cp, 'band'], `'${sp}' uses band '${sp0.band}' elsewhere; one band per species.`, `${sp}.band`);
          sp0.band = String(o.band);
        }
      } else {
        const kind = kinds[0];
        put(n, r, num(kind));
        sp0.value = n;
        if (kind !== 'value') {
          put(`l_${n}`, r, kind === 'upper' ? '<' : '>');
          sp0.limit = `l_${n}`;
        }
      }
      for (const k of ['error', 'error_lo', 'error_hi', 'confidence'] as const) {
        if (o[k] === undefined) continue;
        put(`${n}${ENTRY_KEYS[k]}`, r, num(k));
        sp0[k] = `${n}${ENTRY_KEYS[k]}`;
      }
    }
  });
  // A species written with a symmetric error in one sightline and asymmetric errors in another:
  // the symmetric ones become equal lower and upper errors.
  for (const [sp, m] of species) {
    if (m.error === undefined || (m.error_lo === undefined && m.error_hi === undefined)) continue;
    const n = `N(${sp})`;
    for (const side of ['_errlo', '_errhi'] as const) {
      const col = `${n}${side}`;
      list.forEach((_, r) => {
        const sym = cols.get(`${n}_err`)?.[r];
        if (sym !== undefined && sym !== null) put(col, r, sym);
      });
    }
    m.error_lo = `${n}_errlo`;
    m.error_hi = `${n}_errhi`;
    delete m.error;
  }
  const names = [...cols.keys()];
  const mapping: ColumnMapping = { id: 'id', av: 'av', av_error: 'av_err', ak: 'ak', ak_error: 'ak_err', ra: 'ra', dec: 'dec', species: Object.fromEntries(species) };
  return {
    mapping,
    table: {
      file,
      format: 'yaml',
      columns: names.map((name) => ({ name, values: Array.from({ length: list.length }, (_, i) => cols.get(name)![i]) })),
      nrows: list.length,
      declaredUnits: false,
      place: (i) => ({ text: `line ${lines[i]}`, loc: { file, line: lines[i] }, source: { file, line: lines[i] } }),
    },
  };
}
