/**
 * The one CSV writer: RFC 4180 quoting through d3-dsv, and text cells made
 * safe against spreadsheet formula injection (OWASP, "CSV Injection": a cell
 * beginning with =, +, -, @, tab or carriage return is prefixed with a single
 * quote and quoted), while numbers stay numbers.
 */
import { csvParseRows } from 'd3-dsv';
import { describe, expect, it } from 'vitest';
import { toCsv } from '../../src/config/csv.ts';

describe('toCsv', () => {
  it('quotes commas, quotes and line breaks as RFC 4180 does, and reads back through d3-dsv', () => {
    const text = toCsv(['id', 'note'], [['a,b', 'say "hi"'], ['line\nbreak', 'cr\rhere']]);
    expect(text).toBe('id,note\n"a,b","say ""hi"""\n"line\nbreak","cr\rhere"\n');
    expect(csvParseRows(text.slice(0, -1))).toEqual([['id', 'note'], ['a,b', 'say "hi"'], ['line\nbreak', 'cr\rhere']]);
  });

  it('writes numbers in the shortest form that reads back, non-finite numbers and missing cells empty, booleans as words', () => {
    expect(toCsv(['x'], [[-1.5e-3], [1e-7], [0.1 + 0.2], [NaN], [-Infinity], [null], [undefined], [true], [false]])).toBe('x\n-0.0015\n1e-7\n0.30000000000000004\n\n\n\n\ntrue\nfalse\n');
  });

  it('guards text beginning with =, +, -, @, tab or carriage return (OWASP CSV injection): single quote, then quoted', () => {
    const names = ['=1+1', '+1', '-2+3', '@SUM(A1)', '\t=1+1', '\r=1+1', '=HYPERLINK("http://x","y")'];
    const text = toCsv(['sightline'], names.map((n) => [n]));
    expect(text.split('\n').slice(1, 6)).toEqual([`"'=1+1"`, `"'+1"`, `"'-2+3"`, `"'@SUM(A1)"`, `"'\t=1+1"`]);
    expect(text).toContain(`"'=HYPERLINK(""http://x"",""y"")"`);
    // Read back, each is the name behind one single quote: nothing is lost, nothing is a formula.
    expect(csvParseRows(text.slice(0, -1)).slice(1).map((r) => r[0])).toEqual(names.map((n) => `'${n}`));
  });

  it('leaves numbers alone, and text that merely contains those characters', () => {
    expect(toCsv(['v', 'name'], [[-1.5e-3, 'FM-01'], [-2, 'a=b'], [3, 'x@y']])).toBe('v,name\n-0.0015,FM-01\n-2,a=b\n3,x@y\n');
  });

  it('formats numbers with a given per-column formatter, still as numbers', () => {
    expect(toCsv(['t', 'x'], [[1000, -1.23456789e-30]], { formatNumber: (x, column) => (column === 0 ? x.toPrecision(3) : x.toExponential(2)) })).toBe('t,x\n1.00e+3,-1.23e-30\n');
  });
});
