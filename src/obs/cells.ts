/**
 * One cell of an observers' table: a number, an upper limit `<1.2e17`, a
 * lower limit `>3e16`, or nothing (blank, `nan`, `--`, `...`: not observed).
 */
export type Cell = string | number | boolean | null | undefined;

export type ParsedCell =
  | { kind: 'blank' }
  | { kind: 'detection' | 'upper' | 'lower'; value: number }
  | { kind: 'bad'; text: string };

/** Markers observers use for "not observed" (common practice in published tables). */
const BLANK_MARKERS = new Set(['', 'nan', '-nan', '+nan', 'na', 'n/a', '--', '-', '...', '\u2026', 'null', 'none']);
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][+-]?\d+)?$/;

export function parseNumberText(text: string): number | undefined {
  const t = text.trim();
  if (!NUMBER.test(t)) return undefined;
  return Number(t.replace(/[dD]/, 'E'));
}

export function parseCell(cell: Cell): ParsedCell {
  if (cell === null || cell === undefined) return { kind: 'blank' };
  // NaN is a blank cell in binary formats; an infinite number is no measurement, as '1e400' is not in text.
  if (typeof cell === 'number') return Number.isNaN(cell) ? { kind: 'blank' } : Number.isFinite(cell) ? { kind: 'detection', value: cell } : { kind: 'bad', text: String(cell) };
  if (typeof cell === 'boolean') return { kind: 'bad', text: String(cell) };
  const t = cell.trim();
  if (BLANK_MARKERS.has(t.toLowerCase())) return { kind: 'blank' };
  let kind: 'detection' | 'upper' | 'lower' = 'detection';
  let rest = t;
  const lim = /^(<=?|\u2264|>=?|\u2265)\s*/.exec(t);
  if (lim) {
    kind = lim[1].startsWith('<') || lim[1] === '\u2264' ? 'upper' : 'lower';
    rest = t.slice(lim[0].length);
  }
  const v = parseNumberText(rest);
  if (v === undefined || !Number.isFinite(v)) return { kind: 'bad', text: t };
  return { kind, value: v };
}

/** A limit-flag cell: `<`/`upper`/`U`/1 for upper limits, `>`/`lower`/`L`/2 for lower, blank/`=`/0 for detections. */
export function parseFlag(cell: Cell): 'detection' | 'upper' | 'lower' | 'bad' {
  if (cell === null || cell === undefined) return 'detection';
  if (typeof cell === 'number') return Number.isNaN(cell) || cell === 0 ? 'detection' : cell === 1 ? 'upper' : cell === 2 ? 'lower' : 'bad';
  if (typeof cell === 'boolean') return cell ? 'upper' : 'detection';
  const t = cell.trim().toLowerCase();
  if (t === '' || t === '=' || t === 'd' || t === 'det' || t === 'detection' || t === '0') return 'detection';
  if (['<', '<=', 'u', 'ul', 'upper', '1'].includes(t)) return 'upper';
  if (['>', '>=', 'l', 'll', 'lower', '2'].includes(t)) return 'lower';
  return 'bad';
}

export function describeCell(cell: Cell): string {
  return typeof cell === 'string' ? `'${cell}'` : String(cell);
}

/**
 * An angle in degrees from a cell: a number of degrees, or sexagesimal text
 * (`04:40:24.5`, `04 40 24.5`, `04h40m24.5s`; right ascension in hours,
 * declination in degrees `+25:49:01`). Undefined when the text is neither.
 */
export function parseAngle(cell: Cell, axis: 'ra' | 'dec'): number | undefined {
  if (typeof cell === 'number') return cell;
  if (typeof cell !== 'string') return undefined;
  const t = cell.trim();
  const plain = parseNumberText(t);
  if (plain !== undefined) return plain;
  const m = /^([+-]?)(\d{1,3})[\s:hHdD\u00b0]+(\d{1,2})[\s:mM']+(\d{1,2}(?:\.\d*)?)\s*[sS"]?$/.exec(t);
  if (!m) return undefined;
  const [, sign, a, b, c] = m;
  const minutes = Number(b);
  const seconds = Number(c);
  if (minutes >= 60 || seconds >= 60) return undefined;
  const value = (Number(a) + minutes / 60 + seconds / 3600) * (axis === 'ra' ? 15 : 1);
  return sign === '-' ? -value : value;
}
