/**
 * Sky images of large maps as one raster image instead of a rectangle per
 * pixel (a 128 x 128 map is 16384 SVG elements per figure otherwise): pixel
 * colours from vega's own colour schemes, so the image matches the legend
 * vega draws, and the PNG made by resvg from a grid of crisp squares, each
 * map pixel a block of whole image pixels (the image stays sharp when a
 * renderer smooths it while scaling).
 */
import { Resvg } from '@resvg/resvg-js';
import * as vega from 'vega';
import type { ScaleKind } from './figures/axes.ts';

/** The raster is at least this many image pixels wide: sharp at 300 dpi across a column. */
const MIN_IMAGE_WIDTH = 1024;

/**
 * Colour of each value on a sequential scheme over [lo, hi] (in log10 for a
 * log scale), as vega's scale maps it: the scheme's interpolator at the
 * value's fraction of the domain. null stays null (no fit: transparent).
 */
export function pixelColours(values: readonly (number | null)[], kind: ScaleKind, domain: [number, number], scheme: string): (string | null)[] {
  const interpolate = vega.scheme(scheme) as ((t: number) => string) | undefined;
  if (typeof interpolate !== 'function') throw new Error(`vega has no continuous colour scheme '${scheme}'`);
  const f = (v: number) => (kind === 'log' ? Math.log10(v) : v);
  const lo = f(domain[0]);
  const span = f(domain[1]) - lo;
  return values.map((v) => {
    if (v === null || !Number.isFinite(v) || (kind === 'log' && v <= 0)) return null;
    const t = span > 0 ? (f(v) - lo) / span : 0.5;
    return interpolate(Math.min(1, Math.max(0, t)));
  });
}

/** Image pixels per map pixel along each axis. */
export function blockSize(nx: number): number {
  return Math.max(1, Math.ceil(MIN_IMAGE_WIDTH / nx));
}

/**
 * A PNG data URL of a map: colours[y * nx + x] with pixel (0, 0) at the
 * bottom left, as FITS images and the figures' axes have it.
 */
export function mapImageDataUrl(colours: readonly (string | null)[], nx: number, ny: number): string {
  const block = blockSize(nx);
  const rects: string[] = [];
  colours.forEach((c, i) => {
    if (c === null) return;
    const x = i % nx;
    const y = Math.floor(i / nx);
    rects.push(`<rect x="${x}" y="${ny - 1 - y}" width="1" height="1" fill="${c}"/>`);
  });
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${nx * block}" height="${ny * block}" viewBox="0 0 ${nx} ${ny}" shape-rendering="crispEdges">${rects.join('')}</svg>`;
  const png = new Resvg(svg, { fitTo: { mode: 'original' }, font: { loadSystemFonts: false }, logLevel: 'off' }).render().asPng();
  return `data:image/png;base64,${png.toString('base64')}`;
}
