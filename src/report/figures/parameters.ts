/**
 * Every fitted parameter across the sightlines: one panel per parameter
 * (density, age, and any other grid condition the grid varies, such as the
 * temperature), the best value of each sightline with its interval as an
 * error bar, the sightlines in order of A_V. A joint group's shared value is
 * a horizontal line over its members, with its interval shaded.
 */
import type { TopLevelSpec } from 'vega-lite';
import { orderParameters } from '../tables.ts';
import { figureConfig, figureSize } from '../theme.ts';
import { logAxis, paddedDomain, parameterTitle, positionScale, scaleKind } from './axes.ts';
import { bestValue, levelLabel, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

const PANEL_ASPECT = 0.45;
const EDGE_LABELS = { inside: 'within grid', edge: 'at grid edge' };
const JOINT_COLOUR = '#0072B2';
export const SIGHTLINE_AXIS_TITLE = 'Sightline (in order of visual extinction)';

export function buildParametersSpec(ctx: FigureContext): TopLevelSpec {
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, false);
  const av = new Map(ctx.input.observations.sightlines.map((s) => [s.id, s.av] as const));
  const fits = [...ctx.input.fit.fits].sort((a, b) => (av.get(a.sightline) ?? Infinity) - (av.get(b.sightline) ?? Infinity));
  const order = fits.map((f) => f.sightline);
  const level = ctx.levels[0];
  const parameters = orderParameters(ctx.input.fit.fittedParameters).filter((p) => fits.some((f) => bestValue(f, p) !== undefined && !(p in f.heldParameters)));
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    vconcat: parameters.map((parameter, k) => {
      const rows = fits.flatMap((f) => {
        const value = bestValue(f, parameter);
        if (value === undefined || parameter in f.heldParameters) return [];
        const iv = f.intervals.find((i) => i.parameter === parameter && Math.abs(i.level - level) < 1e-9);
        return [{ sightline: f.sightline, value, lo: iv?.lo ?? value, hi: iv?.hi ?? value, interval: iv && (iv.loAtEdge || iv.hiAtEdge) ? EDGE_LABELS.edge : EDGE_LABELS.inside }];
      });
      const joint = ctx.input.fit.joint.flatMap((j) => {
        const value = j.sharedBest[parameter];
        if (value === undefined) return [];
        const members = j.members.filter((m) => order.includes(m)).sort((a, b) => order.indexOf(a) - order.indexOf(b));
        if (members.length === 0) return [];
        const iv = j.intervals.find((i) => i.parameter === parameter && Math.abs(i.level - level) < 1e-9);
        return [{ group: j.name, first: members[0], last: members[members.length - 1], value, lo: iv?.lo ?? value, hi: iv?.hi ?? value }];
      });
      const values = [...rows.flatMap((r) => [r.lo, r.hi]), ...joint.flatMap((j) => [j.lo, j.hi])];
      const kind = scaleKind(values);
      const domain = paddedDomain(kind, values, 0.08);
      const last = k === parameters.length - 1;
      const x = { field: 'sightline', type: 'ordinal' as const, scale: { domain: order }, title: last ? SIGHTLINE_AXIS_TITLE : null, axis: last ? { labelAngle: -90, labelLimit: 200 } : { labels: false, ticks: true } };
      const y = { field: 'value', type: 'quantitative' as const, title: parameterTitle(parameter), scale: positionScale(kind, domain), axis: kind === 'log' ? logAxis(domain[0], domain[1]) : { tickCount: 4 } };
      return {
        width: plotWidth,
        height: Math.round(plotWidth * PANEL_ASPECT),
        layer: [
          { data: { values: joint }, mark: { type: 'rect' as const, color: JOINT_COLOUR, opacity: 0.15 }, encoding: { x: { ...x, field: 'first', bandPosition: 0 }, x2: { field: 'last', bandPosition: 1 }, y: { ...y, field: 'lo' }, y2: { field: 'hi' } } },
          { data: { values: joint }, mark: { type: 'rule' as const, color: JOINT_COLOUR, strokeWidth: 1.2, tooltip: true }, encoding: { x: { ...x, field: 'first', bandPosition: 0 }, x2: { field: 'last', bandPosition: 1 }, y } },
          { data: { values: rows }, mark: { type: 'rule' as const, color: '#000000', strokeWidth: 0.9 }, encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' } } },
          {
            data: { values: rows },
            mark: { type: 'point' as const, filled: true, size: 26, stroke: '#000000', strokeWidth: 1, opacity: 1, tooltip: true },
            encoding: {
              x,
              y,
              fill: { field: 'interval', type: 'nominal' as const, title: null, scale: { domain: [EDGE_LABELS.inside, EDGE_LABELS.edge], range: ['#000000', '#ffffff'] }, legend: { orient: 'top' as const, direction: 'horizontal' as const, title: 'Interval:', titleOrient: 'left' as const } },
            },
          },
        ],
      };
    }),
  };
}

export const parametersFigure: FigureBuilder = {
  kind: 'parameters',
  description: 'every fitted parameter across the sightlines',
  perSightline: false,
  unavailable(ctx) {
    return ctx.input.fit.fits.length > 0 ? undefined : 'no sightline fits (a map: see the sky maps)';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const names = orderParameters(ctx.input.fit.fittedParameters).map((p) => parameterTitle(p).replace(/ \(.*\)$/, '').toLowerCase());
    return [
      {
        name: request.name,
        kind: 'parameters',
        title: 'Fitted parameters across the sightlines',
        caption: `Best-fit ${names.join(', ')} of each sightline, in order of observed visual extinction, with ${levelLabel(ctx.levels[0])} intervals as error bars; open symbols: the interval reaches the edge of the model grid.${ctx.input.fit.joint.length > 0 ? ' Blue lines and bands: the shared value and interval of a joint fit over its members.' : ''} Parameters tied to each sightline (held) are not drawn.`,
        spec: buildParametersSpec(ctx),
      },
    ];
  },
};
