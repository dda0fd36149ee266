/**
 * Writes frostmere-map.fits: an invented demonstration map set of the
 * invented dark cloud "Frostmere" (no such cloud exists; do not cite). One
 * image per quantity, named by EXTNAME after hoarfrost's naming convention:
 * AV and AV_err (mag), N(H2O(s)) and N(CO(s)) with their _err images (cm-2),
 * and l_N(CO(s)), a limit flag (1 = upper limit) where CO ice is not
 * detected. Pixels off the cloud are NaN (not observed).
 *
 *   npx tsx pipelines/examples/make-frostmere-map.ts
 */
import { fileURLToPath } from 'node:url';
import { writeFitsImages, commentCards, type FitsCard } from '../../src/report/fits.ts';

const NX = 24;
const NY = 20;
/** Invented cloud profile: peak A_V, background A_V, core width in pixels. */
const PEAK_AV = 26;
const BACKGROUND_AV = 2;
const CORE_SIGMA_PX = 5;
/** Pixels with A_V below this have no ice measurement; CO ice is a limit below CO_LIMIT_AV. */
const OBSERVED_AV = 4;
const CO_LIMIT_AV = 9;

const wcs: FitsCard[] = [
  { key: 'WCSAXES', value: 2 },
  { key: 'CTYPE1', value: 'RA---TAN' },
  { key: 'CTYPE2', value: 'DEC--TAN' },
  { key: 'CRPIX1', value: 12.5 },
  { key: 'CRPIX2', value: 10.5 },
  { key: 'CRVAL1', value: 70.15 },
  { key: 'CRVAL2', value: 25.82 },
  { key: 'CDELT1', value: -0.0025 },
  { key: 'CDELT2', value: 0.0025 },
  { key: 'CUNIT1', value: 'deg' },
  { key: 'CUNIT2', value: 'deg' },
  { key: 'RADESYS', value: 'ICRS' },
  { key: 'OBJECT', value: 'Frostmere (invented)' },
  ...commentCards('Invented demonstration data for hoarfrost: the cloud does not exist.'),
];

const n = NX * NY;
const av = new Float64Array(n);
const avErr = new Float64Array(n);
const h2o = new Float64Array(n);
const h2oErr = new Float64Array(n);
const co = new Float64Array(n);
const coErr = new Float64Array(n);
const coFlag = new Float64Array(n);
for (let y = 0; y < NY; y++) {
  for (let x = 0; x < NX; x++) {
    const i = y * NX + x;
    const r2 = (x - 11.5) ** 2 + ((y - 9.5) * 1.3) ** 2;
    const a = BACKGROUND_AV + PEAK_AV * Math.exp(-r2 / (2 * CORE_SIGMA_PX ** 2));
    // Round to what an observer would tabulate.
    av[i] = Math.round(a * 100) / 100;
    avErr[i] = Math.round((0.3 + 0.05 * a) * 100) / 100;
    if (a < OBSERVED_AV) {
      h2o[i] = h2oErr[i] = co[i] = coErr[i] = coFlag[i] = NaN;
      continue;
    }
    h2o[i] = Number((1.0e17 * (a - 3.2)).toPrecision(3));
    h2oErr[i] = Number((0.08 * h2o[i] + 3e16).toPrecision(2));
    if (a < CO_LIMIT_AV) {
      co[i] = 8e16;
      coErr[i] = NaN;
      coFlag[i] = 1;
    } else {
      co[i] = Number((0.045e17 * (a - 6) ** 1.2).toPrecision(3));
      coErr[i] = Number((0.12 * co[i] + 4e16).toPrecision(2));
      coFlag[i] = 0;
    }
  }
}

const unit = (u: string): FitsCard[] => [{ key: 'BUNIT', value: u }, ...wcs];
const out = fileURLToPath(new URL('./frostmere-map.fits', import.meta.url));
writeFitsImages(out, [
  { name: 'AV', data: av, nx: NX, ny: NY, header: unit('mag') },
  { name: 'AV_err', data: avErr, nx: NX, ny: NY, header: unit('mag') },
  { name: 'N(H2O(s))', data: h2o, nx: NX, ny: NY, header: unit('cm-2') },
  { name: 'N(H2O(s))_err', data: h2oErr, nx: NX, ny: NY, header: unit('cm-2') },
  { name: 'N(CO(s))', data: co, nx: NX, ny: NY, header: unit('cm-2') },
  { name: 'N(CO(s))_err', data: coErr, nx: NX, ny: NY, header: unit('cm-2') },
  { name: 'l_N(CO(s))', data: coFlag, nx: NX, ny: NY, header: [...wcs] },
]);
process.stdout.write(`wrote ${out}\n`);
