/**
 * Observations from FITS: a binary-table extension read as a table (TTYPE
 * names, TUNIT units), or 2-D images read as a map set: one image per
 * quantity (column densities, their errors, A_V...), named by EXTNAME, all on
 * one pixel grid. The grid check compares NAXIS1/NAXIS2 and the WCS keywords
 * (FITS Standard 4.0 §8; Greisen & Calabretta 2002) of every image used; the
 * WCS cards are kept for the output maps. BLANK and NaN pixels are not
 * observed.
 */
import { UserError } from '../config/errors.ts';
import { readFits, readFitsBinaryTable, readFitsImage, type FitsFile, type FitsHduInfo } from './fits-read.ts';
import type { RawTable } from './table.ts';
import type { MapGeometry } from './types.ts';

/** WCS keywords that must agree between images of one map (Greisen & Calabretta 2002, Calabretta & Greisen 2002). */
const WCS_KEY = /^(WCSAXES|CRPIX\d|CRVAL\d|CDELT\d|CTYPE\d|CUNIT\d|CROTA\d|PC\d_\d|CD\d_\d|PV\d_\d+|LONPOLE|LATPOLE|RADESYS|RADECSYS|EQUINOX|EPOCH|MJD-OBS|DATE-OBS)$/;
/** Relative difference below which two real WCS values are the same (writers round differently in the last digits). */
const WCS_TOLERANCE = 1e-10;

function label(h: FitsHduInfo): string {
  return h.index === 0 ? `primary HDU${h.name ? ` (${h.name})` : ''}` : `HDU ${h.index}${h.name ? ` (${h.name})` : ''}`;
}

function wcsOf(h: FitsHduInfo): Record<string, string | number | boolean> {
  const out: Record<string, string | number | boolean> = {};
  for (const c of h.header.cards) if (c.value !== undefined && WCS_KEY.test(c.key) && !(c.key in out)) out[c.key] = c.value;
  return out;
}

function sameValue(a: string | number | boolean, b: string | number | boolean): boolean {
  if (typeof a === 'number' && typeof b === 'number') return a === b || Math.abs(a - b) <= WCS_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
  return typeof a === 'string' && typeof b === 'string' ? a.trim() === b.trim() : a === b;
}

export function readFitsObservations(file: string, hdu: string | number | undefined): RawTable {
  const f = readFits(file);
  const isImage = (h: FitsHduInfo) => (h.kind === 'primary' || h.kind === 'image') && h.naxis.length >= 2;
  if (hdu !== undefined) {
    // EXTNAME matches exactly, else ignoring case (astropy upper-cases EXTNAME when it writes).
    const h = typeof hdu === 'number' ? f.hdus[hdu] : f.hdus.find((x) => x.name === hdu) ?? f.hdus.find((x) => x.name?.toUpperCase() === hdu.toUpperCase());
    if (!h) throw new UserError(`the file has no HDU ${typeof hdu === 'number' ? `number ${hdu}` : `named '${hdu}'`}; it has ${f.hdus.map(label).join(', ')}.`, { file, field: 'hdu' });
    if (h.kind === 'bintable') return tableOf(f, h);
    if (!isImage(h)) throw new UserError(`${label(h)} is neither a binary table nor a 2-D image.`, { file, field: 'hdu' });
  }
  const images = f.hdus.filter(isImage);
  const tables = f.hdus.filter((h) => h.kind === 'bintable');
  if (images.length === 0) {
    if (tables.length === 0) {
      const ascii = f.hdus.some((h) => h.kind === 'table');
      throw new UserError(`the FITS file holds neither a binary table nor 2-D images to read observations from${ascii ? ' (ASCII TABLE extensions are not read: save the table as a BINTABLE)' : ''}.`, { file });
    }
    const t = tableOf(f, tables[0]);
    if (tables.length > 1) t.warnings!.push(`${file}: ${tables.length} binary tables; only ${label(tables[0])} is read (choose another with 'hdu').`);
    return t;
  }
  const m = mapOf(f, images);
  if (tables.length > 0) m.warnings!.push(`${file}: the binary table${tables.length > 1 ? 's' : ''} ${tables.map(label).join(', ')} ${tables.length > 1 ? 'are' : 'is'} not read; the images are read as a map (set 'hdu' to read a table).`);
  return m;
}

function tableOf(f: FitsFile, h: FitsHduInfo): RawTable {
  const cols = readFitsBinaryTable(f, h);
  const nrows = h.naxis[1] ?? 0;
  const file = f.file;
  return {
    file,
    format: 'fits',
    columns: cols.map((c) => ({ name: c.name, unit: c.unit, values: c.values, vectorForm: c.vectorForm })),
    nrows,
    declaredUnits: true,
    place: (i) => ({ text: `row ${i + 1}`, loc: { file, row: i + 1 }, source: { file, row: i + 1 } }),
    warnings: [...f.warnings],
  };
}

function mapOf(f: FitsFile, images: FitsHduInfo[]): RawTable {
  const file = f.file;
  const unnamed = images.filter((h) => !h.name);
  if (unnamed.length > 0 && images.length > 1) {
    throw new UserError(`${unnamed.map(label).join(', ')} ${unnamed.length > 1 ? 'have' : 'has'} no EXTNAME. Each image of a map set is named by its EXTNAME (for example 'N(H2O(s))', 'N(H2O(s))_err', 'AV').`, { file, field: 'EXTNAME' });
  }
  const seen = new Map<string, FitsHduInfo>();
  for (const h of images) {
    const name = h.name ?? 'PRIMARY';
    if (seen.has(name)) throw new UserError(`${label(seen.get(name)!)} and ${label(h)} have the same EXTNAME '${name}'; name each image once.`, { file, field: 'EXTNAME' });
    seen.set(name, h);
  }
  const ref = images[0];
  const [nx, ny] = ref.naxis;
  const problems: string[] = [];
  const refWcs = wcsOf(ref);
  for (const h of images.slice(1)) {
    const [hx, hy] = h.naxis;
    if (hx !== nx || hy !== ny || h.naxis.slice(2).some((n) => n !== 1)) {
      problems.push(`${label(h)} is ${h.naxis.join(' x ')} pixels but ${label(ref)} is ${nx} x ${ny}`);
      continue;
    }
    const w = wcsOf(h);
    for (const k of new Set([...Object.keys(refWcs), ...Object.keys(w)])) {
      if (k === 'DATE-OBS' || k === 'MJD-OBS') continue;
      if (!(k in w) || !(k in refWcs)) {
        if (Object.keys(w).length > 0 && Object.keys(refWcs).length > 0) problems.push(`${label(h)} ${k in w ? 'has' : 'lacks'} the WCS keyword ${k} that ${label(ref)} ${k in w ? 'lacks' : 'has'}`);
      } else if (!sameValue(w[k], refWcs[k])) problems.push(`${label(h)} has ${k} = ${w[k]} but ${label(ref)} has ${k} = ${refWcs[k]}`);
    }
  }
  if (problems.length > 0) {
    throw new UserError(`the images of the map are not on one pixel grid:\n  - ${problems.join('\n  - ')}\nRegrid the images onto one grid (same NAXIS1, NAXIS2 and WCS) before reading them together.`, { file });
  }
  const warnings = [...f.warnings];
  const noWcs = images.filter((h) => Object.keys(wcsOf(h)).length === 0);
  if (noWcs.length > 0 && noWcs.length < images.length) warnings.push(`${file}: ${noWcs.map(label).join(', ')} carr${noWcs.length > 1 ? 'y' : 'ies'} no WCS keywords; taken to share the grid of the others.`);
  const wcsSource = images.find((h) => Object.keys(wcsOf(h)).length > 0) ?? ref;
  const geometry: MapGeometry = { nx, ny, wcs: wcsOf(wcsSource) };
  const columns = images.map((h) => {
    const bunit = h.header.get('BUNIT');
    return { name: h.name ?? 'PRIMARY', unit: typeof bunit === 'string' && bunit.trim() !== '' ? bunit.trim() : undefined, values: readFitsImage(f, h).data };
  });
  return {
    file,
    format: 'fits',
    columns,
    nrows: nx * ny,
    declaredUnits: true,
    map: geometry,
    place: (i) => {
      const x = i % nx;
      const y = Math.floor(i / nx);
      return { text: `pixel (${x}, ${y})`, loc: { file }, source: { file }, pixel: { x, y } };
    },
    warnings,
  };
}
