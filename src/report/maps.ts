/**
 * FITS images of a map's fit results, one file per quantity, on the pixel
 * grid of the observed maps with their WCS keywords carried over, so the
 * images overlay the observations in any FITS viewer. The one writer of map
 * images: the fit stage writes every image (fit/map_<image>.fits) and the
 * report the five it shows (report/maps/<image>.fits), both through
 * `writeMapImage`.
 */
import type { MapFitJson, MapImageName } from '../fit/types.ts';
import type { MapGeometry } from '../obs/types.ts';
import { commentCards, writeFitsImages, type FitsCard, type FitsValue } from './fits.ts';

interface MapImageInfo {
  bunit: string;
  description: string;
}

/** Unit and meaning of every map image; units as FITS Standard 4.0 section 4.3 writes them (IAU style: `cm-3`). */
export const MAP_IMAGE_INFO: Record<MapImageName, MapImageInfo> = {
  best_density: { bunit: 'cm-3', description: 'Best-fit density n_H' },
  best_age_yr: { bunit: 'yr', description: 'Best-fit chemical age' },
  best_chi2: { bunit: '', description: 'Chi-square of the best fit' },
  reduced_chi2: { bunit: '', description: 'Chi-square of the best fit per degree of freedom' },
  p_value: { bunit: '', description: 'p-value of the best fit' },
  dof: { bunit: '', description: 'Degrees of freedom of the fit' },
  density_lo: { bunit: 'cm-3', description: 'Lower bound of the density interval' },
  density_hi: { bunit: 'cm-3', description: 'Upper bound of the density interval' },
  age_lo_yr: { bunit: 'yr', description: 'Lower bound of the age interval' },
  age_hi_yr: { bunit: 'yr', description: 'Upper bound of the age interval' },
  density_width_dex: { bunit: 'dex', description: 'Width log10(hi/lo) of the density interval' },
  age_width_dex: { bunit: 'dex', description: 'Width log10(hi/lo) of the age interval' },
  at_edge: { bunit: '', description: '1 where the density or age interval reaches the grid edge' },
  unresolved: { bunit: '', description: '1 where the density or age interval is narrower than the grid spacing' },
  density_subgrid: { bunit: 'cm-3', description: 'Sub-grid best density (interpolated profile)' },
  age_subgrid_yr: { bunit: 'yr', description: 'Sub-grid best age (interpolated profile)' },
  used_quantities: { bunit: '', description: 'Observed quantities used in the fit' },
};

/** The images the report writes, in this order. */
export const MAP_OUTPUTS: readonly MapImageName[] = ['best_age_yr', 'best_density', 'best_chi2', 'density_width_dex', 'age_width_dex'];

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

interface MapImage {
  name: MapImageName;
  /** One value per pixel, row-major (y * nx + x); NaN or null where the pixel has no fit. */
  values: ArrayLike<number | null>;
  nx: number;
  ny: number;
}

/** Write one map image as a FITS file: BUNIT, the observed map's cleaned WCS cards, what the pixels mean. */
function writeMapImage(file: string, image: MapImage, geometry: MapGeometry | undefined, warnings: string[]): void {
  if (geometry && (geometry.nx !== image.nx || geometry.ny !== image.ny)) {
    throw new Error(`map results are ${image.nx} x ${image.ny} pixels but the observed maps ${geometry.nx} x ${geometry.ny}`);
  }
  const info = MAP_IMAGE_INFO[image.name];
  const data = Float64Array.from({ length: image.values.length }, (_, i) => image.values[i] ?? Number.NaN);
  const header: FitsCard[] = [
    // Every image states its unit; a dimensionless one as the empty string, which FITS readers take as dimensionless (astropy: Unit('')).
    { key: 'BUNIT', value: info.bunit, comment: info.bunit ? 'unit of the pixel values' : 'dimensionless' },
    ...(geometry ? carriedCards(geometry.wcs, warnings) : []),
    { key: 'ORIGIN', value: 'hoarfrost', comment: 'written by' },
    ...commentCards(`${info.description} per pixel; NaN where the pixel has no fit.`),
  ];
  writeFitsImages(file, [{ name: image.name.toUpperCase(), data, nx: image.nx, ny: image.ny, header }]);
}

/**
 * Write the named images of a map, each to the file `fileOf` gives; notes on
 * the carried header cards are reported once, not once per image.
 */
export function writeMapImages(map: MapFitJson, geometry: MapGeometry | undefined, warnings: string[], names: readonly MapImageName[], fileOf: (name: MapImageName) => string): string[] {
  const files: string[] = [];
  const seen = new Set(warnings);
  for (const name of names) {
    const file = fileOf(name);
    const notes: string[] = [];
    writeMapImage(file, { name, values: map.images[name], nx: map.nx, ny: map.ny }, geometry, notes);
    for (const n of notes) {
      if (seen.has(n)) continue;
      seen.add(n);
      warnings.push(n);
    }
    files.push(file);
  }
  return files;
}
