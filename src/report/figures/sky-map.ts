/**
 * Sky images of a map's fit results in pixel coordinates: best age, best
 * density and best chi^2 per pixel, one figure each (the FITS outputs carry
 * the WCS for sky coordinates). Pixels without a fit are left blank.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { MapFitJson, MapImageName } from '../../fit/types.ts';
import { figureConfig, figureSize, MAP_SCHEME, SEQUENTIAL_SCHEME } from '../theme.ts';
import { pixelColours, mapImageDataUrl } from '../raster.ts';
import { CHI2_TITLE, logAxis, scaleKind, type ScaleKind } from './axes.ts';
import type { BuiltFigure, FigureBuilder, FigureContext, FigureRequest } from './builder.ts';
import { DEC_TITLE, RA_TITLE } from './sky-positions.ts';
import { pixelToWorld, readTanWcs } from '../wcs.ts';

/** Maps with more pixels than this are drawn as one raster image. */
const RASTER_MIN_PIXELS = 64 * 64;
/** Overlap of a pixel cell into its upper neighbours, pixels. */
const CELL_OVERLAP = 0.3;

interface SkyImage {
  image: MapImageName;
  title: string;
  legend: string;
  scheme: typeof SEQUENTIAL_SCHEME | typeof MAP_SCHEME;
}

export const SKY_IMAGES: SkyImage[] = [
  { image: 'best_age_yr', title: 'Best-fit chemical age', legend: 'Age (yr)', scheme: SEQUENTIAL_SCHEME },
  { image: 'best_density', title: 'Best-fit density', legend: 'Density (cm⁻³)', scheme: SEQUENTIAL_SCHEME },
  { image: 'best_chi2', title: 'Best-fit χ²', legend: CHI2_TITLE, scheme: MAP_SCHEME },
];

/** Labelled ticks along an axis of the image. */
const WORLD_TICKS = 4;

/**
 * Axes in world coordinates when the observed maps carry a TAN WCS in RA and
 * Dec: ticks at pixel positions labelled with RA along the middle row and
 * Dec along the middle column (src/report/wcs.ts); pixel axes otherwise.
 */
export function skyAxes(ctx: FigureContext, map: MapFitJson): { x: { title: string; axis: object }; y: { title: string; axis: object }; world: boolean } {
  const pixel = { x: { title: 'Pixel x', axis: { grid: false } }, y: { title: 'Pixel y', axis: { grid: false } }, world: false };
  const header = ctx.input.observations.map?.wcs;
  if (!header) return pixel;
  const w = readTanWcs(header);
  if (typeof w === 'string') return pixel;
  const ticks = (n: number) => Array.from({ length: WORLD_TICKS }, (_, k) => Math.round(((n - 1) * (k + 0.5)) / WORLD_TICKS));
  const xs = ticks(map.nx);
  const ys = ticks(map.ny);
  const midX = (map.nx - 1) / 2;
  const midY = (map.ny - 1) / 2;
  // Enough decimals to tell neighbouring ticks apart.
  const step = Math.max(Math.abs(w.cdelt[0]), Math.abs(w.cdelt[1])) * Math.max(1, (map.nx - 1) / WORLD_TICKS);
  const decimals = Math.min(6, Math.max(1, Math.ceil(-Math.log10(step)) + 1));
  const labels = (values: number[], world: (v: number) => number) => Object.fromEntries(values.map((v) => [String(v), world(v).toFixed(decimals)]));
  const xLabels = labels(xs, (v) => pixelToWorld(w, v, midY)[0]);
  const yLabels = labels(ys, (v) => pixelToWorld(w, midX, v)[1]);
  return {
    x: { title: RA_TITLE, axis: { grid: false, values: xs, labelExpr: `${JSON.stringify(xLabels)}[datum.value]` } },
    y: { title: DEC_TITLE, axis: { grid: false, values: ys, labelExpr: `${JSON.stringify(yLabels)}[datum.value]` } },
    world: true,
  };
}

export function buildSkyMapSpec(ctx: FigureContext, map: MapFitJson, image: SkyImage): TopLevelSpec {
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, true);
  const values = map.images[image.image];
  const rows: { x: number; y: number; x2: number; y2: number; px: number; py: number; value: number }[] = [];
  values.forEach((v, i) => {
    if (v === null || !Number.isFinite(v)) return;
    const px = i % map.nx;
    const py = Math.floor(i / map.nx);
    // Cells reach a little into their upper neighbours: abutting cells otherwise show hairline seams once antialiased.
    rows.push({ x: px - 0.5, x2: px + 0.5 + CELL_OVERLAP, y: py - 0.5, y2: py + 0.5 + CELL_OVERLAP, px, py, value: v });
  });
  const kind = scaleKind(rows.map((r) => r.value));
  // A loop, not Math.min(...values): a large map would overflow the argument list.
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  for (const r of rows) {
    if (kind === 'log' && r.value <= 0) continue;
    lo = Math.min(lo, r.value);
    hi = Math.max(hi, r.value);
  }
  const height = Math.round((plotWidth * map.ny) / map.nx);
  if (map.nx * map.ny > RASTER_MIN_PIXELS && rows.length > 0) return rasterSpec(ctx, map, image, values, kind, [lo, hi], plotWidth, height);
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    width: plotWidth,
    height,
    config: figureConfig(),
    data: { values: rows },
    mark: { type: 'rect', tooltip: true, clip: true },
    encoding: {
      x: { field: 'x', type: 'quantitative', ...skyAxes(ctx, map).x, scale: { domain: [-0.5, map.nx - 0.5], nice: false, zero: false } },
      x2: { field: 'x2' },
      y: { field: 'y', type: 'quantitative', ...skyAxes(ctx, map).y, scale: { domain: [-0.5, map.ny - 0.5], nice: false, zero: false } },
      y2: { field: 'y2' },
      color: {
        field: 'value',
        type: 'quantitative',
        title: image.legend,
        scale: { type: kind, scheme: image.scheme, nice: false, ...(rows.length > 0 ? { domain: [lo, hi] } : {}) },
        ...(kind === 'log' && rows.length > 0 ? { legend: logAxis(lo, hi) } : {}),
      },
      tooltip: [
        { field: 'px', type: 'quantitative', title: 'x' },
        { field: 'py', type: 'quantitative', title: 'y' },
        { field: 'value', type: 'quantitative', title: image.legend, format: '.3~g' },
      ],
    },
  };
}

/**
 * The same figure with the pixels as one raster image (for maps above
 * RASTER_MIN_PIXELS): an image layer, and an invisible layer whose colour
 * scale draws the legend the image's colours were taken from.
 */
function rasterSpec(ctx: FigureContext, map: MapFitJson, image: SkyImage, values: readonly (number | null)[], kind: ScaleKind, domain: [number, number], width: number, height: number): TopLevelSpec {
  const url = mapImageDataUrl(pixelColours(values, kind, domain, image.scheme), map.nx, map.ny);
  const axes = skyAxes(ctx, map);
  const x = { field: 'x', type: 'quantitative' as const, ...axes.x, scale: { domain: [-0.5, map.nx - 0.5], nice: false, zero: false } };
  const y = { field: 'y', type: 'quantitative' as const, ...axes.y, scale: { domain: [-0.5, map.ny - 0.5], nice: false, zero: false } };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    width,
    height,
    config: figureConfig(),
    layer: [
      {
        data: { values: [{ url, x: (map.nx - 1) / 2, y: (map.ny - 1) / 2 }] },
        // aria: false keeps the data URL out of an aria-label, which would double the file.
        mark: { type: 'image', width, height, aspect: false, smooth: false, aria: false },
        encoding: { x, y, url: { field: 'url', type: 'nominal' } },
      },
      {
        data: { values: [{ x: 0, y: 0, value: domain[0] }, { x: 0, y: 0, value: domain[1] }] },
        mark: { type: 'point', opacity: 0, aria: false },
        encoding: {
          x,
          y,
          color: {
            field: 'value',
            type: 'quantitative',
            title: image.legend,
            scale: { type: kind, scheme: image.scheme, nice: false, domain },
            ...(kind === 'log' ? { legend: logAxis(domain[0], domain[1]) } : {}),
          },
        },
      },
    ],
  };
}

export const skyMapFigure: FigureBuilder = {
  kind: 'sky_map',
  description: 'sky images of the best age, density and χ², in world coordinates where the map has a WCS',
  perSightline: false,
  unavailable(ctx) {
    return ctx.input.map ? undefined : `the observations (${ctx.input.observations.file}) are a table of sightlines, not a map`;
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const map = ctx.input.map;
    if (!map) return [];
    return SKY_IMAGES.map((image) => ({
      name: `${request.name}_${image.image}`,
      kind: 'sky_map' as const,
      title: image.title,
      caption: `${image.title} of every map pixel, ${skyAxes(ctx, map).world ? 'on the pixel grid of the FITS images with RA (along the middle row) and Dec (along the middle column) from their TAN WCS' : 'in pixel coordinates (x right, y up, as in the FITS images)'}; blank pixels have no fit (${map.fittedPixels} of ${map.nx * map.ny} pixels fitted).`,
      spec: buildSkyMapSpec(ctx, map, image),
    }));
  },
};
