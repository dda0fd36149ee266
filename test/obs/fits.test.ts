/**
 * The FITS writer and reader against the FITS Standard 4.0 (IAU FITS
 * Working Group, 2016): 80-character ASCII cards (§4.1), fixed-format values
 * (§4.2.1: logical and numbers right-justified to column 30, strings from
 * column 11 with at least 8 characters between quotes, quotes doubled),
 * mandatory keywords in order (§4.4.1.1, §7.1.1, §7.3.1), 2880-byte blocks
 * with headers padded by spaces and data by zeros (§3.1, §3.3.2), BITPIX
 * 8/16/32/-32/-64 big-endian (§5), BSCALE/BZERO and BLANK (§4.4.2.5, §5.3,
 * Table 11 for the unsigned-16 convention BZERO = 32768).
 */
import { describe, expect, it } from 'vitest';
import { encodeFits, formatCard, commentCards, FITS_BLOCK, FITS_CARD } from '../../src/report/fits.ts';
import { readFits, readFitsImage, readFitsBinaryTable } from '../../src/obs/fits-read.ts';
import { UserError } from '../../src/config/errors.ts';

const ascii = (b: Uint8Array) => String.fromCharCode(...b);

/** Split a FITS file into (header cards, data bytes) per HDU, following only the standard's rules. */
function hdus(bytes: Uint8Array): { cards: string[]; headerBytes: Uint8Array; data: Uint8Array }[] {
  const out = [];
  let o = 0;
  while (o < bytes.length) {
    const cards: string[] = [];
    let end = false;
    let p = o;
    while (!end) {
      for (let c = 0; c < FITS_BLOCK / FITS_CARD; c++) {
        const card = ascii(bytes.subarray(p + c * FITS_CARD, p + (c + 1) * FITS_CARD));
        if (!end) cards.push(card);
        if (card.startsWith('END     ')) end = true;
      }
      p += FITS_BLOCK;
    }
    const val = (k: string) => Number(cards.find((c) => c.startsWith(k.padEnd(8) + '= '))!.slice(10, 30));
    const naxis = val('NAXIS');
    let size = naxis === 0 ? 0 : Math.abs(val('BITPIX')) / 8;
    for (let k = 1; k <= naxis; k++) size *= val(`NAXIS${k}`);
    const padded = Math.ceil(size / FITS_BLOCK) * FITS_BLOCK;
    out.push({ cards, headerBytes: bytes.subarray(o, p), data: bytes.subarray(p, p + padded) });
    o = p + padded;
  }
  return out;
}

const keys = (cards: string[]) => cards.map((c) => c.slice(0, 8).trimEnd());

describe('writer: FITS Standard 4.0 header and block rules', () => {
  const bytes = encodeFits([
    { type: 'image', name: 'AV', nx: 3, ny: 2, data: new Float64Array([1, 2, 3, 4, 5, NaN]), header: [{ key: 'BUNIT', value: 'mag', comment: 'visual extinction' }, { key: 'CRVAL1', value: 70.15 }, ...commentCards('invented test data')] },
    { type: 'image', name: 'F32', nx: 2, ny: 2, data: new Float32Array([0.5, 1, 2, 4]) },
    { type: 'image', name: 'I32', nx: 2, ny: 1, data: new Int32Array([-2147483648, 2147483647]) },
    { type: 'image', name: 'I16', nx: 2, ny: 1, data: new Int16Array([-1, 2]), bzero: 32768, bscale: 1 },
    { type: 'image', name: 'U8', nx: 3, ny: 1, data: new Uint8Array([0, 128, 255]) },
    { type: 'table', name: 'T', columns: [{ name: 'id', data: ['a', 'bbb'] }, { name: 'N', data: new Float64Array([1e17, 2e17]), unit: 'cm-2' }] },
  ]);
  const parts = hdus(bytes);

  it('the file is whole 2880-byte blocks', () => {
    expect(bytes.length % FITS_BLOCK).toBe(0);
    for (const p of parts) {
      expect(p.headerBytes.length % FITS_BLOCK).toBe(0);
      expect(p.data.length % FITS_BLOCK).toBe(0);
    }
    expect(parts).toHaveLength(6);
  });

  it('headers are printable ASCII, padded with spaces after END; data padded with zeros', () => {
    for (const p of parts) {
      for (const b of p.headerBytes) expect(b >= 0x20 && b <= 0x7e).toBe(true);
      const endAt = p.cards.length * FITS_CARD;
      expect(ascii(p.headerBytes.subarray(endAt)).trim()).toBe('');
      expect(p.cards[p.cards.length - 1]).toBe('END'.padEnd(80));
      for (const c of p.cards) expect(c).toHaveLength(80);
    }
    // Image AV: 6 doubles = 48 bytes, then zeros to the block end.
    expect(parts[0].data.subarray(48).every((b) => b === 0)).toBe(true);
  });

  it('mandatory keywords come first and in the order of the standard', () => {
    expect(keys(parts[0].cards).slice(0, 6)).toEqual(['SIMPLE', 'BITPIX', 'NAXIS', 'NAXIS1', 'NAXIS2', 'EXTEND']);
    for (const p of parts.slice(1, 5)) expect(keys(p.cards).slice(0, 7)).toEqual(['XTENSION', 'BITPIX', 'NAXIS', 'NAXIS1', 'NAXIS2', 'PCOUNT', 'GCOUNT']);
    expect(keys(parts[5].cards).slice(0, 8)).toEqual(['XTENSION', 'BITPIX', 'NAXIS', 'NAXIS1', 'NAXIS2', 'PCOUNT', 'GCOUNT', 'TFIELDS']);
    expect(parts[5].cards[0].slice(10, 20)).toBe("'BINTABLE'");
    expect(parts[1].cards[0].slice(10, 20)).toBe("'IMAGE   '");
  });

  it('BITPIX follows the data type: -64, -32, 32, 16, 8 (and 8 for a binary table)', () => {
    const bitpix = parts.map((p) => Number(p.cards[1].slice(10, 30)));
    expect(bitpix).toEqual([-64, -32, 32, 16, 8, 8]);
  });

  it('fixed-format values: logical and numbers end in column 30, strings start in column 11', () => {
    expect(parts[0].cards[0].slice(0, 30)).toBe('SIMPLE  =                    T');
    expect(parts[0].cards[1].slice(0, 30)).toBe('BITPIX  =                  -64');
    const bunit = parts[0].cards.find((c) => c.startsWith('BUNIT'))!;
    expect(bunit.slice(0, 20)).toBe("BUNIT   = 'mag     '");
    expect(bunit.slice(20)).toMatch(/^ \/ visual extinction\s+$/);
    expect(parts[0].cards.find((c) => c.startsWith('CRVAL1'))!.slice(0, 30)).toBe('CRVAL1  =                70.15');
    expect(parts[0].cards.find((c) => c.startsWith('COMMENT'))).toBe('COMMENT invented test data'.padEnd(80));
  });

  it('data are big-endian: Int32 extremes and the unsigned-16 convention', () => {
    const v = new DataView(parts[2].data.buffer, parts[2].data.byteOffset);
    expect(v.getInt32(0, false)).toBe(-2147483648);
    expect(v.getInt32(4, false)).toBe(2147483647);
    expect([...parts[4].data.subarray(0, 3)]).toEqual([0, 128, 255]);
  });

  it('cards: quotes doubled (the standard\'s O\'\'HARA example), numbers exact, bad keywords refused', () => {
    expect(formatCard({ key: 'OBSERVER', value: "O'HARA" })).toBe("OBSERVER= 'O''HARA '".padEnd(80));
    // Longer than 20 characters: free format from column 11 (§4.2.4), still the shortest exact decimal form.
    const long = formatCard({ key: 'X', value: 1.2345678901234567e-300 });
    expect(long).toHaveLength(80);
    expect(Number(long.slice(10).trim())).toBe(1.2345678901234567e-300);
    expect(long.slice(10).trim()).toMatch(/^1\.23456789012345\d+E-300$/);
    expect(formatCard({ key: 'X', value: 1e21 }).slice(10, 30).trim()).toBe('1E+21');
    expect(formatCard({ key: 'X', value: 0.1 }).slice(10, 30).trim()).toBe('0.1');
    expect(() => formatCard({ key: 'lower', value: 1 })).toThrow(/keyword 'lower'/);
    expect(() => formatCard({ key: 'TOOLONGKEY', value: 1 })).toThrow(/1-8 characters/);
    expect(() => formatCard({ key: 'X', value: NaN })).toThrow(/finite/);
    expect(() => formatCard({ key: 'X', value: 'x'.repeat(69) })).toThrow(/longer than 68/);
    expect(() => encodeFits([{ type: 'image', nx: 1, ny: 1, data: new Float64Array(1), header: { NAXIS: 3 } }])).toThrow(/set by the writer/);
  });
});

describe('reader: values back from every BITPIX, scaling, blanks', () => {
  it('BITPIX -64, -32, 32, 16 with BSCALE/BZERO and BLANK, 8', () => {
    const bytes = encodeFits([
      { type: 'image', name: 'D', nx: 2, ny: 2, data: new Float64Array([1.5e17, -0, NaN, 1 / 3]) },
      { type: 'image', name: 'E', nx: 2, ny: 1, data: new Float32Array([0.1, NaN]) },
      { type: 'image', name: 'J', nx: 3, ny: 1, data: new Int32Array([-2147483648, 7, 2147483647]), blank: -2147483648 },
      // physical = 32768 + stored: the unsigned 16-bit convention (Table 11).
      { type: 'image', name: 'I', nx: 3, ny: 1, data: new Int16Array([-32768, 0, 32767]), bzero: 32768 },
      // physical = 1e17 * stored + 5e16, stored -1 is BLANK.
      { type: 'image', name: 'IS', nx: 3, ny: 1, data: new Int16Array([-1, 0, 3]), bscale: 1e17, bzero: 5e16, blank: -1 },
      { type: 'image', name: 'B', nx: 2, ny: 1, data: new Uint8Array([0, 255]) },
    ]);
    const f = readFits('mem.fits', bytes);
    const img = (i: number) => [...readFitsImage(f, f.hdus[i]).data];
    const d = img(0);
    expect(d[0]).toBe(1.5e17);
    expect(Object.is(d[1], -0)).toBe(true);
    expect(d[2]).toBeNaN();
    expect(d[3]).toBe(1 / 3);
    const e = img(1);
    expect(e[0]).toBe(Math.fround(0.1));
    expect(e[1]).toBeNaN();
    const j = img(2);
    expect(j[0]).toBeNaN();
    expect(j.slice(1)).toEqual([7, 2147483647]);
    expect(img(3)).toEqual([0, 32768, 65535]);
    const is = img(4);
    expect(is[0]).toBeNaN();
    expect(is.slice(1)).toEqual([5e16, 5e16 + 3e17]);
    expect(img(5)).toEqual([0, 255]);
  });

  it('binary-table columns: D, E, J, I, K, B, L, A and TNULL', () => {
    const bytes = encodeFits([{ type: 'table', name: 'T', columns: [
      { name: 'd', data: new Float64Array([1e-300, -2.5]) },
      { name: 'e', data: new Float32Array([0.25, NaN]) },
      { name: 'j', data: new Int32Array([-99, 123456]), nullValue: -99 },
      { name: 'i', data: new Int16Array([-300, 300]) },
      { name: 'k', data: new BigInt64Array([-5000000000n, 9007199254740991n]) },
      { name: 'b', data: new Uint8Array([0, 200]) },
      { name: 'l', data: [true, false] },
      { name: 's', data: ['FM-01', 'x'] },
    ] }]);
    const f = readFits('mem.fits', bytes);
    const cols = Object.fromEntries(readFitsBinaryTable(f, f.hdus[1]).map((c) => [c.name, c.values]));
    expect(cols.d).toEqual([1e-300, -2.5]);
    expect(cols.e[0]).toBe(0.25);
    expect(cols.e[1]).toBeNaN();
    expect(cols.j).toEqual([null, 123456]);
    expect(cols.i).toEqual([-300, 300]);
    expect(cols.k).toEqual([-5000000000, 9007199254740991]);
    expect(cols.b).toEqual([0, 200]);
    expect(cols.l).toEqual([true, false]);
    expect(cols.s).toEqual(['FM-01', 'x']);
  });

  it('header values by the card rules: D exponents, quotes, slashes inside strings', () => {
    const base = encodeFits([{ type: 'image', nx: 1, ny: 1, data: new Float64Array(1), header: { AAAAAAAA: 1, BBBBBBBB: 'x', CCCCCCCC: 'y' } }]);
    const text = ascii(base)
      .replace('AAAAAAAA=                    1'.padEnd(80), 'CRVAL1  =             1.25D+02 / a Fortran exponent'.padEnd(80))
      .replace("BBBBBBBB= 'x       '".padEnd(80), "CTYPE1  = 'it''s a /slash' / comment".padEnd(80))
      .replace("CCCCCCCC= 'y       '".padEnd(80), "BUNIT   = 'km /s'".padEnd(80));
    const f = readFits('mem.fits', Uint8Array.from(text, (c) => c.charCodeAt(0)));
    expect(f.hdus[0].header.get('CRVAL1')).toBe(125);
    expect(f.hdus[0].header.get('CTYPE1')).toBe("it's a /slash");
    expect(f.hdus[0].header.get('BUNIT')).toBe('km /s');

    // A long string continued on a CONTINUE card (§4.2.1.2).
    const long = ascii(base).replace("BBBBBBBB= 'x       '".padEnd(80), "OBJECT  = 'Frostmere, an invented dark cloud seen through many background st&'".padEnd(80))
      .replace("CCCCCCCC= 'y       '".padEnd(80), "CONTINUE  'ars' / end of the name".padEnd(80));
    const g = readFits('mem.fits', Uint8Array.from(long, (c) => c.charCodeAt(0)));
    expect(g.hdus[0].header.get('OBJECT')).toBe('Frostmere, an invented dark cloud seen through many background stars');
  });
});

describe('reader: broken files give clear errors', () => {
  const good = encodeFits([{ type: 'image', name: 'AV', nx: 40, ny: 40, data: new Float64Array(1600) }]);

  it('a file truncated mid-block names the byte count and the block', () => {
    const cut = good.subarray(0, 2880 + 1000);
    expect(() => readFits('cut.fits', cut)).toThrow(UserError);
    expect(() => readFits('cut.fits', cut)).toThrow(/cut\.fits: the FITS file is truncated: its size, 3880 bytes, stops 1000 bytes into block 2/);
  });

  it('a file cut at a block boundary before its data end is truncated too', () => {
    expect(() => readFits('short.fits', good.subarray(0, 2 * 2880))).toThrow(/short\.fits: the FITS file is truncated: the data of primary HDU need 14400 bytes but only 2880 remain/);
  });

  it('a header without END is truncated', () => {
    expect(() => readFits('noend.fits', new Uint8Array(2880).fill(0x20).map((b, i) => (i < 9 ? 'SIMPLE  ='.charCodeAt(i) : b)))).toThrow(/no END card/);
  });

  it('BITPIX 64 (valid FITS, not read here) is refused by name', () => {
    const text = ascii(good).replace('BITPIX  =                  -64', 'BITPIX  =                   64');
    const bytes = Uint8Array.from(text, (c) => c.charCodeAt(0));
    expect(() => readFits('int64.fits', bytes)).toThrow(/int64\.fits, field 'BITPIX': primary HDU: BITPIX = 64 is not supported. This reader supports BITPIX 8, 16, 32, -32 and -64/);
  });

  it('not a FITS file at all', () => {
    expect(() => readFits('x.fits', new TextEncoder().encode('id,AV\n'))).toThrow(/not a FITS file/);
  });
});
