/**
 * Corner-style posterior figure of one sightline (docs/statistics.md
 * section 8): the marginal posterior of density and of age (probability per
 * grid cell) and their joint 2-D marginal with the highest-density credible
 * regions as contours. The priors (uniform in log10 of each parameter) are
 * stated in the caption.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { PosteriorSummary, SightlineFit } from '../../fit/types.ts';
import { contourSegments } from '../contours.ts';
import { slug } from '../escape.ts';
import { figureConfig, figureSize, MAP_SCHEME } from '../theme.ts';
import { cellEdges, fromScale, logAxis, parameterTitle, positionScale, scaleKind, toScale } from './axes.ts';
import { levelLabel, sightlineFigureName, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

const X_PARAMETER = 'density';
const Y_PARAMETER = 'age_yr';
const LEVEL_DASHES = [[1, 0], [4, 2], [1, 2]];
/** Spacing between the panels, pixels. */
const PANEL_SPACING = 14;
/** Room for a panel's y axis and its labels, pixels. */
const AXIS_ROOM = 45;
/** Fraction of a cell by which it overlaps its upper neighbours (abutting cells show hairline seams once antialiased). */
const CELL_OVERLAP = 0.3;

/** The probability above which the densest cells of a 2-D marginal hold `level` of the mass. */
function densityThreshold(probability: readonly number[], level: number): number {
  const sorted = [...probability].sort((a, b) => b - a);
  let acc = 0;
  for (const p of sorted) {
    acc += p;
    if (acc >= level) return p;
  }
  return 0;
}

function marginalPanel(post: PosteriorSummary, parameter: string, width: number, ctx: FigureContext): object {
  const m = post.marginals.find((x) => x.parameter === parameter)!;
  const kind = scaleKind(m.values);
  const edges = cellEdges(kind, m.values);
  const rows = m.values.map((v, i) => ({ x: edges[i], x2: edges[i + 1], value: v, probability: m.probability[i] }));
  const intervals = post.intervals.filter((iv) => iv.parameter === parameter && ctx.levels.some((l) => Math.abs(l - iv.level) < 1e-9));
  const domain = [edges[0], edges[edges.length - 1]];
  return {
    width,
    height: Math.round(width * 0.6),
    layer: [
      {
        data: { values: rows },
        mark: { type: 'rect', color: '#0072B2', opacity: 0.8, tooltip: true },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: parameterTitle(parameter), scale: positionScale(kind, domain), axis: kind === 'log' ? logAxis(domain[0], domain[1]) : {} },
          x2: { field: 'x2' },
          y: { field: 'probability', type: 'quantitative', title: 'probability per cell', axis: { tickCount: 3, format: '.2~f' } },
          tooltip: [
            { field: 'value', type: 'quantitative', title: parameterTitle(parameter), format: '.3~g' },
            { field: 'probability', type: 'quantitative', format: '.3~g' },
          ],
        },
      },
      {
        data: { values: intervals.flatMap((iv) => [{ v: iv.lo, level: `${levelLabel(iv.level)} equal-tailed` }, { v: iv.hi, level: `${levelLabel(iv.level)} equal-tailed` }]) },
        mark: { type: 'rule', color: '#000000', strokeWidth: 0.8 },
        encoding: { x: { field: 'v', type: 'quantitative' }, strokeDash: { field: 'level', type: 'nominal', title: 'Credible interval', legend: { orient: 'bottom', direction: 'vertical', symbolType: 'stroke' } } },
      },
    ],
  };
}

export function buildPosteriorSpec(ctx: FigureContext, fit: SightlineFit, post: PosteriorSummary): TopLevelSpec {
  const { totalWidth } = figureSize(ctx.input.config.column_width_in, false);
  const panel = Math.round((totalWidth - 2 * AXIS_ROOM - PANEL_SPACING) / 2);
  const pair = post.pairs.find((p) => p.x === X_PARAMETER && p.y === Y_PARAMETER);
  const panels: object[] = [marginalPanel(post, X_PARAMETER, panel, ctx), marginalPanel(post, Y_PARAMETER, panel, ctx)];
  if (pair) {
    const xKind = scaleKind(pair.xValues);
    const yKind = scaleKind(pair.yValues);
    const xEdges = cellEdges(xKind, pair.xValues);
    const yEdges = cellEdges(yKind, pair.yValues);
    const nx = pair.xValues.length;
    const grow = (kind: typeof xKind, lo: number, hi: number) => fromScale(kind, toScale(kind, hi) + CELL_OVERLAP * (toScale(kind, hi) - toScale(kind, lo)));
    const cells = pair.probability.flatMap((p, k) => {
      const ix = k % nx;
      const iy = Math.floor(k / nx);
      return p > 0 ? [{ x: xEdges[ix], x2: grow(xKind, xEdges[ix], xEdges[ix + 1]), y: yEdges[iy], y2: grow(yKind, yEdges[iy], yEdges[iy + 1]), probability: p }] : [];
    });
    // Regions of highest density: -ln p below -ln p_threshold, drawn by the Delta chi^2 contour tracer.
    const negLog = pair.probability.map((p) => (p > 0 ? -Math.log(p) : null));
    const xs = pair.xValues.map((v) => toScale(xKind, v));
    const ys = pair.yValues.map((v) => toScale(yKind, v));
    const regionNames: string[] = [];
    const contours = ctx.levels.flatMap((level) => {
      const name = `${levelLabel(level)} highest density`;
      regionNames.push(name);
      const t = densityThreshold(pair.probability, level);
      return t > 0 ? contourSegments(xs, ys, negLog, -Math.log(t)).map((s) => ({ x: fromScale(xKind, s.x), y: fromScale(yKind, s.y), x2: fromScale(xKind, s.x2), y2: fromScale(yKind, s.y2), region: name })) : [];
    });
    const xDomain = [xEdges[0], xEdges[xEdges.length - 1]];
    const yDomain = [yEdges[0], yEdges[yEdges.length - 1]];
    panels.push({
      width: 2 * panel - AXIS_ROOM,
      height: Math.round(1.2 * panel),
      layer: [
        {
          data: { values: cells },
          mark: { type: 'rect', clip: true },
          encoding: {
            x: { field: 'x', type: 'quantitative', title: parameterTitle(pair.x), scale: positionScale(xKind, xDomain), axis: xKind === 'log' ? logAxis(xDomain[0], xDomain[1]) : {} },
            x2: { field: 'x2' },
            y: { field: 'y', type: 'quantitative', title: parameterTitle(pair.y), scale: positionScale(yKind, yDomain), axis: yKind === 'log' ? logAxis(yDomain[0], yDomain[1]) : {} },
            y2: { field: 'y2' },
            color: { field: 'probability', type: 'quantitative', title: 'posterior', scale: { scheme: MAP_SCHEME }, legend: null },
          },
        },
        {
          data: { values: contours },
          mark: { type: 'rule', color: '#000000', strokeWidth: 1.1, clip: true },
          encoding: {
            x: { field: 'x', type: 'quantitative' },
            y: { field: 'y', type: 'quantitative' },
            x2: { field: 'x2' },
            y2: { field: 'y2' },
            strokeDash: { field: 'region', type: 'nominal', title: 'Credible region', scale: { domain: regionNames, range: regionNames.map((_, i) => LEVEL_DASHES[i % LEVEL_DASHES.length]) }, legend: { orient: 'bottom', direction: 'vertical', symbolType: 'stroke' } },
          },
        },
      ],
    });
  }
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    spacing: PANEL_SPACING,
    resolve: { scale: { x: 'independent', y: 'independent', strokeDash: 'independent' }, legend: { strokeDash: 'independent' } },
    vconcat: [{ hconcat: panels.slice(0, 2), spacing: PANEL_SPACING, resolve: { scale: { x: 'independent', y: 'independent' } } }, ...panels.slice(2)],
  } as TopLevelSpec;
}

export const posteriorFigure: FigureBuilder = {
  kind: 'posterior',
  description: 'marginal posteriors of density and age and their 2-D credible regions',
  perSightline: true,
  unavailable(ctx) {
    return ctx.input.fit.fits.some((f) => f.posterior) ? undefined : 'the fit has no posterior reading (fit.method: profile+posterior)';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const out: BuiltFigure[] = [];
    for (const id of request.sightlines) {
      const fit = ctx.fits.get(id);
      const post = fit?.posterior;
      if (!fit || !post || !post.marginals.some((m) => m.parameter === X_PARAMETER) || !post.marginals.some((m) => m.parameter === Y_PARAMETER)) {
        ctx.warnings.push(`posterior: sightline '${id}' has no posterior over density and age; no figure drawn.`);
        continue;
      }
      out.push({
        name: sightlineFigureName(request, ctx.input.fit.fits.findIndex((f) => f.sightline === id), request.sightlines.length, slug(id)),
        kind: 'posterior',
        title: `Posterior of ${id}`,
        caption: `Posterior of ${id} with priors ${post.priors.join(' and ')}: marginal probability of each grid cell of density and of age, with the equal-tailed ${ctx.levels.map(levelLabel).join(' and ')} credible intervals (vertical lines), and the joint 2-D marginal with its highest-density ${ctx.levels.map(levelLabel).join(' and ')} credible regions.`,
        sightline: id,
        spec: buildPosteriorSpec(ctx, fit, post),
      });
    }
    return out;
  },
};
