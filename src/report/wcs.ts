/**
 * World coordinates of map pixels from the observed maps' FITS header, for
 * the axes of sky images: the gnomonic (TAN) projection with a diagonal
 * pixel scale (CDELTi, no rotation), as FITS WCS Paper II defines it
 * (Calabretta & Greisen 2002, A&A 395, 1077: section 5.1.3, TAN, and
 * eq. 2, native to celestial spherical coordinates with the default
 * LONPOLE of 180 deg). Headers with a rotation (CROTA2, PC or CD matrices
 * with off-diagonal terms) or another projection are not read here: the
 * images then keep pixel axes.
 */

export interface TanWcs {
  crpix: [number, number];
  crval: [number, number];
  cdelt: [number, number];
}

const DEG = Math.PI / 180;

function num(wcs: Record<string, string | number | boolean>, key: string): number | undefined {
  const v = wcs[key];
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

/** The header's TAN WCS in RA and Dec, or why it cannot be used. */
export function readTanWcs(wcs: Record<string, string | number | boolean>): TanWcs | string {
  const c1 = String(wcs.CTYPE1 ?? '');
  const c2 = String(wcs.CTYPE2 ?? '');
  if (c1 !== 'RA---TAN' || c2 !== 'DEC--TAN') return `the map's axes are ${c1 || 'unnamed'} and ${c2 || 'unnamed'}, not RA---TAN and DEC--TAN`;
  for (const k of ['PC1_2', 'PC2_1', 'CD1_2', 'CD2_1', 'CROTA2']) {
    const v = num(wcs, k);
    if (v !== undefined && v !== 0) return `the map's WCS is rotated (${k} = ${v})`;
  }
  const cd1 = num(wcs, 'CD1_1');
  const cd2 = num(wcs, 'CD2_2');
  const cdelt: [number, number] | undefined = num(wcs, 'CDELT1') !== undefined && num(wcs, 'CDELT2') !== undefined ? [num(wcs, 'CDELT1')! * (num(wcs, 'PC1_1') ?? 1), num(wcs, 'CDELT2')! * (num(wcs, 'PC2_2') ?? 1)] : cd1 !== undefined && cd2 !== undefined ? [cd1, cd2] : undefined;
  const crpix = [num(wcs, 'CRPIX1'), num(wcs, 'CRPIX2')];
  const crval = [num(wcs, 'CRVAL1'), num(wcs, 'CRVAL2')];
  if (!cdelt || crpix.includes(undefined) || crval.includes(undefined)) return "the map's header lacks CRPIX, CRVAL or a pixel scale";
  const unit = [wcs.CUNIT1, wcs.CUNIT2].filter((u) => u !== undefined && String(u).trim() !== 'deg');
  if (unit.length > 0) return `the map's axes are in ${unit.join(', ')}, not degrees`;
  return { crpix: crpix as [number, number], crval: crval as [number, number], cdelt };
}

/** RA and Dec (deg) of a 0-based pixel position (FITS pixel p = x + 1). */
export function pixelToWorld(w: TanWcs, x: number, y: number): [number, number] {
  // Intermediate world coordinates (deg), then native spherical coordinates of TAN.
  const ix = w.cdelt[0] * (x + 1 - w.crpix[0]);
  const iy = w.cdelt[1] * (y + 1 - w.crpix[1]);
  const r = Math.hypot(ix, iy);
  const phi = Math.atan2(ix, -iy);
  const theta = r === 0 ? Math.PI / 2 : Math.atan(180 / (Math.PI * r));
  const dp = w.crval[1] * DEG;
  const dphi = phi - Math.PI; // phi_p = 180 deg
  const sinDec = Math.sin(theta) * Math.sin(dp) + Math.cos(theta) * Math.cos(dp) * Math.cos(dphi);
  const ra = w.crval[0] + Math.atan2(-Math.cos(theta) * Math.sin(dphi), Math.sin(theta) * Math.cos(dp) - Math.cos(theta) * Math.sin(dp) * Math.cos(dphi)) / DEG;
  return [((ra % 360) + 360) % 360, Math.asin(Math.max(-1, Math.min(1, sinDec))) / DEG];
}
