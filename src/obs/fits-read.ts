/**
 * FITS reading for Node through fitsjs 0.6.6 (design.md's choice).
 *
 * fitsjs was written for browsers: its file parser reads Blob/File through
 * FileReader and its image reader decodes frames in a Web Worker. This
 * adapter skips both. It walks the 2880-byte blocks itself (FITS Standard
 * 4.0 §3.1, §4.4.1), which also lets it say clearly when a file is truncated
 * (fitsjs's parser would loop past the end of such a file), then hands each
 * header to fitsjs's `Header` (which checks BITPIX, NAXIS and the extension
 * keywords) and each data unit, as an ArrayBuffer, to fitsjs's `Image`
 * (synchronous `_getFrame`) or `BinaryTable` (synchronous `getRows`).
 *
 * Where fitsjs 0.6.6 gets a case wrong, the adapter does that part itself:
 * - header values are read with the card rules of §4.2 (fitsjs splits a
 *   card at the first ' /' even inside a quoted string, keeps doubled quotes,
 *   and reads a `D` exponent as the end of the number);
 * - BITPIX -64 pixels: fitsjs swaps 4-byte words and views the buffer as
 *   32-bit floats, so -64 images are decoded here with a DataView;
 * - BSCALE/BZERO and BLANK: fitsjs scales integers in place (BZERO = 32768
 *   overflows an Int16Array) and loses BLANK; frames are taken from fitsjs
 *   unscaled (bzero 0, bscale 1), BLANK is matched on the stored integers and
 *   the scaling is done here in double precision (§5.3);
 * - `K` (64-bit integer) table columns: fitsjs shifts by 32 bits, which
 *   JavaScript takes modulo 32, so K columns are read here with getBigInt64;
 * - TSCAL/TZERO/TNULL of table columns (§7.3.2), which fitsjs does not apply.
 */
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
import { gunzipSync } from 'node:zlib';
import { UserError } from '../config/errors.ts';

const FITS_BLOCK = 2880;
const CARD = 80;
const SUPPORTED_BITPIX = [8, 16, 32, -32, -64];
const LATIN1 = new TextDecoder('latin1');

export type FitsHeaderValue = string | number | boolean;
export interface FitsHeaderCard {
  key: string;
  value?: FitsHeaderValue;
  comment?: string;
}
export interface FitsHeader {
  cards: FitsHeaderCard[];
  get(key: string): FitsHeaderValue | undefined;
  num(key: string): number | undefined;
}

export interface FitsHduInfo {
  index: number;
  kind: 'primary' | 'image' | 'bintable' | 'table' | 'other';
  name?: string;
  bitpix: number;
  naxis: number[];
  header: FitsHeader;
  /** Byte offset of the header in the file. */
  headerOffset: number;
  /** Byte offset of the data unit in the file and its length without padding. */
  dataOffset: number;
  dataLength: number;
}

export interface FitsFile {
  file: string;
  bytes: Uint8Array;
  hdus: FitsHduInfo[];
  warnings: string[];
}

// ---- fitsjs, loaded as the CommonJS module it is -------------------------

interface FitsjsHeader {
  get(key: string): unknown;
}
interface FitsjsImage {
  width: number;
  height: number;
  frameOffsets: { buffers?: ArrayBuffer[] }[];
  _getFrame(buffer: ArrayBuffer, bitpix: number, bzero: number, bscale: number): ArrayLike<number>;
}
type Accessor = (view: DataView, offset: number) => [unknown, number];
interface FitsjsBinaryTable {
  rows: number;
  columns: string[] | null;
  descriptors: string[];
  elementByteLengths: number[];
  accessors: Accessor[];
  getRows(row: number, n: number): Record<string, unknown>[];
}
interface FitsjsModule {
  astro: {
    FITS: {
      Header: new (block: string) => FitsjsHeader;
      Image: new (header: FitsjsHeader, data: ArrayBuffer) => FitsjsImage;
      BinaryTable: new (header: FitsjsHeader, data: ArrayBuffer) => FitsjsBinaryTable;
    };
  };
}

let fitsjs: FitsjsModule | undefined;
function lib(): FitsjsModule {
  if (!fitsjs) {
    fitsjs = createRequire(import.meta.url)('fitsjs') as FitsjsModule;
    // fitsjs looks its data-unit classes up on a global `astro` (Parser.createDataUnit).
    (globalThis as { astro?: unknown }).astro ??= fitsjs.astro;
  }
  return fitsjs;
}

/** Run fitsjs code, turning its thrown strings into UserErrors and its console warnings into ours. */
function callFitsjs<T>(file: string, where: string, warnings: string[], fn: () => T): T {
  const warn = console.warn;
  console.warn = (...args: unknown[]) => {
    warnings.push(`${file}: ${where}: ${args.map(String).join(' ')}`);
  };
  try {
    return fn();
  } catch (e) {
    const msg = typeof e === 'string' ? e : (e as Error).message;
    throw new UserError(`${where}: not a valid FITS header or data unit: ${msg}.`, { file });
  } finally {
    console.warn = warn;
  }
}

// ---- header cards (FITS Standard 4.0 §4.1-4.2) ---------------------------

function parseCardValue(text: string): { value?: FitsHeaderValue; comment?: string } {
  let i = 0;
  while (i < text.length && text[i] === ' ') i++;
  if (text[i] === "'") {
    let s = '';
    let j = i + 1;
    for (; j < text.length; j++) {
      if (text[j] === "'") {
        if (text[j + 1] === "'") {
          s += "'";
          j++;
        } else break;
      } else s += text[j];
    }
    const rest = text.slice(j + 1);
    const slash = rest.indexOf('/');
    return { value: s.replace(/ +$/, ''), comment: slash >= 0 ? rest.slice(slash + 1).trim() : undefined };
  }
  const slash = text.indexOf('/', i);
  const raw = (slash >= 0 ? text.slice(i, slash) : text.slice(i)).trim();
  const comment = slash >= 0 ? text.slice(slash + 1).trim() : undefined;
  if (raw === '') return { comment };
  if (raw === 'T') return { value: true, comment };
  if (raw === 'F') return { value: false, comment };
  const num = raw.replace(/[dD]/, 'E');
  if (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(num)) return { value: Number(num), comment };
  return { value: raw, comment };
}

function makeHeader(cards: FitsHeaderCard[]): FitsHeader {
  const map = new Map<string, FitsHeaderValue>();
  for (const c of cards) if (c.value !== undefined && !map.has(c.key)) map.set(c.key, c.value);
  return {
    cards,
    get: (k) => map.get(k),
    num: (k) => {
      const v = map.get(k);
      return typeof v === 'number' ? v : undefined;
    },
  };
}

function truncated(file: string, what: string): never {
  throw new UserError(`the FITS file is truncated: ${what}. FITS files are whole 2880-byte blocks (FITS Standard 4.0 §3.1); the file was probably cut short while copying or downloading. Copy it again.`, { file });
}

/** A header count (NAXIS, NAXISn, PCOUNT, GCOUNT) checked against the range FITS Standard 4.0 §4.4.1 allows. */
function wholeNumber(file: string, where: string, header: FitsHeader, key: string, min: number, max: number, absent: number): number {
  const v = header.get(key);
  if (v === undefined) return absent;
  if (typeof v === 'number' && Number.isInteger(v) && v >= min && v <= max) return v;
  const range = max === Number.MAX_SAFE_INTEGER ? `>= ${min}` : `from ${min} to ${max}`;
  throw new UserError(`${where}: ${key} = ${typeof v === 'string' ? `'${v}'` : String(v)} is out of range: expected a whole number ${range} (FITS Standard 4.0 §4.4.1). The file is damaged or was written wrongly; write it again.`, { file, field: key });
}

/** Read a FITS file's structure: every HDU's header, kind and where its data lie. */
export function readFits(file: string, bytes?: Uint8Array): FitsFile {
  let data: Uint8Array;
  try {
    // A plain Uint8Array view: Buffer#slice shares memory, Uint8Array#slice copies.
    let b: Uint8Array = bytes ?? readFileSync(file);
    // gzip-compressed FITS (.fits.gz, common in archives): the gzip magic bytes 1f 8b (RFC 1952).
    if (b[0] === 0x1f && b[1] === 0x8b) b = gunzipSync(b);
    data = new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'FITS file not found. Check the path.' : code === 'Z_BUF_ERROR' || code === 'Z_DATA_ERROR' ? 'the gzip-compressed FITS file is damaged or truncated; copy it again.' : `cannot read the FITS file: ${(e as Error).message}`;
    throw new UserError(why, { file });
  }
  const warnings: string[] = [];
  if (data.length === 0) throw new UserError('the FITS file is empty.', { file });
  const first = String.fromCharCode(...data.subarray(0, Math.min(9, data.length)));
  if (first !== 'SIMPLE  =') throw new UserError("not a FITS file: it does not start with the card 'SIMPLE  ='.", { file });
  if (data.length % FITS_BLOCK !== 0) {
    truncated(file, `its size, ${data.length} bytes, stops ${data.length % FITS_BLOCK} bytes into block ${Math.floor(data.length / FITS_BLOCK) + 1}`);
  }
  const hdus: FitsHduInfo[] = [];
  let offset = 0;
  while (offset < data.length) {
    const index = hdus.length;
    const where = index === 0 ? 'primary HDU' : `HDU ${index}`;
    const cards: FitsHeaderCard[] = [];
    let pos = offset;
    let ended = false;
    while (!ended) {
      if (pos + FITS_BLOCK > data.length) truncated(file, `the header of ${where} has no END card before the end of the file`);
      for (let c = 0; c < FITS_BLOCK / CARD; c++) {
        const card = LATIN1.decode(data.subarray(pos + c * CARD, pos + (c + 1) * CARD));
        const key = card.slice(0, 8).trimEnd();
        if (key === 'END') {
          ended = true;
          break;
        }
        const prev = cards[cards.length - 1];
        if (card.slice(8, 10) === '= ' && key !== 'COMMENT' && key !== 'HISTORY' && key !== '') cards.push({ key, ...parseCardValue(card.slice(10)) });
        else if (key === 'CONTINUE' && prev && typeof prev.value === 'string' && prev.value.endsWith('&')) {
          // Long strings continued over cards (FITS Standard 4.0 §4.2.1.2): drop the '&' and append.
          const more = parseCardValue(card.slice(8));
          if (typeof more.value === 'string') prev.value = prev.value.slice(0, -1) + more.value;
        } else if (key !== '' || card.trim() !== '') cards.push({ key, comment: card.slice(8).trimEnd() });
      }
      pos += FITS_BLOCK;
    }
    const headerText = LATIN1.decode(data.subarray(offset, pos));
    const header = makeHeader(cards);
    const bitpix = header.num('BITPIX');
    if (bitpix === undefined) throw new UserError(`${where}: the header has no BITPIX card (FITS Standard 4.0 §4.4.1.1).`, { file });
    if (!SUPPORTED_BITPIX.includes(bitpix)) {
      throw new UserError(`${where}: BITPIX = ${bitpix} is not supported. This reader supports BITPIX 8, 16, 32, -32 and -64 (FITS Standard 4.0 Table 8); convert the file, for example to 32-bit floats (BITPIX = -32).`, { file, field: 'BITPIX' });
    }
    // Every value that moves the offset is range-checked before it is used: a negative NAXISn
    // would move the offset backwards and the walk would never end.
    const naxisN = wholeNumber(file, where, header, 'NAXIS', 0, 999, 0);
    const naxis: number[] = [];
    for (let k = 1; k <= naxisN; k++) naxis.push(wholeNumber(file, where, header, `NAXIS${k}`, 0, Number.MAX_SAFE_INTEGER, 0));
    const pcount = wholeNumber(file, where, header, 'PCOUNT', 0, Number.MAX_SAFE_INTEGER, 0);
    const gcount = wholeNumber(file, where, header, 'GCOUNT', 1, Number.MAX_SAFE_INTEGER, 1);
    const dataLength = naxisN === 0 ? 0 : (Math.abs(bitpix) / 8) * gcount * (pcount + naxis.reduce((a, b) => a * b, 1));
    if (!Number.isSafeInteger(dataLength)) {
      throw new UserError(`${where}: the header declares a data unit of ${naxis.join(' x ')} values, more bytes than any file holds (FITS Standard 4.0 §4.4.1); the file is damaged.`, { file, field: 'NAXIS' });
    }
    const padded = Math.ceil(dataLength / FITS_BLOCK) * FITS_BLOCK;
    if (pos + padded > data.length) truncated(file, `the data of ${where} need ${padded} bytes but only ${data.length - pos} remain`);
    callFitsjs(file, where, warnings, () => new (lib().astro.FITS.Header)(headerText));
    const xt = header.get('XTENSION');
    const kind: FitsHduInfo['kind'] = index === 0 ? 'primary' : xt === 'IMAGE' ? 'image' : xt === 'BINTABLE' ? 'bintable' : xt === 'TABLE' ? 'table' : 'other';
    const extname = header.get('EXTNAME');
    hdus.push({ index, kind, name: typeof extname === 'string' ? extname : undefined, bitpix, naxis, header, headerOffset: offset, dataOffset: pos, dataLength });
    offset = pos + padded;
  }
  return { file, bytes: data, hdus, warnings };
}

function dataBuffer(f: FitsFile, h: FitsHduInfo): ArrayBuffer {
  // A fresh copy: fitsjs swaps bytes in place.
  return f.bytes.slice(h.dataOffset, h.dataOffset + h.dataLength).buffer as ArrayBuffer;
}

function headerText(f: FitsFile, h: FitsHduInfo): string {
  return LATIN1.decode(f.bytes.subarray(h.headerOffset, h.dataOffset));
}

function hduLabel(h: FitsHduInfo): string {
  return h.index === 0 ? 'primary HDU' : `HDU ${h.index}${h.name ? ` (${h.name})` : ''}`;
}

export interface FitsImageRead {
  nx: number;
  ny: number;
  /** Physical values (BZERO + BSCALE * stored), NaN where BLANK or NaN. */
  data: Float64Array;
}

/** Decode a 2-D image HDU (degenerate axes beyond the second, of length 1, are allowed). */
export function readFitsImage(f: FitsFile, h: FitsHduInfo): FitsImageRead {
  if (h.naxis.length < 2 || h.naxis.slice(2).some((n) => n !== 1)) {
    throw new UserError(`${hduLabel(h)}: expected a 2-D image, found NAXIS = ${h.naxis.length} with axes ${h.naxis.join(' x ') || 'none'}.`, { file: f.file });
  }
  const [nx, ny] = h.naxis;
  const bscale = h.header.num('BSCALE') ?? 1;
  const bzero = h.header.num('BZERO') ?? 0;
  const blank = h.bitpix > 0 ? h.header.num('BLANK') : undefined;
  const out = new Float64Array(nx * ny);
  const buffer = dataBuffer(f, h);
  if (h.bitpix === -64) {
    const view = new DataView(buffer);
    const scaled = bzero !== 0 || bscale !== 1;
    for (let i = 0; i < out.length; i++) {
      const v = view.getFloat64(i * 8, false);
      // Unscaled values are copied as they are, so -0 and every bit survive.
      out[i] = scaled ? bzero + bscale * v : v;
    }
    return { nx, ny, data: out };
  }
  const fits = lib().astro.FITS;
  const raw = callFitsjs(f.file, hduLabel(h), [], () => {
    const hdr = new fits.Header(headerText(f, h));
    const img = new fits.Image(hdr, buffer);
    if (img.width !== nx || img.height !== ny) throw `fitsjs reads ${img.width} x ${img.height}, the header says ${nx} x ${ny}`;
    return img._getFrame(img.frameOffsets[0].buffers![0], h.bitpix, 0, 1);
  });
  const scaled = bzero !== 0 || bscale !== 1;
  for (let i = 0; i < out.length; i++) {
    const v = raw[i];
    out[i] = blank !== undefined && v === blank ? NaN : scaled ? bzero + bscale * v : v;
  }
  return { nx, ny, data: out };
}

export interface FitsTableColumn {
  name: string;
  unit?: string;
  /** Numbers (NaN or null for undefined values), strings or booleans, one per row; null throughout for a vector column. */
  values: (number | string | boolean | null)[];
  /** TFORM of a column with more than one element per row (not a scalar column). */
  vectorForm?: string;
}

/** Decode a binary-table HDU into columns. */
export function readFitsBinaryTable(f: FitsFile, h: FitsHduInfo): FitsTableColumn[] {
  const fits = lib().astro.FITS;
  const label = hduLabel(h);
  const nfields = h.header.num('TFIELDS') ?? 0;
  const names: string[] = [];
  for (let i = 1; i <= nfields; i++) {
    const n = h.header.get(`TTYPE${i}`);
    if (typeof n !== 'string' || n.trim() === '') throw new UserError(`${label}: column ${i} has no name (TTYPE${i}); name every column.`, { file: f.file, field: `TTYPE${i}` });
    if (names.includes(n)) throw new UserError(`${label}: two columns are named '${n}'; column names must differ.`, { file: f.file, field: `TTYPE${i}` });
    names.push(n);
  }
  const rows = callFitsjs(f.file, label, [], () => {
    const hdr = new fits.Header(headerText(f, h));
    const table = new fits.BinaryTable(hdr, dataBuffer(f, h));
    table.descriptors.forEach((d, i) => {
      if (d === 'K' && table.elementByteLengths[i] === 8) table.accessors[i] = (view, o) => [Number(view.getBigInt64(o, false)), o + 8];
    });
    return table.getRows(0, table.rows);
  });
  return names.map((name, i) => {
    const k = i + 1;
    const form = String(h.header.get(`TFORM${k}`) ?? '');
    const m = /^(\d*)([LXBIJKAEDCMPQ])/.exec(form.trim());
    const repeat = m && m[1] !== '' ? Number(m[1]) : 1;
    const code = m ? m[2] : '?';
    const tscal = h.header.num(`TSCAL${k}`) ?? 1;
    const tzero = h.header.num(`TZERO${k}`) ?? 0;
    const tnull = h.header.num(`TNULL${k}`);
    const unit = h.header.get(`TUNIT${k}`);
    const values = rows.map((row) => {
      const v = row[name];
      // A NUL ends a string (FITS Standard 4.0 §7.3.3.1: astropy pads with NULs); trailing blanks are not significant.
      if (code === 'A') return (typeof v === 'string' ? v : String(v ?? '')).split('\0')[0].trimEnd();
      if (code === 'L') return typeof v === 'boolean' ? v : null;
      if (repeat !== 1 || typeof v !== 'number') return null;
      if (tnull !== undefined && 'BIJK'.includes(code) && v === tnull) return null;
      return tzero + tscal * v;
    });
    const u = typeof unit === 'string' && unit.trim() !== '' ? unit.trim() : undefined;
    return repeat !== 1 && code !== 'A' ? { name, unit: u, values, vectorForm: form } : { name, unit: u, values };
  });
}
