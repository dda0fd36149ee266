/**
 * The one CSV writer of the tool: every table it writes as CSV goes through
 * here. Fields are quoted by d3-dsv (RFC 4180: a field holding a comma,
 * quote, CR or LF is quoted, quotes doubled); rows end in LF.
 *
 * Text cells are made safe for spreadsheets (OWASP, "CSV Injection"): a text
 * cell beginning with =, +, - or @ (a formula to a spreadsheet) or with a tab
 * or carriage return (which some importers trim, leaving such a formula) is
 * prefixed with a single quote and quoted. Text and numbers are told apart by
 * the value's type before formatting: a JavaScript number is written as a
 * number (a negative value keeps its minus sign); only strings are guarded.
 * Callers therefore pass numbers as numbers, with `formatNumber` for a
 * format of their own, never as text they formatted themselves.
 */
import { csvFormatRow } from 'd3-dsv';

export type CsvCell = string | number | boolean | null | undefined;

export interface CsvOptions {
  /** Text of a finite number in column `column` (default: the shortest form that reads back exactly). */
  formatNumber?: (value: number, column: number) => string;
}

/** A formula to a spreadsheet, or a character some importers trim before one (OWASP CSV injection guidance). */
const FORMULA_START = /^[=+\-@\t\r]/;

function guardText(text: string): string {
  return FORMULA_START.test(text) ? `"'${text.replace(/"/g, '""')}"` : csvFormatRow([text]);
}

function field(value: CsvCell, column: number, options: CsvOptions): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? (options.formatNumber?.(value, column) ?? String(value)) : '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  return guardText(value);
}

/** CSV text of a header and rows. */
export function toCsv(header: readonly string[], rows: readonly (readonly CsvCell[])[], options: CsvOptions = {}): string {
  return [header, ...rows].map((row) => row.map((v, column) => field(v, column, options)).join(',')).join('\n') + '\n';
}
