/**
 * CSV and TSV tables (RFC 4180 quoting, through d3-dsv). The first
 * non-comment line names the columns; lines starting with `#` are comments.
 * Rows are numbered by their line in the file.
 */
import { csvParseRows, tsvParseRows } from 'd3-dsv';
import { UserError } from '../config/errors.ts';
import type { RawTable } from './table.ts';

export function readDelimited(file: string, text: string, format: 'csv' | 'tsv'): RawTable {
  const parsed = (format === 'tsv' ? tsvParseRows : csvParseRows)(text.replace(/^\uFEFF/, ''));
  // Each parsed row starts on the line after the newlines of the rows before it.
  const lines: number[] = [];
  let line = 1;
  for (const row of parsed) {
    lines.push(line);
    line += 1 + row.reduce((n, cell) => n + (cell.match(/\n/g)?.length ?? 0), 0);
  }
  const isComment = (row: string[]) => row.length > 0 && row[0].trimStart().startsWith('#');
  const isEmpty = (row: string[]) => row.every((c) => c.trim() === '');
  const keep = parsed.map((row, i) => ({ row, line: lines[i] })).filter((r) => !isComment(r.row) && !isEmpty(r.row));
  if (keep.length === 0) throw new UserError(`the ${format.toUpperCase()} file has no header line; the first line that is not a comment must name the columns.`, { file });
  const header = keep[0].row.map((h) => h.trim());
  const dup = header.find((h, i) => header.indexOf(h) !== i);
  if (dup !== undefined) throw new UserError(`two columns are named '${dup}'; column names must differ.`, { file, line: keep[0].line });
  const emptyName = header.findIndex((h) => h === '');
  if (emptyName >= 0) throw new UserError(`column ${emptyName + 1} of the header line has no name.`, { file, line: keep[0].line });
  const body = keep.slice(1);
  for (const r of body) {
    if (r.row.length !== header.length) {
      throw new UserError(`this row has ${r.row.length} cells but the header names ${header.length} columns${format === 'csv' ? ' (a comma inside a value needs double quotes around the value)' : ''}.`, { file, line: r.line });
    }
  }
  return {
    file,
    format,
    columns: header.map((name, c) => ({ name, values: body.map((r) => r.row[c]) })),
    nrows: body.length,
    declaredUnits: false,
    place: (i) => ({ text: `line ${body[i].line}`, loc: { file, line: body[i].line }, source: { file, line: body[i].line } }),
  };
}
