/**
 * Round trips: the tests write CSV, TSV, YAML, VOTable (IVOA VOTable 1.4,
 * TABLEDATA) and FITS (image set and binary table, FITS Standard 4.0) files
 * holding full-precision doubles, read them with loadObservations, and
 * require every value back to the last bit (Object.is).
 */
import { describe, expect, it } from 'vitest';
import { gzipSync } from 'node:zlib';
import { stringify } from 'yaml';
import { loadObservations } from '../../src/obs/load.ts';
import { encodeFits, writeFits, writeFitsImages, writeFitsTable } from '../../src/report/fits.ts';
import type { ObservationSet } from '../../src/obs/types.ts';
import { fullPrecisionValues, scratch, section, write } from './helpers.ts';

const N = 25;
const ids = Array.from({ length: N }, (_, i) => `star-${String(i + 1).padStart(2, '0')}`);
const av = fullPrecisionValues(N, 2, 1, 1);
const avErr = fullPrecisionValues(N, 0.1, 0.5, 2);
const h2o = fullPrecisionValues(N, 1e17, 2, 3);
const h2oErr = h2o.map((v, i) => v * (0.05 + 0.1 * fullPrecisionValues(N, 1, 0.3, 4)[i] / 2));
const co = fullPrecisionValues(N, 1e16, 2, 5);
const coLo = co.map((v) => v / 7.123456789012345);
const coHi = co.map((v) => v / 3.987654321098765);
/** Every fourth CO value is an upper limit. */
const coUpper = (i: number) => i % 4 === 3;

function expectExact(set: ObservationSet): void {
  expect(set.sightlines.map((s) => s.id)).toEqual(ids);
  set.sightlines.forEach((s, i) => {
    expect(Object.is(s.av, av[i])).toBe(true);
    expect(Object.is(s.avErr, avErr[i])).toBe(true);
    const w = s.columns['H2O(s)'];
    expect(w.kind).toBe('detection');
    expect(Object.is(w.value, h2o[i]) && Object.is(w.errLo, h2oErr[i]) && Object.is(w.errHi, h2oErr[i])).toBe(true);
    const c = s.columns['CO(s)'];
    if (coUpper(i)) {
      expect(c).toEqual({ kind: 'upper', value: co[i] });
    } else {
      expect(c.kind).toBe('detection');
      expect(Object.is(c.value, co[i]) && Object.is(c.errLo, coLo[i]) && Object.is(c.errHi, coHi[i])).toBe(true);
    }
  });
}

describe('round trips to the last bit', () => {
  const dir = scratch();

  it('CSV with the naming convention and < limits (shortest round-trip decimal forms)', () => {
    const lines = ['# written by the round-trip test', 'id,AV,AV_err,N(H2O(s)),N(H2O(s))_err,N(CO(s)),N(CO(s))_errlo,N(CO(s))_errhi'];
    ids.forEach((id, i) => lines.push([id, av[i], avErr[i], h2o[i], h2oErr[i], coUpper(i) ? `<${co[i]}` : co[i], coUpper(i) ? '' : coLo[i], coUpper(i) ? '' : coHi[i]].join(',')));
    const file = write(dir, 'rt.csv', lines.join('\n') + '\n');
    const set = loadObservations(section({ file }), dir);
    expect(set.format).toBe('csv');
    expect(set.warnings).toEqual([]);
    expectExact(set);
    expect(set.sightlines[0].source.line).toBe(3);
  });

  it('TSV with a sidecar column mapping and upper-case exponents', () => {
    const lines = ['name\tA\tsA\tw\tsw\tc\tclo\tchi\tflag'];
    const up = (x: number) => String(x).toUpperCase();
    ids.forEach((id, i) => lines.push([id, up(av[i]), up(avErr[i]), up(h2o[i]), up(h2oErr[i]), up(co[i]), coUpper(i) ? '' : up(coLo[i]), coUpper(i) ? '' : up(coHi[i]), coUpper(i) ? '<' : ''].join('\t')));
    const file = write(dir, 'rt2.tsv', lines.join('\n'));
    write(dir, 'rt2.columns.yaml', stringify({ id: 'name', av: 'A', av_error: 'sA', species: { 'H2O(s)': { value: 'w', error: 'sw' }, 'CO(s)': { value: 'c', error_lo: 'clo', error_hi: 'chi', limit: 'flag' } } }));
    expectExact(loadObservations(section({ file }), dir));
  });

  it('YAML list of sightlines', () => {
    const sightlines = ids.map((id, i) => ({
      id,
      av: av[i],
      av_error: avErr[i],
      columns: {
        'H2O(s)': { value: h2o[i], error: h2oErr[i] },
        'CO(s)': coUpper(i) ? { upper: co[i] } : { value: co[i], error_lo: coLo[i], error_hi: coHi[i] },
      },
    }));
    const file = write(dir, 'rt.yaml', stringify({ sightlines }));
    const set = loadObservations(section({ file }), dir);
    expect(set.format).toBe('yaml');
    expectExact(set);
  });

  it('VOTable TABLEDATA with units, m-2 converted to cm-2', () => {
    const field = (name: string, unit: string, datatype = 'double') => `<FIELD name="${name}" datatype="${datatype}"${unit ? ` unit="${unit}"` : ''}/>`;
    const rows = ids.map((id, i) => `<TR><TD>${id}</TD><TD>${av[i]}</TD><TD>${avErr[i]}</TD><TD>${h2o[i]}</TD><TD>${h2oErr[i]}</TD><TD>${coUpper(i) ? `&lt;${co[i]}` : co[i]}</TD><TD>${coUpper(i) ? '' : coLo[i]}</TD><TD>${coUpper(i) ? '' : coHi[i]}</TD></TR>`);
    const xml = `<?xml version="1.0" encoding="UTF-8"?>
<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3">
 <RESOURCE><TABLE name="ices">
  ${field('id', '', 'char')}${field('AV', 'mag')}${field('AV_err', 'mag')}
  ${field('N(H2O(s))', 'cm-2')}${field('N(H2O(s))_err', 'cm**-2')}${field('N(CO(s))', 'cm-2', 'char')}${field('N(CO(s))_errlo', 'cm^-2')}${field('N(CO(s))_errhi', 'cm-2')}
  <DATA><TABLEDATA>
${rows.join('\n')}
  </TABLEDATA></DATA>
 </TABLE></RESOURCE>
</VOTABLE>`;
    const file = write(dir, 'rt.xml', xml);
    const set = loadObservations(section({ file }), dir);
    expect(set.format).toBe('votable');
    expectExact(set);
    expect(set.sightlines[1].source).toMatchObject({ row: 2, line: 8 }); // line 1 is the XML declaration, rows start on line 7;

    // The same H2O(s) column in m-2: 1 m-2 = 1e-4 cm-2.
    const m2 = write(dir, 'rt-m2.xml', xml.replace('name="N(H2O(s))" datatype="double" unit="cm-2"', 'name="N(H2O(s))" datatype="double" unit="m-2"'));
    const s2 = loadObservations(section({ file: m2 }), dir);
    s2.sightlines.forEach((s, i) => expect(s.columns['H2O(s)'].value).toBe(h2o[i] * 1e-4));
  });

  it('FITS binary table (TFORM D, TUNIT, strings)', () => {
    const file = `${dir}/rt-table.fits`;
    const lim = new Float64Array(N).map((_, i) => (coUpper(i) ? NaN : 0));
    writeFitsTable(file, {
      name: 'ICES',
      columns: [
        { name: 'id', data: ids },
        { name: 'AV', data: Float64Array.from(av), unit: 'mag' },
        { name: 'AV_err', data: Float64Array.from(avErr), unit: 'mag' },
        { name: 'N(H2O(s))', data: Float64Array.from(h2o), unit: 'cm-2' },
        { name: 'N(H2O(s))_err', data: Float64Array.from(h2oErr), unit: 'cm-2' },
        { name: 'N(CO(s))', data: Float64Array.from(co), unit: 'cm-2' },
        { name: 'N(CO(s))_errlo', data: Float64Array.from(coLo, (v, i) => (coUpper(i) ? NaN : v) + lim[i]), unit: 'cm-2' },
        { name: 'N(CO(s))_errhi', data: Float64Array.from(coHi, (v, i) => (coUpper(i) ? NaN : v)), unit: 'cm-2' },
        { name: 'l_N(CO(s))', data: ids.map((_, i) => (coUpper(i) ? '<' : ' ')) },
      ],
    });
    const set = loadObservations(section({ file }), dir);
    expect(set.kind).toBe('table');
    expectExact(set);
    expect(set.sightlines[4].source.row).toBe(5);
  });

  it('FITS image set (BITPIX -64) as a map, WCS kept, NaN pixels not observed', () => {
    const nx = 5;
    const ny = 5;
    const wcs = { CTYPE1: 'RA---TAN', CTYPE2: 'DEC--TAN', CRPIX1: 3, CRPIX2: 3, CRVAL1: 70.15, CRVAL2: 25.82, CDELT1: -0.0025, CDELT2: 0.0025 };
    const img = (name: string, v: number[], unit: string) => ({ name, nx, ny, data: Float64Array.from(v), header: { BUNIT: unit, ...wcs } });
    const blankCo = (arr: number[], fill: number) => arr.map((v, i) => (coUpper(i) ? fill : v));
    writeFitsImages(`${dir}/rt-map.fits`, [
      img('AV', av, 'mag'),
      img('AV_err', avErr, 'mag'),
      img('N(H2O(s))', h2o, 'cm-2'),
      img('N(H2O(s))_err', h2oErr, 'cm-2'),
      img('N(CO(s))', co, 'cm-2'),
      img('N(CO(s))_errlo', blankCo(coLo, NaN), 'cm-2'),
      img('N(CO(s))_errhi', blankCo(coHi, NaN), 'cm-2'),
      { name: 'l_N(CO(s))', nx, ny, data: Float64Array.from(ids, (_, i) => (coUpper(i) ? 1 : 0)), header: wcs },
    ]);
    const set = loadObservations(section({ file: `${dir}/rt-map.fits` }), dir);
    expect(set.kind).toBe('map');
    expect(set.map).toEqual({ nx, ny, wcs });
    // Pixel ids are x,y with x fastest: pixel i sits at (i % nx, floor(i / nx)).
    expect(set.sightlines.map((s) => s.id)).toEqual(ids.map((_, i) => `${i % nx},${Math.floor(i / nx)}`));
    set.sightlines.forEach((s, i) => {
      expect(s.pixel).toEqual({ x: i % nx, y: Math.floor(i / nx) });
      expect(Object.is(s.av, av[i]) && Object.is(s.columns['H2O(s)'].value, h2o[i]) && Object.is(s.columns['H2O(s)'].errLo, h2oErr[i])).toBe(true);
      expect(s.columns['CO(s)'].kind).toBe(coUpper(i) ? 'upper' : 'detection');
      expect(Object.is(s.columns['CO(s)'].value, co[i])).toBe(true);
    });

    // A NaN pixel in every species image is not observed: 24 sightlines, and the A_V-only pixel is counted in a warning.
    const h2oHole = h2o.slice();
    h2oHole[7] = NaN;
    const coHole = co.slice();
    coHole[7] = NaN;
    writeFits(`${dir}/rt-map-hole.fits`, [
      { type: 'image', ...img('AV', av, 'mag') },
      { type: 'image', ...img('N(H2O(s))', h2oHole, 'cm-2') },
      { type: 'image', ...img('N(H2O(s))_err', h2oErr.map((v, i) => (i === 7 ? NaN : v)), 'cm-2') },
    ]);
    const holed = loadObservations(section({ file: `${dir}/rt-map-hole.fits` }), dir);
    expect(holed.sightlines).toHaveLength(N - 1);
    expect(holed.sightlines.find((s) => s.id === '2,1')).toBeUndefined();
    expect(holed.warnings.join('\n')).toMatch(/1 pixel has an extinction but no column density/);
  });

  it('gzip-compressed FITS (.fits.gz) reads the same, and sexagesimal coordinates are read as degrees', () => {
    const bytes = encodeFits([{ type: 'table', columns: [
      { name: 'id', data: ['g1'] },
      { name: 'RA', data: ['04:40:24.0'] },
      { name: 'DEC', data: ['+25:48:54'] },
      { name: 'AV', data: new Float64Array([av[0]]), unit: 'mag' },
      { name: 'N(CO(s))', data: new Float64Array([co[0]]), unit: 'cm-2' },
      { name: 'N(CO(s))_err', data: new Float64Array([coLo[0]]), unit: 'cm-2' },
    ] }]);
    const file = write(dir, 'packed.fits.gz', gzipSync(bytes));
    const s = loadObservations(section({ file }), dir).sightlines[0];
    expect(Object.is(s.av, av[0]) && Object.is(s.columns['CO(s)'].value, co[0])).toBe(true);
    expect(s.ra).toBeCloseTo(70.1, 10);
    expect(s.dec).toBeCloseTo(25.815, 10);
  });

  it('integrated optical depth with the table band strength (memory): N = tau_int / A', () => {
    // H2O 3.0 um band, A = 2.0e-16 cm/molecule (memory, config/band-strengths.yaml): tau_int 0.4 cm-1 -> N = 2e15.
    const file = write(dir, 'tau.csv', 'id,AV,AV_err,tau(H2O(s)),tau(H2O(s))_err\nt1,10,1,0.4,0.04\n');
    const set = loadObservations(section({ file }), dir);
    const m = set.sightlines[0].columns['H2O(s)'];
    expect(m.value).toBe(0.4 / 2.0e-16);
    expect(m.value / 2e15).toBeCloseTo(1, 14);
    expect(m.errLo).toBe(0.04 / 2.0e-16);
    expect(m.fromTau).toMatchObject({ tauInt: 0.4, tauIntErr: 0.04, band: 'H2O-3.0um', bandStrength: 2.0e-16 });
  });

  it('a YAML species with a symmetric error in one sightline and asymmetric errors in another', () => {
    const file = write(dir, 'mixed.yaml', stringify({ sightlines: [
      { id: 'a', av: 5, columns: { 'CO(s)': { value: 1e17, error: 1e16 } } },
      { id: 'b', av: 5, columns: { 'CO(s)': { value: 2e17, error_lo: 2e16, error_hi: 3e16 } } },
      { id: 'c', av: 5, columns: { 'CO(s)': '<5e16' } },
    ] }));
    const set = loadObservations(section({ file }), dir);
    expect(set.sightlines.map((s) => s.columns['CO(s)'])).toEqual([
      { kind: 'detection', value: 1e17, errLo: 1e16, errHi: 1e16 },
      { kind: 'detection', value: 2e17, errLo: 2e16, errHi: 3e16 },
      { kind: 'upper', value: 5e16 },
    ]);
  });

  it('A_K converted to A_V with A_K/A_V = 0.112 (Rieke & Lebofsky 1985)', () => {
    const file = write(dir, 'ak.csv', 'id,AK,AK_err,N(CO(s)),N(CO(s))_err\nk1,1.12,0.112,1e17,1e16\n');
    const s = loadObservations(section({ file }), dir).sightlines[0];
    expect(s.av).toBeCloseTo(10, 12);
    expect(s.avErr).toBeCloseTo(1, 12);
    expect(s.ak).toBe(1.12);
  });

  it("observers' habits: blank, nan, --, 1.2E+17, < and > limits, confidence in sigma", () => {
    const file = write(dir, 'habits.csv', [
      'id,AV,N(CO(s)),N(CO(s))_err,N(CO(s))_conf',
      'a,5,1.2E+17,1.0e16,',
      'b,5,<1.2e17,,3',
      'c,5,> 3e16,,0.95',
      'd,5,nan,,',
      'e,5,,,',
      'f,5,--,,',
    ].join('\n'));
    const set = loadObservations(section({ file }), dir);
    const by = Object.fromEntries(set.sightlines.map((s) => [s.id, s.columns['CO(s)']]));
    expect(by.a).toEqual({ kind: 'detection', value: 1.2e17, errLo: 1e16, errHi: 1e16 });
    expect(by.b.kind).toBe('upper');
    expect(by.b.value).toBe(1.2e17);
    // 3 sigma, two-sided Gaussian: erf(3 / sqrt 2) = 0.99730020 (standard normal table).
    expect(by.b.confidence).toBeCloseTo(0.9973002, 6);
    expect(by.c).toEqual({ kind: 'lower', value: 3e16, confidence: 0.95 });
    expect(by.d).toBeUndefined();
    expect(by.e).toBeUndefined();
    expect(by.f).toBeUndefined();
    expect(set.sightlines.map((s) => s.id)).toEqual(['a', 'b', 'c', 'd', 'e', 'f']);
  });
});
