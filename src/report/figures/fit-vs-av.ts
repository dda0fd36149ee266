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
import { figureConfig, figureSize } from '../theme.ts';
import { AV_TITLE, logAxis, paddedDomain, parameterTitle, positionScale, scaleKind } from './axes.ts';
import { bestValue, levelLabel, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

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
/** Above this many points the interval bars are left out (they would hide the points and swell the file). */
const MAX_BARRED_POINTS = 1500;

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

export function buildFitVsAvSpec(ctx: FigureContext): TopLevelSpec {
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, false);
  const av = new Map(ctx.input.observations.sightlines.map((s) => [s.id, s] as const));
  const level = ctx.levels[0];
  const panels = PANEL_PARAMETERS.map((parameter) => ({ parameter, rows: ctx.input.fit.fits.length > 0 ? sightlineRows(ctx, parameter, av, level) : pixelRows(ctx, parameter) }));
  const allAv = panels[0].rows.flatMap((r) => [r.avLo, r.avHi]);
  const xDomain = paddedDomain('linear', allAv, 0.05);
  const xBase = { field: 'av', type: 'quantitative' as const, scale: { domain: xDomain, nice: false, zero: false } };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: 'Best fits against extinction', subtitle: panels[0].rows.length > MAX_BARRED_POINTS ? `${panels[0].rows.length} map pixels (interval bars left out)` : `error bars: ${levelLabel(level)} intervals${ctx.input.fit.fits.length > 0 ? '' : ', one point per map pixel'}` },
    config: figureConfig(),
    vconcat: panels.map(({ parameter, rows }, p) => {
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
      const x = { ...xBase, title: p === PANEL_PARAMETERS.length - 1 ? AV_TITLE : null, axis: p === PANEL_PARAMETERS.length - 1 ? {} : { labels: false } };
      const many = rows.length > MANY_POINTS;
      // Thousands of map pixels: points only, without bars, tooltips or per-mark ARIA labels, or the SVG runs to tens of megabytes.
      const bars = rows.length <= MAX_BARRED_POINTS;
      return {
        width: plotWidth,
        height: Math.round(plotWidth * PANEL_ASPECT),
        data: { values: bars ? rows : rows.map((r) => ({ av: r.av, value: r.value, interval: r.interval })) },
        layer: [
          ...(bars
            ? [
                { mark: { type: 'rule' as const, color: '#000000', strokeWidth: 0.8 }, encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' } } },
                { mark: { type: 'rule' as const, color: '#000000', strokeWidth: 0.8 }, encoding: { x: { ...x, field: 'avLo' }, x2: { field: 'avHi' }, y } },
              ]
            : []),
          {
            mark: { type: 'point', size: many ? SMALL_POINT_SIZE : POINT_SIZE, filled: true, opacity: 1, stroke: '#000000', strokeWidth: many ? 0.5 : 1, tooltip: bars, aria: bars },
            encoding: {
              x,
              y,
              fill: { field: 'interval', type: 'nominal', title: null, scale: { domain: [EDGE_LABELS.inside, EDGE_LABELS.edge], range: ['#000000', '#ffffff'] }, legend: { orient: 'top', direction: 'horizontal', title: 'Interval:', titleOrient: 'left' } },
              tooltip: bars ? [
                { field: 'sightline', type: 'nominal', title: 'sightline' },
                { field: 'av', type: 'quantitative', title: 'A_V (mag)', format: '.3~g' },
                { field: 'value', type: 'quantitative', title: parameterTitle(parameter), format: '.3~g' },
                { field: 'lo', type: 'quantitative', title: 'interval low', format: '.3~g' },
                { field: 'hi', type: 'quantitative', title: 'interval high', format: '.3~g' },
              ] : null,
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
        caption: `Best-fit density and chemical age of each sightline against its observed visual extinction, with ${levelStatement(statedLevel(ctx.levels[0], ctx.input.fit.levels, 1), 'Δχ²')} intervals; open symbols: the interval reaches the edge of the model grid.`,
        spec: buildFitVsAvSpec(ctx),
      },
    ];
  },
};
