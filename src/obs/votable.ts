/**
 * VOTable (IVOA VOTable 1.4 recommendation), TABLEDATA serialisation: the
 * first TABLE's FIELDs name the columns and declare their units; each TR is a
 * row. Other serialisations (BINARY, BINARY2, FITS) are refused by name.
 */
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { UserError } from '../config/errors.ts';
import type { RawTable } from './table.ts';
import type { Cell } from './cells.ts';

type Node = Record<string, unknown>;
const ARRAYS = new Set(['RESOURCE', 'TABLE', 'FIELD', 'TR', 'TD', 'PARAM', 'INFO', 'GROUP']);

/** Line numbers from character offsets, by binary search over the newline offsets. */
function lineFinder(text: string): (index: number | undefined) => number | undefined {
  const breaks: number[] = [];
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) breaks.push(i);
  return (index) => {
    if (index === undefined) return undefined;
    let lo = 0;
    let hi = breaks.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (breaks[mid] < index) lo = mid + 1;
      else hi = mid;
    }
    return lo + 1;
  };
}

function tables(node: Node): Node[] {
  const out: Node[] = [];
  for (const r of (node.RESOURCE as Node[] | undefined) ?? []) {
    out.push(...((r.TABLE as Node[] | undefined) ?? []));
    out.push(...tables(r));
  }
  return out;
}

function tdText(td: unknown): string {
  if (td === undefined || td === null) return '';
  if (typeof td === 'string' || typeof td === 'number') return String(td);
  const t = (td as Node)['#text'];
  return t === undefined ? '' : String(t);
}

/** The validator's message in words; its report of unclosed elements is a JSON list of their names. */
function xmlProblem(msg: string): string {
  const unclosed = /^Invalid '(\[[\s\S]*\])' found\.?$/.exec(msg);
  if (unclosed) {
    let names: unknown;
    try {
      names = JSON.parse(unclosed[1]);
    } catch {
      names = undefined;
    }
    if (Array.isArray(names)) return `the elements ${names.map((n) => `<${String(n)}>`).join(', ')} are never closed; the file may have been cut short. Copy it again, or close them.`;
  }
  return msg.endsWith('.') ? msg : `${msg}.`;
}

/** VOTables nest about 8 deep (VOTABLE, RESOURCE, TABLE, DATA, TABLEDATA, TR, TD, plus GROUPs); the limit is far above that. */
const MAX_XML_DEPTH = 100;

/**
 * Refuse a DOCTYPE (so no entity, internal or external, is ever declared:
 * VOTable is defined by an XML Schema, not a DTD) and nesting deeper than
 * MAX_XML_DEPTH, both with their line, before any parser builds a tree.
 * Comments, CDATA and processing instructions are skipped; quoted attribute
 * values may hold '>'.
 */
function checkStructure(file: string, text: string, lineAt: (i: number | undefined) => number | undefined): void {
  let depth = 0;
  let i = text.indexOf('<');
  while (i >= 0 && i < text.length) {
    if (text.startsWith('<!--', i)) i = text.indexOf('-->', i + 4);
    else if (text.startsWith('<![CDATA[', i)) i = text.indexOf(']]>', i + 9);
    else if (text.startsWith('<?', i)) i = text.indexOf('?>', i + 2);
    else if (/^<!DOCTYPE/i.test(text.slice(i, i + 9))) {
      throw new UserError('the file declares a DOCTYPE, which could define entities that read other files or expand without end; VOTables need none. Remove the <!DOCTYPE ...> declaration.', { file, line: lineAt(i) });
    } else {
      const closing = text[i + 1] === '/';
      let j = i + 1;
      let quote = '';
      for (; j < text.length; j++) {
        const c = text[j];
        if (quote) {
          if (c === quote) quote = '';
        } else if (c === '"' || c === "'") quote = c;
        else if (c === '>') break;
      }
      if (closing) depth--;
      else if (text[j - 1] !== '/') {
        depth++;
        if (depth > MAX_XML_DEPTH) throw new UserError(`elements are nested more than ${MAX_XML_DEPTH} deep; a VOTable needs about 8. Check that this is a VOTable.`, { file, line: lineAt(i) });
      }
      i = j;
    }
    if (i < 0) return;
    i = text.indexOf('<', i + 1);
  }
}

export function readVotable(file: string, text: string): RawTable {
  const lineAt = lineFinder(text);
  checkStructure(file, text, lineAt);
  const valid = XMLValidator.validate(text);
  if (valid !== true) throw new UserError(`not well-formed XML: ${xmlProblem(valid.err.msg)}`, { file, line: valid.err.line });
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: '@',
    removeNSPrefix: true,
    parseTagValue: false,
    parseAttributeValue: false,
    trimValues: true,
    maxNestedTags: MAX_XML_DEPTH,
    captureMetaData: true,
    isArray: (name) => ARRAYS.has(name),
  });
  const doc = parser.parse(text) as Node;
  const meta = XMLParser.getMetaDataSymbol() as unknown as string;
  const vot = doc.VOTABLE as Node | undefined;
  if (!vot) throw new UserError('not a VOTable: the root element is not VOTABLE.', { file });
  const found = tables(vot);
  if (found.length === 0) throw new UserError('the VOTable has no TABLE.', { file });
  const table = found[0];
  const warnings: string[] = [];
  if (found.length > 1) warnings.push(`${file}: the VOTable holds ${found.length} tables; only the first${table['@name'] ? ` ('${String(table['@name'])}')` : ''} is read.`);
  const fields = (table.FIELD as Node[] | undefined) ?? [];
  if (fields.length === 0) throw new UserError('the VOTable TABLE has no FIELD elements naming its columns.', { file });
  const names = fields.map((f, i) => {
    const n = (f['@name'] ?? f['@ID']) as string | undefined;
    if (!n) throw new UserError(`FIELD ${i + 1} has neither a name nor an ID attribute.`, { file, line: lineAt((f[meta] as { startIndex?: number } | undefined)?.startIndex) });
    return n;
  });
  const nulls = fields.map((f) => {
    const values = f.VALUES as Node | undefined;
    return values?.['@null'] as string | undefined;
  });
  const data = table.DATA as Node | undefined;
  if (!data) throw new UserError('the VOTable TABLE has no DATA.', { file });
  const other = ['BINARY', 'BINARY2', 'FITS'].find((k) => k in data);
  if (other) throw new UserError(`the table is serialised as ${other}; this reader reads TABLEDATA. Save the VOTable with TABLEDATA serialisation (for example astropy: votable.writeto(file, tabledata_format='tabledata')).`, { file });
  const td = data.TABLEDATA as Node | '' | undefined;
  const trs = (td && typeof td === 'object' ? (td.TR as Node[] | undefined) : undefined) ?? [];
  const rows: { cells: Cell[]; line?: number }[] = [];
  trs.forEach((tr, r) => {
    const tds = (tr.TD as unknown[] | undefined) ?? [];
    const line = lineAt((tr[meta] as { startIndex?: number } | undefined)?.startIndex);
    if (tds.length !== names.length) throw new UserError(`row ${r + 1} has ${tds.length} TD cells, but the table has ${names.length} FIELDs.`, { file, line, row: r + 1 });
    rows.push({ cells: tds.map((t, c) => {
      const s = tdText(t);
      return nulls[c] !== undefined && s === nulls[c] ? null : s;
    }), line });
  });
  return {
    file,
    format: 'votable',
    columns: names.map((name, c) => ({ name, unit: (fields[c]['@unit'] as string | undefined) || undefined, values: rows.map((r) => r.cells[c]) })),
    nrows: rows.length,
    declaredUnits: true,
    place: (i) => ({ text: `row ${i + 1}`, loc: { file, line: rows[i].line, row: i + 1 }, source: { file, row: i + 1, line: rows[i].line } }),
    warnings,
  };
}
