/**
 * Pixel to RA/Dec for the sky images' axes against astropy.wcs (the
 * reference implementation of FITS WCS Papers I and II), on the demo map's
 * header and an invented one far from the equator; and headers this reader
 * refuses (rotated, another projection) with the reason.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { pixelToWorld, readTanWcs, type TanWcs } from '../../src/report/wcs.ts';
import { ASTROPY, needReference, PYTHON } from '../support/references.ts';

const HEADERS: Record<string, Record<string, string | number>> = {
  demo: { CTYPE1: 'RA---TAN', CTYPE2: 'DEC--TAN', CRPIX1: 16.5, CRPIX2: 16.5, CRVAL1: 150.25, CRVAL2: -7.5, CDELT1: -0.005555555555555556, CDELT2: 0.005555555555555556, CUNIT1: 'deg', CUNIT2: 'deg' },
  polar: { CTYPE1: 'RA---TAN', CTYPE2: 'DEC--TAN', CRPIX1: 50, CRPIX2: 40, CRVAL1: 10, CRVAL2: 78, CDELT1: -0.05, CDELT2: 0.05, CUNIT1: 'deg', CUNIT2: 'deg' },
};
const PIXELS: [number, number][] = [[0, 0], [31, 0], [0, 31], [15.5, 15.5], [99, 79], [7, 23]];

describe('TAN pixel to world', () => {
  it('agrees with astropy.wcs to 1e-9 deg', (t) => {
    needReference(t, ASTROPY);
    const script = String.raw`
import json, sys
from astropy.io import fits
from astropy.wcs import WCS
cases = json.loads(sys.argv[1]); pixels = json.loads(sys.argv[2]); out = {}
for name, cards in cases.items():
    h = fits.Header()
    for k, v in cards.items(): h[k] = v
    w = WCS(h)
    out[name] = [[float(v) for v in w.pixel_to_world_values(x, y)] for x, y in pixels]
print(json.dumps(out))
`;
    const r = spawnSync(PYTHON, ['-c', script, JSON.stringify(HEADERS), JSON.stringify(PIXELS)], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    const ref = JSON.parse(r.stdout) as Record<string, [number, number][]>;
    for (const [name, cards] of Object.entries(HEADERS)) {
      const w = readTanWcs(cards) as TanWcs;
      expect(typeof w).toBe('object');
      PIXELS.forEach(([x, y], i) => {
        const [ra, dec] = pixelToWorld(w, x, y);
        expect(Math.abs(ra - ref[name][i][0]), `${name} ${x},${y} RA`).toBeLessThan(1e-9);
        expect(Math.abs(dec - ref[name][i][1]), `${name} ${x},${y} Dec`).toBeLessThan(1e-9);
      });
    }
  });

  it('gives CRVAL at the reference pixel', () => {
    const w = readTanWcs(HEADERS.demo) as TanWcs;
    const [ra, dec] = pixelToWorld(w, 15.5, 15.5);
    expect(ra).toBeCloseTo(150.25, 12);
    expect(dec).toBeCloseTo(-7.5, 12);
  });

  it('refuses rotated headers and other projections, saying why', () => {
    expect(readTanWcs({ ...HEADERS.demo, PC1_2: 0.1 })).toMatch(/rotated \(PC1_2 = 0.1\)/);
    expect(readTanWcs({ ...HEADERS.demo, CTYPE1: 'GLON-CAR', CTYPE2: 'GLAT-CAR' })).toMatch(/not RA---TAN and DEC--TAN/);
  });
});
