/**
 * FITS writer: a primary image HDU, image extensions and binary-table
 * extensions, following the FITS Standard 4.0 (IAU FITS Working Group, 2016):
 * 80-character ASCII header cards (§4.1), fixed-format values (§4.2),
 * mandatory keywords in their order (§4.4.1, §7.1, §7.3), headers and data
 * padded to 2880-byte blocks (§3.1, §3.3.2), big-endian two's-complement
 * integers and IEEE-754 floats (§5). What it writes is what the maps of a
 * report need; it reads nothing.
 */
import { mkdirSync } from 'node:fs';
import { writeOutput } from '../config/write.ts';
import { dirname } from 'node:path';

/** Bytes in a FITS logical record (FITS Standard 4.0 §3.1). */
export const FITS_BLOCK = 2880;
/** Characters in a header card (§4.1). */
export const FITS_CARD = 80;
/** Longest string value that fits one card: 80 - 10 (keyword and `= `) - 2 quotes. */
const MAX_STRING_CHARS = 68;
/** Fixed-format values end at column 30 (§4.2.1). */
const FIXED_VALUE_END = 30;

export type FitsValue = string | number | boolean | bigint;
export interface FitsCard {
  key: string;
  /** Absent for COMMENT, HISTORY and blank-keyword cards. */
  value?: FitsValue;
  comment?: string;
}
/** Header cards in order, or a keyword -> value record (written in insertion order). */
export type FitsHeaderInput = readonly FitsCard[] | Readonly<Record<string, FitsValue>>;

export type FitsImageData = Float64Array | Float32Array | Int32Array | Int16Array | Uint8Array;
export interface FitsImage {
  /** EXTNAME of the HDU. */
  name?: string;
  /** Pixels in FITS order: x (NAXIS1) varies fastest, data[y * nx + x]. */
  data: FitsImageData;
  nx: number;
  ny: number;
  /** Extra cards (WCS, BUNIT, OBJECT, COMMENT...). Structural keywords are written by the writer and refused here. */
  header?: FitsHeaderInput;
  /** Integer images only: physical = BZERO + BSCALE * stored; BLANK marks undefined pixels (§5.3, §4.4.2.5). */
  bscale?: number;
  bzero?: number;
  blank?: number;
}

export type FitsColumnData = Float64Array | Float32Array | Int32Array | Int16Array | Uint8Array | BigInt64Array | readonly string[] | readonly boolean[];
export interface FitsColumn {
  name: string;
  data: FitsColumnData;
  unit?: string;
  /** TNULL for integer columns. */
  nullValue?: number;
}
export interface FitsTable {
  name?: string;
  columns: readonly FitsColumn[];
  header?: FitsHeaderInput;
}

export type FitsHdu = ({ type: 'image' } & FitsImage) | ({ type: 'table' } & FitsTable);

/** Keywords the writer sets itself (§4.4.1, §7.2, §7.3) and that callers may not pass. */
const STRUCTURAL = /^(SIMPLE|XTENSION|BITPIX|NAXIS\d*|EXTEND|PCOUNT|GCOUNT|TFIELDS|TFORM\d+|TTYPE\d+|TUNIT\d+|TNULL\d+|BSCALE|BZERO|BLANK|EXTNAME|END)$/;
const KEYWORD = /^[A-Z0-9_-]{1,8}$/;
const COMMENTARY = new Set(['COMMENT', 'HISTORY', '']);

function fail(msg: string): never {
  throw new Error(`FITS writer: ${msg}`);
}

function checkText(text: string, what: string): void {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 32 || c > 126) fail(`${what} contains a character outside printable ASCII (FITS Standard 4.0 §4.1.2.1): ${JSON.stringify(text)}`);
  }
}

/** A real number in the shortest form that reads back to the same double (§4.2.4: exponent letter E). */
export function formatFitsNumber(x: number): string {
  if (!Number.isFinite(x)) fail(`header values must be finite numbers, found ${x} (FITS Standard 4.0 §4.2.4)`);
  if (Number.isInteger(x) && Math.abs(x) < 1e16) return Object.is(x, -0) ? '-0.0' : String(x);
  let s = String(x).toUpperCase();
  if (!/[.E]/.test(s)) s += '.0';
  return s;
}

function formatValue(value: FitsValue): { text: string; fixed: boolean } {
  if (typeof value === 'boolean') return { text: value ? 'T' : 'F', fixed: true };
  if (typeof value === 'bigint') return { text: value.toString(), fixed: true };
  if (typeof value === 'number') return { text: formatFitsNumber(value), fixed: true };
  checkText(value, 'a string value');
  const escaped = value.replace(/'/g, "''");
  if (escaped.length > MAX_STRING_CHARS) fail(`string value longer than ${MAX_STRING_CHARS} characters: ${JSON.stringify(value)}`);
  // §4.2.1.1: at least 8 characters between the quotes for fixed-format readers.
  return { text: `'${escaped.padEnd(8, ' ')}'`, fixed: false };
}

/** One 80-character header card. */
export function formatCard(card: FitsCard): string {
  const key = card.key;
  if (key !== '' && !KEYWORD.test(key)) fail(`keyword '${key}' is not 1-8 characters of A-Z, 0-9, '-' and '_' (FITS Standard 4.0 §4.1.2.1)`);
  if (card.value === undefined) {
    const text = card.comment ?? '';
    checkText(text, 'a comment');
    if (!COMMENTARY.has(key)) fail(`keyword '${key}' has no value; only COMMENT, HISTORY and blank keywords may go without one`);
    if (text.length > FITS_CARD - 8) fail(`commentary text longer than ${FITS_CARD - 8} characters; split it over several cards`);
    return (key.padEnd(8, ' ') + text).padEnd(FITS_CARD, ' ');
  }
  const { text, fixed } = formatValue(card.value);
  let body = key.padEnd(8, ' ') + '= ';
  body += fixed && text.length <= FIXED_VALUE_END - 10 ? text.padStart(FIXED_VALUE_END - 10, ' ') : text;
  if (body.length > FITS_CARD) fail(`value of '${key}' does not fit one card`);
  if (card.comment) {
    checkText(card.comment, 'a comment');
    const room = FITS_CARD - body.length - 3;
    if (room > 0) body += ' / ' + card.comment.slice(0, room);
  }
  return body.padEnd(FITS_CARD, ' ');
}

/** Commentary text split into as many COMMENT (or HISTORY) cards as it needs. */
export function commentCards(text: string, key: 'COMMENT' | 'HISTORY' = 'COMMENT'): FitsCard[] {
  const width = FITS_CARD - 8;
  const cards: FitsCard[] = [];
  for (let i = 0; i < text.length || i === 0; i += width) cards.push({ key, comment: text.slice(i, i + width) });
  return cards;
}

function headerCards(input: FitsHeaderInput | undefined): FitsCard[] {
  if (!input) return [];
  const cards: FitsCard[] = Array.isArray(input) ? [...(input as readonly FitsCard[])] : Object.entries(input as Record<string, FitsValue>).map(([key, value]) => ({ key, value }));
  for (const c of cards) if (STRUCTURAL.test(c.key)) fail(`keyword '${c.key}' is set by the writer from the data; leave it out of the header`);
  return cards;
}

function headerBytes(cards: readonly FitsCard[]): Uint8Array {
  const text = cards.map(formatCard).join('') + 'END'.padEnd(FITS_CARD, ' ');
  const size = Math.ceil(text.length / FITS_BLOCK) * FITS_BLOCK;
  const out = new Uint8Array(size).fill(0x20); // headers pad with ASCII spaces (§4.4.1)
  for (let i = 0; i < text.length; i++) out[i] = text.charCodeAt(i);
  return out;
}

function padData(bytes: Uint8Array): Uint8Array {
  const size = Math.ceil(bytes.length / FITS_BLOCK) * FITS_BLOCK;
  if (size === bytes.length) return bytes;
  const out = new Uint8Array(size); // data pad with zeros (§3.3.2)
  out.set(bytes);
  return out;
}

function bitpixOf(data: FitsImageData): number {
  if (data instanceof Float64Array) return -64;
  if (data instanceof Float32Array) return -32;
  if (data instanceof Int32Array) return 32;
  if (data instanceof Int16Array) return 16;
  if (data instanceof Uint8Array) return 8;
  return fail('image data must be a Float64Array, Float32Array, Int32Array, Int16Array or Uint8Array');
}

function imageBytes(data: FitsImageData, bitpix: number): Uint8Array {
  const bytes = new Uint8Array(data.length * (Math.abs(bitpix) / 8));
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < data.length; i++) {
    const v = data[i];
    switch (bitpix) {
      case -64: view.setFloat64(i * 8, v, false); break;
      case -32: view.setFloat32(i * 4, v, false); break;
      case 32: view.setInt32(i * 4, v, false); break;
      case 16: view.setInt16(i * 2, v, false); break;
      default: view.setUint8(i, v);
    }
  }
  return bytes;
}

function encodeImage(img: FitsImage, primary: boolean, moreFollow: boolean): Uint8Array[] {
  if (!Number.isInteger(img.nx) || !Number.isInteger(img.ny) || img.nx < 1 || img.ny < 1) fail(`image '${img.name ?? ''}' needs positive integer nx, ny`);
  if (img.data.length !== img.nx * img.ny) fail(`image '${img.name ?? ''}' has ${img.data.length} pixels, expected nx * ny = ${img.nx * img.ny}`);
  const bitpix = bitpixOf(img.data);
  if (bitpix < 0 && (img.bscale !== undefined || img.bzero !== undefined || img.blank !== undefined)) fail('BSCALE, BZERO and BLANK are for integer images; floating-point images mark undefined pixels with NaN (§4.4.2.5)');
  const cards: FitsCard[] = primary
    ? [{ key: 'SIMPLE', value: true, comment: 'conforms to FITS Standard 4.0' }]
    : [{ key: 'XTENSION', value: 'IMAGE', comment: 'image extension' }];
  cards.push({ key: 'BITPIX', value: bitpix }, { key: 'NAXIS', value: 2 }, { key: 'NAXIS1', value: img.nx }, { key: 'NAXIS2', value: img.ny });
  if (primary) {
    if (moreFollow) cards.push({ key: 'EXTEND', value: true, comment: 'extensions may follow' });
  } else cards.push({ key: 'PCOUNT', value: 0 }, { key: 'GCOUNT', value: 1 });
  if (img.name !== undefined) cards.push({ key: 'EXTNAME', value: img.name });
  if (img.bscale !== undefined) cards.push({ key: 'BSCALE', value: img.bscale });
  if (img.bzero !== undefined) cards.push({ key: 'BZERO', value: img.bzero });
  if (img.blank !== undefined) cards.push({ key: 'BLANK', value: img.blank });
  cards.push(...headerCards(img.header));
  return [headerBytes(cards), padData(imageBytes(img.data, bitpix))];
}

interface ColumnLayout {
  form: string;
  width: number;
  write(view: DataView, offset: number, row: number): void;
}

function columnLayout(col: FitsColumn, nrows: number): ColumnLayout {
  const d = col.data;
  if (d.length !== nrows) fail(`column '${col.name}' has ${d.length} rows, expected ${nrows}`);
  if (d instanceof Float64Array) return { form: 'D', width: 8, write: (v, o, r) => v.setFloat64(o, d[r], false) };
  if (d instanceof Float32Array) return { form: 'E', width: 4, write: (v, o, r) => v.setFloat32(o, d[r], false) };
  if (d instanceof BigInt64Array) return { form: 'K', width: 8, write: (v, o, r) => v.setBigInt64(o, d[r], false) };
  if (d instanceof Int32Array) return { form: 'J', width: 4, write: (v, o, r) => v.setInt32(o, d[r], false) };
  if (d instanceof Int16Array) return { form: 'I', width: 2, write: (v, o, r) => v.setInt16(o, d[r], false) };
  if (d instanceof Uint8Array) return { form: 'B', width: 1, write: (v, o, r) => v.setUint8(o, d[r]) };
  const arr = d as readonly (string | boolean)[];
  if (arr.every((x) => typeof x === 'boolean')) {
    return { form: 'L', width: 1, write: (v, o, r) => v.setUint8(o, (arr[r] as boolean) ? 0x54 : 0x46) }; // 'T' / 'F' (§7.3.3.1)
  }
  if (!arr.every((x) => typeof x === 'string')) fail(`column '${col.name}' mixes strings and other values`);
  const strings = arr as readonly string[];
  for (const s of strings) checkText(s, `column '${col.name}'`);
  const width = Math.max(1, ...strings.map((s) => s.length));
  return {
    form: `${width}A`,
    width,
    write: (v, o, r) => {
      const s = strings[r];
      for (let i = 0; i < width; i++) v.setUint8(o + i, i < s.length ? s.charCodeAt(i) : 0x20);
    },
  };
}

function encodeTable(table: FitsTable): Uint8Array[] {
  const nrows = table.columns.length > 0 ? table.columns[0].data.length : 0;
  const layouts = table.columns.map((c) => columnLayout(c, nrows));
  const rowBytes = layouts.reduce((s, l) => s + l.width, 0);
  const cards: FitsCard[] = [
    { key: 'XTENSION', value: 'BINTABLE', comment: 'binary table extension' },
    { key: 'BITPIX', value: 8 },
    { key: 'NAXIS', value: 2 },
    { key: 'NAXIS1', value: rowBytes, comment: 'bytes per row' },
    { key: 'NAXIS2', value: nrows, comment: 'rows' },
    { key: 'PCOUNT', value: 0 },
    { key: 'GCOUNT', value: 1 },
    { key: 'TFIELDS', value: table.columns.length },
  ];
  table.columns.forEach((c, i) => {
    cards.push({ key: `TTYPE${i + 1}`, value: c.name }, { key: `TFORM${i + 1}`, value: layouts[i].form });
    if (c.unit !== undefined) cards.push({ key: `TUNIT${i + 1}`, value: c.unit });
    if (c.nullValue !== undefined) {
      if (!['J', 'I', 'B', 'K'].includes(layouts[i].form)) fail(`TNULL is for integer columns; column '${c.name}' is ${layouts[i].form}`);
      cards.push({ key: `TNULL${i + 1}`, value: c.nullValue });
    }
  });
  if (table.name !== undefined) cards.push({ key: 'EXTNAME', value: table.name });
  cards.push(...headerCards(table.header));
  const data = new Uint8Array(rowBytes * nrows);
  const view = new DataView(data.buffer);
  for (let r = 0; r < nrows; r++) {
    let o = r * rowBytes;
    for (const l of layouts) {
      l.write(view, o, r);
      o += l.width;
    }
  }
  return [headerBytes(cards), padData(data)];
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

/**
 * Encode HDUs into one FITS file. An image first becomes the primary HDU; a
 * table first gets an empty primary HDU before it (a binary table may only be
 * an extension, §7.3). `primaryHeader` adds cards to that empty primary.
 */
export function encodeFits(hdus: readonly FitsHdu[], primaryHeader?: FitsHeaderInput): Uint8Array {
  if (hdus.length === 0) fail('nothing to write');
  const parts: Uint8Array[] = [];
  let rest = hdus;
  if (hdus[0].type === 'image') {
    parts.push(...encodeImage(hdus[0], true, hdus.length > 1));
    rest = hdus.slice(1);
  } else {
    parts.push(headerBytes([
      { key: 'SIMPLE', value: true, comment: 'conforms to FITS Standard 4.0' },
      { key: 'BITPIX', value: 8 },
      { key: 'NAXIS', value: 0 },
      { key: 'EXTEND', value: true, comment: 'extensions follow' },
      ...headerCards(primaryHeader),
    ]));
  }
  for (const h of rest) parts.push(...(h.type === 'image' ? encodeImage(h, false, false) : encodeTable(h)));
  return concat(parts);
}

function writeAtomic(file: string, bytes: Uint8Array): void {
  mkdirSync(dirname(file), { recursive: true });
  writeOutput(file, bytes);
}

/** Write images: the first as the primary HDU, the others as IMAGE extensions. */
export function writeFitsImages(file: string, images: readonly FitsImage[]): void {
  writeAtomic(file, encodeFits(images.map((i) => ({ type: 'image' as const, ...i }))));
}

/** Write one or more binary tables as BINTABLE extensions after an empty primary HDU. */
export function writeFitsTable(file: string, tables: FitsTable | readonly FitsTable[], primaryHeader?: FitsHeaderInput): void {
  const list = Array.isArray(tables) ? (tables as readonly FitsTable[]) : [tables as FitsTable];
  writeAtomic(file, encodeFits(list.map((t) => ({ type: 'table' as const, ...t })), primaryHeader));
}

/** Write any mix of images and tables. */
export function writeFits(file: string, hdus: readonly FitsHdu[], primaryHeader?: FitsHeaderInput): void {
  writeAtomic(file, encodeFits(hdus, primaryHeader));
}
