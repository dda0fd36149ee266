/**
 * chi^2 map over density and age for one sightline: Delta chi^2 of the 2-D
 * profile (chi^2 minimised over every other grid parameter) as grid cells,
 * the joint confidence regions of the two parameters as contour lines, and
 * the best fit marked. Degeneracies between density and age show as long
 * tilted regions: the map is drawn for every selected sightline, never
 * replaced by the single best value (docs/physics.md section 8).
 */
import type { TopLevelSpec } from 'vega-lite';
import { deltaChi2Threshold, PAIR_PARAMETERS } from '../../fit/regions.ts';
import type { Profile2D, SightlineFit } from '../../fit/types.ts';
import { contourSegments } from '../contours.ts';
import { slug } from '../escape.ts';
import { figureConfig, figureSize, MAP_SCHEME } from '../theme.ts';
import { cellEdges, DELTA_CHI2_TITLE, fromScale, logAxis, parameterTitle, positionScale, scaleKind, toScale } from './axes.ts';
import { bestValue, levelLabel, sightlineFigureName, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

const X_PARAMETER = 'density';
const Y_PARAMETER = 'age_yr';
/** Dash patterns of the contour levels, innermost first. */
const LEVEL_DASHES = [[1, 0], [4, 2], [1, 2]];
/** Fraction of a cell by which it overlaps its upper neighbours. */
const CELL_OVERLAP = 0.3;
/** Values labelled on the Delta chi^2 colour legend (a symlog scale crowds the default ticks at the top). */
const LEGEND_VALUES = [0, 1, 10, 100, 1000, 10000, 100000];
/** Plot height over width: the legend below the contours needs room. */
const MAP_ASPECT = 0.85;

/** The density-age pair of a sightline's profiles, oriented density along x; else the first pair. */
export function densityAgePair(pairs: readonly Profile2D[]): { pair: Profile2D; transposed: boolean } | undefined {
  for (const p of pairs) {
    if (p.x === X_PARAMETER && p.y === Y_PARAMETER) return { pair: p, transposed: false };
    if (p.x === Y_PARAMETER && p.y === X_PARAMETER) return { pair: p, transposed: true };
  }
  return pairs.length > 0 ? { pair: pairs[0], transposed: false } : undefined;
}

export function buildChi2MapSpec(ctx: FigureContext, fit: SightlineFit, pairIn: Profile2D, transposed: boolean): TopLevelSpec {
  const pair = transposed ? transpose(pairIn) : pairIn;
  const xKind = scaleKind(pair.xValues);
  const yKind = scaleKind(pair.yValues);
  const xEdges = cellEdges(xKind, pair.xValues);
  const yEdges = cellEdges(yKind, pair.yValues);
  const nx = pair.xValues.length;
  const cells: { x: number; x2: number; y: number; y2: number; dchi2: number; xv: number; yv: number }[] = [];
  for (let iy = 0; iy < pair.yValues.length; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      const d = pair.deltaChi2[iy * nx + ix];
      if (d === null) continue;
      // Each cell reaches a little into its upper neighbours: abutting cells otherwise show hairline seams once antialiased.
      const x2 = fromScale(xKind, toScale(xKind, xEdges[ix + 1]) + CELL_OVERLAP * (toScale(xKind, xEdges[ix + 1]) - toScale(xKind, xEdges[ix])));
      const y2 = fromScale(yKind, toScale(yKind, yEdges[iy + 1]) + CELL_OVERLAP * (toScale(yKind, yEdges[iy + 1]) - toScale(yKind, yEdges[iy])));
      cells.push({ x: xEdges[ix], x2, y: yEdges[iy], y2, dchi2: d, xv: pair.xValues[ix], yv: pair.yValues[iy] });
    }
  }
  const xs = pair.xValues.map((v) => toScale(xKind, v));
  const ys = pair.yValues.map((v) => toScale(yKind, v));
  const contours: { x: number; y: number; x2: number; y2: number; region: string }[] = [];
  const regionNames: string[] = [];
  for (const level of ctx.levels) {
    const threshold = deltaChi2Threshold(level, PAIR_PARAMETERS, ctx.input.fit.regionLevels ?? ctx.input.fit.levels);
    const region = `${levelLabel(level)} (Δχ² ≤ ${threshold.toFixed(2)})`;
    regionNames.push(region);
    for (const s of contourSegments(xs, ys, pair.deltaChi2, threshold)) {
      contours.push({ x: fromScale(xKind, s.x), y: fromScale(yKind, s.y), x2: fromScale(xKind, s.x2), y2: fromScale(yKind, s.y2), region });
    }
  }
  const bx = bestValue(fit, pair.x);
  const by = bestValue(fit, pair.y);
  const xDomain = [xEdges[0], xEdges[xEdges.length - 1]];
  const yDomain = [yEdges[0], yEdges[yEdges.length - 1]];
  const xAxis = { title: parameterTitle(pair.x), grid: false, ...(xKind === 'log' ? logAxis(xDomain[0], xDomain[1]) : {}) };
  const yAxis = { title: parameterTitle(pair.y), grid: false, ...(yKind === 'log' ? logAxis(yDomain[0], yDomain[1]) : {}) };
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, true);
  const maxDelta = Math.max(1, ...cells.map((c) => c.dchi2));
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    width: plotWidth,
    height: Math.round(plotWidth * MAP_ASPECT),
    config: figureConfig(),
    resolve: { legend: { color: 'independent', strokeDash: 'independent' } },
    layer: [
      {
        data: { values: cells },
        mark: { type: 'rect', tooltip: true, clip: true },
        encoding: {
          x: { field: 'x', type: 'quantitative', scale: positionScale(xKind, xDomain), axis: xAxis },
          x2: { field: 'x2' },
          y: { field: 'y', type: 'quantitative', scale: positionScale(yKind, yDomain), axis: yAxis },
          y2: { field: 'y2' },
          color: {
            field: 'dchi2',
            type: 'quantitative',
            title: DELTA_CHI2_TITLE,
            // Best (small Delta chi^2) bright, poor dark: the contours, drawn in black, sit on the bright part.
            scale: { type: 'symlog', scheme: MAP_SCHEME, reverse: true, domain: [0, maxDelta], nice: false },
            legend: { orient: 'right', direction: 'vertical', gradientLength: 90, values: LEGEND_VALUES.filter((v) => v <= maxDelta), format: 'd' },
          },
          tooltip: [
            { field: 'xv', type: 'quantitative', title: parameterTitle(pair.x), format: '.3~g' },
            { field: 'yv', type: 'quantitative', title: parameterTitle(pair.y), format: '.3~g' },
            { field: 'dchi2', type: 'quantitative', title: DELTA_CHI2_TITLE, format: '.3~g' },
          ],
        },
      },
      {
        data: { values: contours },
        mark: { type: 'rule', color: '#000000', strokeWidth: 1.2, clip: true },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'y', type: 'quantitative' },
          x2: { field: 'x2' },
          y2: { field: 'y2' },
          strokeDash: {
            field: 'region',
            type: 'nominal',
            title: 'Joint region',
            scale: { domain: regionNames, range: regionNames.map((_, i) => LEVEL_DASHES[i % LEVEL_DASHES.length]) },
            legend: { orient: 'bottom', direction: 'vertical', symbolType: 'stroke', symbolStrokeColor: '#000000' },
          },
        },
      },
      {
        data: { values: bx === undefined || by === undefined ? [] : [{ x: bx, y: by, what: 'best fit' }] },
        mark: { type: 'point', shape: 'cross', size: 70, filled: true, opacity: 1, color: '#000000', stroke: '#ffffff', strokeWidth: 0.8 },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'y', type: 'quantitative' },
          tooltip: [{ field: 'what', type: 'nominal', title: 'marker' }],
        },
      },
    ],
  };
}

function transpose(p: Profile2D): Profile2D {
  const nx = p.xValues.length;
  const ny = p.yValues.length;
  const chi2Min: (number | null)[] = new Array(nx * ny);
  const deltaChi2: (number | null)[] = new Array(nx * ny);
  for (let iy = 0; iy < ny; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      chi2Min[ix * ny + iy] = p.chi2Min[iy * nx + ix];
      deltaChi2[ix * ny + iy] = p.deltaChi2[iy * nx + ix];
    }
  }
  return { x: p.y, y: p.x, xValues: p.yValues, yValues: p.xValues, chi2Min, deltaChi2 };
}

export const chi2MapFigure: FigureBuilder = {
  kind: 'chi2_map',
  description: 'χ² maps over density and age with the joint confidence regions',
  perSightline: true,
  unavailable(ctx) {
    if (!ctx.input.profiles) return 'it needs the fit profiles (profiles.json), which were not given';
    const anyPair = ctx.input.profiles.sightlines.some((s) => s.pairs.some((p) => p.xValues.length > 1 && p.yValues.length > 1));
    return anyPair ? undefined : 'no sightline has a 2-D profile over two fitted parameters (the grid varies fewer than two)';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const out: BuiltFigure[] = [];
    for (const id of request.sightlines) {
      const fit = ctx.fits.get(id);
      const found = densityAgePair(ctx.profiles.get(id)?.pairs ?? []);
      if (!fit || !found || found.pair.xValues.length < 2 || found.pair.yValues.length < 2) {
        ctx.warnings.push(`chi2_map: sightline '${id}' has no 2-D profile over two fitted parameters; no map drawn.`);
        continue;
      }
      const { pair, transposed } = found;
      const xName = transposed ? pair.y : pair.x;
      const yName = transposed ? pair.x : pair.y;
      out.push({
        name: sightlineFigureName(request, indexOf(ctx, id), request.sightlines.length, slug(id)),
        kind: 'chi2_map',
        title: `χ² map of ${id}`,
        caption: `Δχ² over ${plainName(xName)} and ${plainName(yName)} for ${id} (minimised over every other parameter), with the joint regions of the two parameters (${ctx.levels.map((l) => `${levelLabel(l)}: Δχ² ≤ ${deltaChi2Threshold(l, PAIR_PARAMETERS, ctx.input.fit.regionLevels ?? ctx.input.fit.levels).toFixed(2)}`).join(', ')}) and the best fit (cross; minimum χ² = ${Number(fit.best.chi2.toPrecision(3))} for ${fit.dof} degree${fit.dof === 1 ? '' : 's'} of freedom).`,
        sightline: id,
        spec: buildChi2MapSpec(ctx, fit, pair, transposed),
      });
    }
    return out;
  },
};

/** A parameter as running text: `age_yr` -> `age`, `gas_temperature` -> `gas temperature`. */
function plainName(parameter: string): string {
  return parameter === 'age_yr' ? 'age' : parameter.replace(/_/g, ' ');
}

function indexOf(ctx: FigureContext, id: string): number {
  return ctx.input.fit.fits.findIndex((f) => f.sightline === id);
}
