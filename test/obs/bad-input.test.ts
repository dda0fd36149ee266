/**
 * Bad input (issue 5's list), one test each: a clear UserError (or, for a
 * suspicious error bar, a warning) naming the file, the row, line or pixel,
 * and the column; nothing dropped in silence.
 */
import { describe, expect, it } from 'vitest';
import { loadObservations } from '../../src/obs/load.ts';
import { deriveQuantities } from '../../src/obs/derive.ts';
import { encodeFits, writeFitsImages } from '../../src/report/fits.ts';
import { scratch, section, write } from './helpers.ts';
import { catchUserError } from '../support/errors.ts';

const dir = scratch();

const error = catchUserError;
const load = (name: string, text: string | Uint8Array, known?: string[], extra: Record<string, unknown> = {}) =>
  loadObservations(section({ file: write(dir, name, text), ...extra }), dir, known ? new Set(known) : undefined);

describe('bad observation input', () => {
  it('a species unknown to the network is carried with a note (fitting it is refused later, by deriveQuantities)', () => {
    const set = load('unknown.csv', 'id,AV,N(H2O(s)),N(H2O(s))_err,N(HCOOCH3(s)),N(HCOOCH3(s))_err\na,5,1e17,1e16,1e15,1e14\n', ['H2O(s)', 'CO(s)']);
    expect(set.sightlines[0].columns['HCOOCH3(s)']).toMatchObject({ kind: 'detection', value: 1e15 });
    expect(set.outsideNetwork).toEqual(['HCOOCH3(s)']);
    expect(set.warnings.join('\n')).toMatch(/unknown\.csv: species 'HCOOCH3\(s\)' \(column 'N\(HCOOCH3\(s\)\)'\) is not in the network: its column is read and kept, but it cannot be fitted/);
  });

  it('a species name that is no formula at all', () => {
    const e = error(() => load('notaname.csv', 'id,N(water ice),N(water ice)_err\na,1e17,1e16\n'));
    expect(e.message).toMatch(/notaname\.csv, field 'N\(water ice\)': 'water ice' is not a species name/);
  });

  it('a negative column and a zero column, each named by line and column', () => {
    const e = error(() => load('negative.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,-1e17,1e16\nb,5,0,1e16\nc,5,1e17,1e16\n'));
    expect(e.message).toMatch(/^\S*negative\.csv: 2 problems:/);
    expect(e.message).toMatch(/negative\.csv:2, field 'N\(CO\(s\)\)': a column density must be positive, found '-1e17'/);
    expect(e.message).toMatch(/negative\.csv:3, field 'N\(CO\(s\)\)': a column density must be positive, found '0'/);
  });

  it('an error more than three times the value (observations.max_error_ratio) is a warning naming line and column', () => {
    const set = load('bigerror.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,1e16,2e17\nb,5,1e17,1e16\n');
    expect(set.sightlines).toHaveLength(2);
    expect(set.warnings).toHaveLength(1);
    expect(set.warnings[0]).toMatch(/bigerror\.csv, line 2, column 'N\(CO\(s\)\)_err': the error \(2\.00e\+17\) is more than 3 times the value \(1\.00e\+16\)/);
  });

  it('many suspicious errors in one column: five named, the rest counted', () => {
    const rows = Array.from({ length: 12 }, (_, i) => `s${i},5,1e15,1e17`);
    const set = load('manyerrors.csv', ['id,AV,N(CO(s)),N(CO(s))_err', ...rows].join('\n'));
    expect(set.sightlines).toHaveLength(12);
    expect(set.warnings).toHaveLength(6);
    expect(set.warnings[5]).toMatch(/manyerrors\.csv: \.\.\. and 7 more rows with the same warning for column 'N\(CO\(s\)\)_err'/);
  });

  it('a table without rows, or with nothing observed', () => {
    expect(error(() => load('empty.csv', 'id,AV,N(CO(s)),N(CO(s))_err\n')).message).toMatch(/empty\.csv: the table has no rows/);
    expect(error(() => load('blank.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,,\nb,,nan,\n')).message).toMatch(/blank\.csv: none of its 2 rows holds a column density/);
  });

  it('a limit with an error', () => {
    const e = error(() => load('limiterr.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,<1e17,1e16\n'));
    expect(e.message).toMatch(/limiterr\.csv:2, field 'N\(CO\(s\)\)_err': 'CO\(s\)' is an upper limit \('<1e17'\) but has an error \('1e16'\)/);
  });

  it('a detection without an error', () => {
    const e = error(() => load('noerr.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,1e17,\n'));
    expect(e.message).toMatch(/noerr\.csv:2, field 'N\(CO\(s\)\)_err': the detection '1e17' of 'CO\(s\)' has no error/);
  });

  it('a missing A_V where abundances are asked for (ratios still work)', () => {
    const set = load('noav.csv', 'id,AV,N(CO(s)),N(CO(s))_err,N(H2O(s)),N(H2O(s))_err\na,5,1e17,1e16,1e18,1e17\nb,,2e17,2e16,1e18,1e17\n');
    const s = section({ file: 'noav.csv' });
    const e = error(() => deriveQuantities(set, s, [{ species: 'CO(s)', as: 'abundance' }]));
    expect(e.message).toMatch(/noav\.csv:3, field 'A_V': the abundance of 'CO\(s\)' is asked for, but this sightline has no A_V/);
    expect(deriveQuantities(set, s, [{ species: 'CO(s)', as: 'ratio' }]).quantities).toHaveLength(2);
  });

  it('a quantity asked for a species the file does not have, or ratios to an absent reference', () => {
    const set = load('few.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,1e17,1e16\n');
    const s = section({ file: 'few.csv' });
    expect(error(() => deriveQuantities(set, s, [{ species: 'CH4(s)', as: 'abundance' }])).message).toMatch(/few\.csv, field 'CH4\(s\)': the abundance of 'CH4\(s\)' is asked for, but the observations have no column for it \(they have CO\(s\)\)/);
    expect(error(() => deriveQuantities(set, s, [{ species: 'CO(s)', as: 'ratio' }])).message).toMatch(/few\.csv, field 'reference': ratios to the reference 'H2O\(s\)' are asked for, but the observations have no column for it/);
  });

  it('images of different shapes', () => {
    const file = `${dir}/shapes.fits`;
    writeFitsImages(file, [
      { name: 'AV', nx: 4, ny: 3, data: new Float64Array(12).fill(5) },
      { name: 'N(CO(s))', nx: 4, ny: 3, data: new Float64Array(12).fill(1e17) },
      { name: 'N(CO(s))_err', nx: 3, ny: 4, data: new Float64Array(12).fill(1e16) },
    ]);
    const e = error(() => loadObservations(section({ file }), dir));
    expect(e.message).toMatch(/shapes\.fits: the images of the map are not on one pixel grid:\n {2}- HDU 2 \(N\(CO\(s\)\)_err\) is 3 x 4 pixels but primary HDU \(AV\) is 4 x 3/);
  });

  it('images whose WCS keywords disagree', () => {
    const file = `${dir}/wcs.fits`;
    const wcs = { CTYPE1: 'RA---TAN', CRPIX1: 2, CRVAL1: 70.15, CDELT1: -0.0025 };
    writeFitsImages(file, [
      { name: 'AV', nx: 2, ny: 2, data: new Float64Array(4).fill(5), header: wcs },
      { name: 'N(CO(s))', nx: 2, ny: 2, data: new Float64Array(4).fill(1e17), header: { ...wcs, CRPIX1: 3 } },
      { name: 'N(CO(s))_err', nx: 2, ny: 2, data: new Float64Array(4).fill(1e16), header: wcs },
    ]);
    expect(error(() => loadObservations(section({ file }), dir)).message).toMatch(/HDU 1 \(N\(CO\(s\)\)\) has CRPIX1 = 3 but primary HDU \(AV\) has CRPIX1 = 2/);
  });

  it('a bad pixel is named by its pixel coordinates and image', () => {
    const file = `${dir}/pixel.fits`;
    const n = new Float64Array(4).fill(1e17);
    n[3] = -2e17;
    writeFitsImages(file, [
      { name: 'AV', nx: 2, ny: 2, data: new Float64Array(4).fill(5) },
      { name: 'N(CO(s))', nx: 2, ny: 2, data: n },
      { name: 'N(CO(s))_err', nx: 2, ny: 2, data: new Float64Array(4).fill(1e16) },
    ]);
    expect(error(() => loadObservations(section({ file }), dir)).message).toMatch(/pixel\.fits, field 'N\(CO\(s\)\)': pixel \(1, 1\): a column density must be positive/);
  });

  it('a FITS file truncated mid-block', () => {
    const bytes = encodeFits([{ type: 'image', name: 'AV', nx: 10, ny: 10, data: new Float64Array(100) }]);
    const e = error(() => load('cut.fits', bytes.subarray(0, bytes.length - 100)));
    expect(e.message).toMatch(/cut\.fits: the FITS file is truncated: its size, 5660 bytes, stops 2780 bytes into block 2/);
  });

  it('a FITS file with a BITPIX the reader does not support', () => {
    const bytes = encodeFits([{ type: 'image', name: 'AV', nx: 2, ny: 2, data: new Float64Array(4) }]);
    const text = String.fromCharCode(...bytes).replace('BITPIX  =                  -64', 'BITPIX  =                   64');
    const e = error(() => load('bitpix.fits', Uint8Array.from(text, (c) => c.charCodeAt(0))));
    expect(e.message).toMatch(/bitpix\.fits, field 'BITPIX': primary HDU: BITPIX = 64 is not supported/);
  });

  it('a VOTable column of the wrong unit', () => {
    const xml = `<?xml version="1.0"?>
<VOTABLE version="1.4"><RESOURCE><TABLE>
<FIELD name="id" datatype="char" arraysize="*"/><FIELD name="AV" datatype="double" unit="mag"/>
<FIELD name="N(CO(s))" datatype="double" unit="mag"/><FIELD name="N(CO(s))_err" datatype="double" unit="cm-2"/>
<DATA><TABLEDATA><TR><TD>a</TD><TD>5</TD><TD>1e17</TD><TD>1e16</TD></TR></TABLEDATA></DATA>
</TABLE></RESOURCE></VOTABLE>`;
    const e = error(() => load('unit.xml', xml));
    expect(e.message).toMatch(/unit\.xml, field 'N\(CO\(s\)\)': column 'N\(CO\(s\)\)' has unit 'mag', but a column density needs cm-2/);
  });

  it('a VOTable declaring entities (an external one, or any) is refused with the line of its DOCTYPE; nothing is read', () => {
    const body = '<VOTABLE version="1.4"><RESOURCE><TABLE><FIELD name="id" datatype="char" arraysize="*"/><DATA><TABLEDATA><TR><TD>&xxe;</TD></TR></TABLEDATA></DATA></TABLE></RESOURCE></VOTABLE>\n';
    const external = `<?xml version="1.0"?>\n<!DOCTYPE VOTABLE [\n<!ENTITY xxe SYSTEM "file:///etc/hostname">\n]>\n${body}`;
    expect(error(() => load('external.vot', external)).message).toMatch(/\/external\.vot:2: the file declares a DOCTYPE, .*VOTables need none/);
    const internal = `<?xml version="1.0"?>\n<!DOCTYPE VOTABLE [<!ENTITY xxe "lots">]>\n${body}`;
    expect(error(() => load('internal.vot', internal)).message).toMatch(/\/internal\.vot:2: the file declares a DOCTYPE/);
  });

  it('a VOTable nested 100,000 deep is refused with the line where it passes the limit', () => {
    const deep = `<?xml version="1.0"?>\n<VOTABLE>\n${'<GROUP>'.repeat(100_000)}${'</GROUP>'.repeat(100_000)}\n</VOTABLE>\n`;
    expect(error(() => load('deep.vot', deep)).message).toMatch(/\/deep\.vot:3: elements are nested more than 100 deep/);
  });

  it('a YAML sightline list with 1e400 or .inf is refused like the CSV reader refuses them, naming the line', () => {
    const list = (v: string) => `sightlines:\n  - id: a\n    av: 5\n    columns:\n      CO(s): { value: ${v}, error: 1e16 }\n`;
    expect(error(() => load('huge.yaml', list('1e400'))).message).toMatch(/huge\.yaml:5, field 'CO\(s\)\.value': expected a finite number, found infinity/);
    expect(error(() => load('inf.yaml', list('.inf'))).message).toMatch(/inf\.yaml:5, field 'CO\(s\)\.value': expected a finite number, found infinity/);
    expect(error(() => load('av-inf.yaml', 'sightlines:\n  - id: a\n    av: -.inf\n')).message).toMatch(/av-inf\.yaml:3, field 'av': expected a finite number, found -infinity/);
    expect(error(() => load('bare-inf.yaml', 'sightlines:\n  - id: a\n    av: 5\n    columns:\n      CO(s): .inf\n')).message).toMatch(/bare-inf\.yaml:5, field 'CO\(s\)': expected a finite number, found infinity/);
    expect(error(() => load('inf.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,1e400,1e16\n')).message).toMatch(/inf\.csv:2, field 'N\(CO\(s\)\)': cannot read '1e400'/);
  });

  it('a CSV cell that is not a number, a ragged row, a mapping naming a missing column', () => {
    expect(error(() => load('text.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,lots,1e16\n')).message).toMatch(/text\.csv:2, field 'N\(CO\(s\)\)': cannot read 'lots' as a column density/);
    expect(error(() => load('ragged.csv', 'id,AV,N(CO(s)),N(CO(s))_err\na,5,1e17\n')).message).toMatch(/ragged\.csv:2: this row has 3 cells but the header names 4 columns/);
    const e = error(() => load('mapped.csv', 'star,AV,co,co_e\na,5,1e17,1e16\n', undefined, { columns: { id: 'star', species: { 'CO(s)': { value: 'co', error: 'co_err' } } } }));
    expect(e.message).toMatch(/names column 'co_err' for 'species\.CO\(s\)\.error', but the file has no such column\. The file has: 'star', 'AV', 'co', 'co_e'/);
  });
});
