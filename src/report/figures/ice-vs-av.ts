/**
 * The figure of ice surveys: ice columns and ice ratios against the
 * sightline's A_V, one panel per ice quantity, the observed values (with 1σ
 * error bars, limits as triangles) and each sightline's best-fit model over
 * them. An abundance is drawn as the column density it came from, N(X) in
 * cm⁻²; the model's column is N_obs x 10^d (d = log10 X_model - log10 X_obs,
 * both relative to the same N_H), so no N_H/A_V conversion enters twice.
 * A ratio is drawn as the ratio.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { SightlineFit } from '../../fit/types.ts';
import { figureConfig, OBSERVATION_NAMES, OBSERVATION_SHAPES } from '../theme.ts';
import { AV_TITLE, logAxis, paddedDomain } from './axes.ts';
import type { BuiltFigure, FigureBuilder, FigureContext, FigureRequest } from './builder.ts';

const PANEL_WIDTH = 110;
const PANEL_HEIGHT = 105;
const COLUMNS = 3;
const MODEL_COLOUR = '#D55E00';
const OBSERVED_COLOUR = '#000000';
const MODEL_NAME = 'best-fit model';
export const COLUMN_TITLE = 'Column density (cm⁻²)';

interface Point {
  av: number;
  value: number;
  lo?: number;
  hi?: number;
  kind: string;
  sightline: string;
}

interface Panel {
  label: string;
  yTitle: string;
  observed: Point[];
  model: Point[];
}

function isIce(species: string): boolean {
  return species.endsWith('(s)');
}

export function icePanels(ctx: FigureContext): Panel[] {
  const sightlines = new Map(ctx.input.observations.sightlines.map((s) => [s.id, s] as const));
  const fits = new Map<string, SightlineFit>(ctx.input.fit.fits.map((f) => [f.sightline, f] as const));
  const labels = [...new Set(ctx.input.quantities.filter((q) => isIce(q.numerator)).map((q) => q.label))];
  const panels: Panel[] = [];
  for (const label of labels) {
    const observed: Point[] = [];
    const model: Point[] = [];
    let asColumn = false;
    for (const q of ctx.input.quantities.filter((x) => x.label === label)) {
      const s = sightlines.get(q.sightline);
      if (s?.av === undefined) continue;
      const residual = fits.get(q.sightline)?.residuals.find((r) => r.label === label);
      const column = q.denominator === undefined ? s.columns[q.numerator] : undefined;
      asColumn = column !== undefined;
      // The observed column as measured, or the ratio as derived; the model scaled by the fit's residual.
      const scale = column ? column.value / 10 ** q.log10 : 1;
      const value = 10 ** q.log10 * scale;
      observed.push({
        av: s.av,
        value,
        ...(q.kind === 'detection' ? { lo: 10 ** (q.log10 - q.sigmaLoDex) * scale, hi: 10 ** (q.log10 + q.sigmaHiDex) * scale } : {}),
        kind: OBSERVATION_NAMES[q.kind],
        sightline: q.sightline,
      });
      if (residual) model.push({ av: s.av, value: 10 ** residual.modelLog10 * scale, kind: MODEL_NAME, sightline: q.sightline });
    }
    if (observed.length === 0) continue;
    const denominator = ctx.input.quantities.find((x) => x.label === label)?.denominator;
    panels.push({ label: asColumn ? `N(${label.replace(/^X\((.*)\)$/, '$1')})` : label, yTitle: asColumn ? COLUMN_TITLE : `Ratio to ${denominator ?? 'H'}`, observed, model: model.sort((a, b) => a.av - b.av) });
  }
  return panels;
}

export function buildIceVsAvSpec(ctx: FigureContext): TopLevelSpec {
  const panels = icePanels(ctx);
  const allAv = panels.flatMap((p) => p.observed.map((o) => o.av));
  const xDomain = paddedDomain('linear', allAv, 0.05);
  const shapeScale = { domain: [...Object.values(OBSERVATION_NAMES), MODEL_NAME], range: [...Object.values(OBSERVATION_SHAPES), 'square'] };
  const colourScale = { domain: [...Object.values(OBSERVATION_NAMES), MODEL_NAME], range: [OBSERVED_COLOUR, OBSERVED_COLOUR, OBSERVED_COLOUR, MODEL_COLOUR] };
  const legend = { orient: 'bottom' as const, direction: 'horizontal' as const, title: null };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    columns: COLUMNS,
    concat: panels.map((p) => {
      const values = p.observed.flatMap((o) => [o.value, o.lo ?? o.value, o.hi ?? o.value]).concat(p.model.map((m) => m.value));
      const domain = paddedDomain('log', values, 0.06);
      const x = { field: 'av', type: 'quantitative' as const, title: AV_TITLE, scale: { domain: xDomain, nice: false, zero: false } };
      const y = { field: 'value', type: 'quantitative' as const, title: p.yTitle, scale: { type: 'log' as const, domain, nice: false }, axis: logAxis(domain[0], domain[1]) };
      const shape = { field: 'kind', type: 'nominal' as const, scale: shapeScale, legend };
      const color = { field: 'kind', type: 'nominal' as const, scale: colourScale, legend };
      const tooltip = [
        { field: 'sightline', type: 'nominal' as const, title: 'sightline' },
        { field: 'kind', type: 'nominal' as const, title: 'what' },
        { field: 'value', type: 'quantitative' as const, title: p.label, format: '.3~g' },
      ];
      return {
        title: p.label,
        width: PANEL_WIDTH,
        height: PANEL_HEIGHT,
        layer: [
          { data: { values: p.model }, mark: { type: 'line' as const, color: MODEL_COLOUR, strokeWidth: 0.8, opacity: 0.7 }, encoding: { x, y } },
          { data: { values: p.observed.filter((o) => o.lo !== undefined) }, mark: { type: 'rule' as const, color: OBSERVED_COLOUR, strokeWidth: 0.9 }, encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' } } },
          { data: { values: p.model }, mark: { type: 'point' as const, filled: false, size: 22, strokeWidth: 1.1, tooltip: true }, encoding: { x, y, shape, color, tooltip } },
          { data: { values: p.observed }, mark: { type: 'point' as const, filled: true, size: 20, opacity: 1, tooltip: true }, encoding: { x, y, shape, color, tooltip } },
        ],
      };
    }),
  };
}

export const iceVsAvFigure: FigureBuilder = {
  kind: 'ice_vs_av',
  description: 'ice columns and ice ratios against A_V, observed and best-fit models',
  perSightline: false,
  unavailable(ctx) {
    if (ctx.input.fit.fits.length === 0) return 'no sightline fits (a map: see the sky maps)';
    return icePanels(ctx).length > 0 ? undefined : 'no fitted ice quantity with an observed A_V';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    return [
      {
        name: request.name,
        kind: 'ice_vs_av',
        title: 'Ices against extinction',
        caption: 'Ice column densities and ice ratios of every sightline against its observed visual extinction: observed values (filled circles with 1σ error bars; triangles: upper and lower limits) and the best-fit model of each sightline (open squares, joined in order of A_V). A model column is the observed column scaled by the fit’s residual, so both refer to the same N_H.',
        spec: buildIceVsAvSpec(ctx),
      },
    ];
  },
};
