/**
 * Best-fit density and age of every sightline against its observed A_V,
 * with the confidence interval of each as an error bar; sightlines whose
 * interval reaches the grid's edge are drawn as open symbols (the truth may
 * lie outside the grid).
 */
import type { TopLevelSpec } from 'vega-lite';
import { levelStatement, statedLevel } from '../../fit/regions.ts';
import type { MapImageName } from '../../fit/types.ts';
import type { Sightline } from '../../obs/types.ts';
import { figureConfig, figureSize, SEQUENTIAL_SCHEME } from '../theme.ts';
import { AV_TITLE, cellEdges, logAxis, paddedDomain, parameterTitle, positionScale, scaleKind } from './axes.ts';
import { bestValue, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

const PANEL_PARAMETERS = ['density', 'age_yr'] as const;
const MAP_IMAGES_OF: Record<string, { best: MapImageName; lo: MapImageName; hi: MapImageName }> = {
  density: { best: 'best_density', lo: 'density_lo', hi: 'density_hi' },
  age_yr: { best: 'best_age_yr', lo: 'age_lo_yr', hi: 'age_hi_yr' },
};
/** Short labels: vega estimates text widths generously, and a wide legend widens the figure past a column. */
const EDGE_LABELS = { inside: 'within grid', edge: 'at grid edge' };
const PANEL_ASPECT = 0.55;
/** Above this many points (map pixels) the symbols shrink so that the cloud of points stays readable. */
const MANY_POINTS = 60;
const POINT_SIZE = 28;
const SMALL_POINT_SIZE = 7;
/**
 * Above this many points (map pixels) the panel is a 2-D histogram: pixels
 * counted in cells of A_V by grid value, with the median best value per A_V
 * bin over it. Hundreds of points with interval bars are a solid block.
 */
const DENSITY_MIN_POINTS = 150;
/** A_V bins of the 2-D histogram. */
const DENSITY_AV_BINS = 14;
const MEDIAN_COLOUR = '#D55E00';
/** Room for the colour legend of pixel counts beside the histograms, pixels. */
const LEGEND_ROOM_PX = 45;

interface Row {
  sightline: string;
  av: number;
  avLo: number;
  avHi: number;
  value: number;
  lo: number;
  hi: number;
  interval: string;
}

function sightlineRows(ctx: FigureContext, parameter: string, av: Map<string, Sightline>, level: number): Row[] {
  const rows: Row[] = [];
  for (const fit of ctx.input.fit.fits) {
    const s = av.get(fit.sightline);
    const value = bestValue(fit, parameter);
    if (s?.av === undefined || value === undefined) continue;
    const iv = fit.intervals.find((i) => i.parameter === parameter && Math.abs(i.level - level) < 1e-9);
    rows.push({
      sightline: fit.sightline,
      av: s.av,
      avLo: s.av - (s.avErr ?? 0),
      avHi: s.av + (s.avErr ?? 0),
      value,
      lo: iv?.lo ?? value,
      hi: iv?.hi ?? value,
      interval: iv && (iv.loAtEdge || iv.hiAtEdge) ? EDGE_LABELS.edge : EDGE_LABELS.inside,
    });
  }
  return rows;
}

/** Map pixels: best values and interval bounds from the map images against each pixel's A_V. */
function pixelRows(ctx: FigureContext, parameter: string): Row[] {
  const map = ctx.input.map;
  if (!map) return [];
  const { best, lo, hi } = MAP_IMAGES_OF[parameter];
  const rows: Row[] = [];
  for (const s of ctx.input.observations.sightlines) {
    if (!s.pixel || s.av === undefined) continue;
    const i = s.pixel.y * map.nx + s.pixel.x;
    const value = map.images[best][i];
    if (value === null || value === undefined) continue;
    const edge = map.images.at_edge[i] === 1;
    rows.push({ sightline: s.id, av: s.av, avLo: s.av - (s.avErr ?? 0), avHi: s.av + (s.avErr ?? 0), value, lo: map.images[lo][i] ?? value, hi: map.images[hi][i] ?? value, interval: edge ? EDGE_LABELS.edge : EDGE_LABELS.inside });
  }
  return rows;
}

interface DensityCell {
  av: number;
  av2: number;
  value: number;
  value2: number;
  pixels: number;
}

/** Pixels counted in cells of A_V (equal bins over the A_V range) by grid value (cells between neighbouring grid values), and the median per A_V bin. */
export function densityCells(rows: readonly Row[], kind: 'log' | 'linear', avDomain: [number, number]): { cells: DensityCell[]; medians: { av: number; value: number; pixels: number }[] } {
  const values = [...new Set(rows.map((r) => r.value))].sort((a, b) => a - b);
  const edges = cellEdges(kind, values);
  const width = (avDomain[1] - avDomain[0]) / DENSITY_AV_BINS;
  const counts = new Map<string, number>();
  const byBin: number[][] = Array.from({ length: DENSITY_AV_BINS }, () => []);
  for (const r of rows) {
    const b = Math.min(DENSITY_AV_BINS - 1, Math.max(0, Math.floor((r.av - avDomain[0]) / width)));
    const v = values.indexOf(r.value);
    counts.set(`${b},${v}`, (counts.get(`${b},${v}`) ?? 0) + 1);
    byBin[b].push(r.value);
  }
  const cells = [...counts.entries()].map(([key, pixels]) => {
    const [b, v] = key.split(',').map(Number);
    return { av: avDomain[0] + b * width, av2: avDomain[0] + (b + 1) * width, value: edges[v], value2: edges[v + 1], pixels };
  });
  const medians = byBin.flatMap((list, b) => {
    if (list.length === 0) return [];
    const sorted = [...list].sort((a, c) => a - c);
    const mid = sorted.length / 2;
    const median = sorted.length % 2 === 1 ? sorted[Math.floor(mid)] : kind === 'log' ? Math.sqrt(sorted[mid - 1] * sorted[mid]) : (sorted[mid - 1] + sorted[mid]) / 2;
    return [{ av: avDomain[0] + (b + 0.5) * width, value: median, pixels: list.length }];
  });
  return { cells, medians };
}

/** Whether the figure is drawn as 2-D histograms (many map pixels) rather than points with interval bars. */
export function fitVsAvIsDensity(ctx: FigureContext): boolean {
  return ctx.input.fit.fits.length === 0 && pixelRows(ctx, 'density').length > DENSITY_MIN_POINTS;
}

function densityPanel(parameter: string, rows: Row[], x: object, xDomain: [number, number], width: number, height: number) {
  const kind = scaleKind(rows.map((r) => r.value));
  const { cells, medians } = densityCells(rows, kind, xDomain);
  const domain: [number, number] = [Math.min(...cells.map((c) => c.value)), Math.max(...cells.map((c) => c.value2))];
  const y = { field: 'value', type: 'quantitative' as const, title: parameterTitle(parameter), scale: positionScale(kind, domain), axis: kind === 'log' ? logAxis(domain[0], domain[1]) : {} };
  return {
    width,
    height,
    layer: [
      {
        data: { values: cells },
        mark: { type: 'rect' as const, tooltip: true },
        encoding: {
          x: { ...x, field: 'av' },
          x2: { field: 'av2' },
          y,
          y2: { field: 'value2' },
          color: { field: 'pixels', type: 'quantitative' as const, title: 'Pixels', scale: { type: 'log' as const, scheme: { name: SEQUENTIAL_SCHEME, extent: [0.85, 0] } }, legend: { orient: 'right' as const, gradientLength: 60 } },
        },
      },
      {
        data: { values: medians },
        mark: { type: 'line' as const, color: MEDIAN_COLOUR, strokeWidth: 1.2, point: { filled: true, size: 14, color: MEDIAN_COLOUR } },
        encoding: { x: { ...x, field: 'av' }, y: { ...y, field: 'value' } },
      },
    ],
  };
}

export function buildFitVsAvSpec(ctx: FigureContext): TopLevelSpec {
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, false);
  const av = new Map(ctx.input.observations.sightlines.map((s) => [s.id, s] as const));
  const level = ctx.levels[0];
  const panels = PANEL_PARAMETERS.map((parameter) => ({ parameter, rows: ctx.input.fit.fits.length > 0 ? sightlineRows(ctx, parameter, av, level) : pixelRows(ctx, parameter) }));
  const density = fitVsAvIsDensity(ctx);
  const allAv = panels[0].rows.flatMap((r) => (density ? [r.av] : [r.avLo, r.avHi]));
  const xDomain = paddedDomain('linear', allAv, density ? 0.01 : 0.05);
  const xBase = { field: 'av', type: 'quantitative' as const, scale: { domain: xDomain, nice: false, zero: false } };
  const width = density ? plotWidth - LEGEND_ROOM_PX : plotWidth;
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    ...(density ? { resolve: { scale: { color: 'independent' as const } } } : {}),
    vconcat: panels.map(({ parameter, rows }, p) => {
      const x = { ...xBase, title: p === PANEL_PARAMETERS.length - 1 ? AV_TITLE : null, axis: p === PANEL_PARAMETERS.length - 1 ? {} : { labels: false } };
      const height = Math.round(plotWidth * PANEL_ASPECT);
      if (density) return densityPanel(parameter, rows, x, xDomain, width, height);
      const values = rows.flatMap((r) => [r.lo, r.hi]);
      const kind = scaleKind(values);
      const domain = paddedDomain(kind, values, 0.05);
      const y = {
        field: 'value',
        type: 'quantitative' as const,
        title: parameterTitle(parameter),
        scale: positionScale(kind, domain),
        axis: kind === 'log' ? logAxis(domain[0], domain[1]) : {},
      };
      const many = rows.length > MANY_POINTS;
      return {
        width,
        height,
        data: { values: rows },
        layer: [
          { mark: { type: 'rule' as const, color: '#000000', strokeWidth: 0.8 }, encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' } } },
          { mark: { type: 'rule' as const, color: '#000000', strokeWidth: 0.8 }, encoding: { x: { ...x, field: 'avLo' }, x2: { field: 'avHi' }, y } },
          {
            mark: { type: 'point', size: many ? SMALL_POINT_SIZE : POINT_SIZE, filled: true, opacity: 1, stroke: '#000000', strokeWidth: many ? 0.5 : 1, tooltip: true },
            encoding: {
              x,
              y,
              fill: { field: 'interval', type: 'nominal', title: null, scale: { domain: [EDGE_LABELS.inside, EDGE_LABELS.edge], range: ['#000000', '#ffffff'] }, legend: { orient: 'top', direction: 'horizontal', title: 'Interval:', titleOrient: 'left' } },
              tooltip: [
                { field: 'sightline', type: 'nominal', title: 'sightline' },
                { field: 'av', type: 'quantitative', title: 'A_V (mag)', format: '.3~g' },
                { field: 'value', type: 'quantitative', title: parameterTitle(parameter), format: '.3~g' },
                { field: 'lo', type: 'quantitative', title: 'interval low', format: '.3~g' },
                { field: 'hi', type: 'quantitative', title: 'interval high', format: '.3~g' },
              ],
            },
          },
        ],
      };
    }),
  };
}

export const fitVsAvFigure: FigureBuilder = {
  kind: 'fit_vs_av',
  description: 'best-fit density and age against visual extinction across sightlines',
  perSightline: false,
  unavailable(ctx) {
    const withAv = ctx.input.observations.sightlines.filter((s) => s.av !== undefined);
    if (ctx.input.fit.fits.length === 0 && ctx.input.map) return withAv.some((s) => s.pixel) ? undefined : 'no map pixel has an observed A_V';
    const ids = new Set(withAv.map((s) => s.id));
    return ctx.input.fit.fits.some((f) => ids.has(f.sightline)) ? undefined : 'no fitted sightline has an observed A_V';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    return [
      {
        name: request.name,
        kind: 'fit_vs_av',
        title: 'Best-fit density and age against A_V',
        caption: fitVsAvIsDensity(ctx)
          ? `Best-fit density and chemical age of the ${pixelRows(ctx, 'density').length} fitted map pixels against their observed visual extinction: the colour counts the pixels in each cell of A_V and grid value, the line is the median best value in each A_V bin. Per-pixel intervals are in the FITS images and the CSV table.`
          : `Best-fit density and chemical age of each sightline against its observed visual extinction, with ${levelStatement(statedLevel(ctx.levels[0], ctx.input.fit.levels, 1), 'Δχ²')} intervals as error bars; open symbols: the interval reaches the edge of the model grid.`,
        spec: buildFitVsAvSpec(ctx),
      },
    ];
  },
};
