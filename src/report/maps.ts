/**
 * FITS images of a map's fit results, one file per quantity, on the pixel
 * grid of the observed maps with their WCS keywords carried over, so the
 * images overlay the observations in any FITS viewer.
 */
import type { MapFitJson, MapImageName } from '../fit/types.ts';
import type { MapGeometry } from '../obs/types.ts';
import { commentCards, writeFitsImages, type FitsCard, type FitsValue } from './fits.ts';
import { outputPath } from './paths.ts';

interface MapOutput {
  image: MapImageName;
  bunit: string;
  description: string;
}

/** Units as FITS Standard 4.0 section 4.3 writes them (IAU style: `cm-3`). */
export const MAP_OUTPUTS: MapOutput[] = [
  { image: 'best_age_yr', bunit: 'yr', description: 'Best-fit chemical age' },
  { image: 'best_density', bunit: 'cm-3', description: 'Best-fit density n_H' },
  { image: 'best_chi2', bunit: '', description: 'Chi-square of the best fit' },
  { image: 'density_width_dex', bunit: 'dex', description: 'Width log10(hi/lo) of the density interval' },
  { image: 'age_width_dex', bunit: 'dex', description: 'Width log10(hi/lo) of the age interval' },
];

/** Keywords the writer sets itself, or that describe the input data rather than ours: not carried over. */
const NOT_CARRIED = /^(SIMPLE|XTENSION|BITPIX|NAXIS\d*|EXTEND|PCOUNT|GCOUNT|TFIELDS|TFORM\d+|TTYPE\d+|TUNIT\d+|TNULL\d+|BSCALE|BZERO|BLANK|EXTNAME|END|BUNIT|DATAMIN|DATAMAX|CHECKSUM|DATASUM|COMMENT|HISTORY)$/;
const KEYWORD = /^[A-Z0-9_-]{1,8}$/;
/** Longest string value of one card (FITS Standard 4.0 section 4.2.1). */
const MAX_STRING_CHARS = 68;

/**
 * The observed header's cards fit to copy: valid keywords, values made
 * printable ASCII (the only characters a FITS header may hold) and short
 * enough for one card. Changed or dropped cards are reported.
 */
export function carriedCards(wcs: MapGeometry['wcs'], warnings: string[]): FitsCard[] {
  const cards: FitsCard[] = [];
  for (const [key, value] of Object.entries(wcs)) {
    if (NOT_CARRIED.test(key)) continue;
    if (!KEYWORD.test(key)) {
      warnings.push(`map FITS outputs: header keyword ${JSON.stringify(key)} of the observations is not a valid FITS keyword; not copied.`);
      continue;
    }
    let v: FitsValue = value;
    if (typeof value === 'string') {
      const clean = value.replace(/[^\x20-\x7e]/g, '?').slice(0, MAX_STRING_CHARS);
      if (clean !== value) warnings.push(`map FITS outputs: the value of ${key} was shortened or had characters outside printable ASCII replaced by '?'.`);
      v = clean;
    } else if (typeof value === 'number' && !Number.isFinite(value)) {
      warnings.push(`map FITS outputs: ${key} is not a finite number; not copied.`);
      continue;
    }
    cards.push({ key, value: v });
  }
  return cards;
}

/** Write one FITS image per map output into `dir`; NaN marks pixels without a fit. */
export function writeMapImages(dir: string, map: MapFitJson, geometry: MapGeometry | undefined, warnings: string[]): string[] {
  const wcs = geometry ? carriedCards(geometry.wcs, warnings) : [];
  if (geometry && (geometry.nx !== map.nx || geometry.ny !== map.ny)) {
    throw new Error(`map results are ${map.nx} x ${map.ny} pixels but the observed maps ${geometry.nx} x ${geometry.ny}`);
  }
  const files: string[] = [];
  for (const out of MAP_OUTPUTS) {
    const values = map.images[out.image];
    const data = Float64Array.from(values, (v) => (v === null ? Number.NaN : v));
    const header: FitsCard[] = [
      ...(out.bunit ? [{ key: 'BUNIT', value: out.bunit, comment: 'unit of the pixel values' }] : []),
      ...wcs,
      { key: 'ORIGIN', value: 'hoarfrost', comment: 'written by' },
      ...commentCards(`${out.description} per pixel; NaN where the pixel has no fit.`),
    ];
    const file = outputPath(dir, `${out.image}.fits`);
    writeFitsImages(file, [{ data, nx: map.nx, ny: map.ny, header }]);
    files.push(file);
  }
  return files;
}
