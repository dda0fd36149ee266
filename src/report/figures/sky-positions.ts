/**
 * Sightlines on the sky: for a table whose sightlines carry RA and Dec, each
 * sightline at its position (RA increasing to the left, east on the left as
 * on the sky), coloured by its best age, best density or p-value, one figure
 * each. The frame keeps true angular proportions near the field's centre: a
 * degree of RA spans cos(Dec) of a degree of Dec (common practice for a
 * small field; no projection is claimed beyond that).
 */
import type { TopLevelSpec } from 'vega-lite';
import type { SightlineFit } from '../../fit/types.ts';
import { figureConfig, figureSize, MAP_SCHEME, SEQUENTIAL_SCHEME } from '../theme.ts';
import { logAxis, paddedDomain, scaleKind } from './axes.ts';
import type { BuiltFigure, FigureBuilder, FigureContext, FigureRequest } from './builder.ts';

export const RA_TITLE = 'Right ascension (deg)';
export const DEC_TITLE = 'Declination (deg)';

interface SkyQuantity {
  key: 'best_age_yr' | 'best_density' | 'p_value';
  title: string;
  legend: string;
  scheme: typeof SEQUENTIAL_SCHEME | typeof MAP_SCHEME;
  value(fit: SightlineFit): number | undefined;
}

export const SKY_QUANTITIES: SkyQuantity[] = [
  { key: 'best_age_yr', title: 'Best-fit chemical age on the sky', legend: 'Age (yr)', scheme: SEQUENTIAL_SCHEME, value: (f) => f.best.ageYr },
  { key: 'best_density', title: 'Best-fit density on the sky', legend: 'Density (cm⁻³)', scheme: SEQUENTIAL_SCHEME, value: (f) => f.best.parameters.density },
  { key: 'p_value', title: 'p-value of the best fit on the sky', legend: 'p-value', scheme: MAP_SCHEME, value: (f) => f.pValue },
];

/** Smallest p-value drawn on its log colour scale: a p of 1e-30 would stretch the scale past use. */
const P_FLOOR = 1e-6;

function rows(ctx: FigureContext, q: SkyQuantity) {
  const pos = new Map(ctx.input.observations.sightlines.map((s) => [s.id, s] as const));
  return ctx.input.fit.fits.flatMap((f) => {
    const s = pos.get(f.sightline);
    const v = q.value(f);
    if (s?.ra === undefined || s.dec === undefined || v === undefined || !Number.isFinite(v)) return [];
    return [{ sightline: f.sightline, ra: s.ra, dec: s.dec, value: q.key === 'p_value' ? Math.max(v, P_FLOOR) : v }];
  });
}

export function buildSkyPositionsSpec(ctx: FigureContext, q: SkyQuantity): TopLevelSpec {
  const { plotWidth } = figureSize(ctx.input.config.column_width_in, true);
  const data = rows(ctx, q);
  const decMid = (Math.min(...data.map((r) => r.dec)) + Math.max(...data.map((r) => r.dec))) / 2;
  const cosDec = Math.max(0.05, Math.cos((decMid * Math.PI) / 180));
  const raDomain = paddedDomain('linear', data.map((r) => r.ra), 0.08);
  const decDomain = paddedDomain('linear', data.map((r) => r.dec), 0.08);
  // Equal angular scale on both axes, the larger extent filling the plot width.
  const raSpan = (raDomain[1] - raDomain[0]) * cosDec;
  const decSpan = decDomain[1] - decDomain[0];
  const height = Math.round(Math.min(plotWidth * 1.2, (plotWidth * decSpan) / Math.max(raSpan, 1e-9)));
  const width = Math.round(height >= plotWidth * 1.2 ? (height * raSpan) / decSpan : plotWidth);
  const kind = scaleKind(data.map((r) => r.value));
  const lo = Math.min(...data.map((r) => r.value));
  const hi = Math.max(...data.map((r) => r.value));
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    width,
    height,
    data: { values: data },
    mark: { type: 'point', filled: true, size: 40, stroke: '#000000', strokeWidth: 0.6, opacity: 1, tooltip: true },
    encoding: {
      x: { field: 'ra', type: 'quantitative', title: RA_TITLE, scale: { domain: raDomain, reverse: true, nice: false, zero: false }, axis: { tickCount: 4 } },
      y: { field: 'dec', type: 'quantitative', title: DEC_TITLE, scale: { domain: decDomain, nice: false, zero: false }, axis: { tickCount: 4 } },
      color: {
        field: 'value',
        type: 'quantitative',
        title: q.legend,
        scale: { type: kind, scheme: q.scheme, nice: false, domain: [lo, hi] },
        ...(kind === 'log' ? { legend: logAxis(lo, hi) } : {}),
      },
      tooltip: [
        { field: 'sightline', type: 'nominal', title: 'sightline' },
        { field: 'ra', type: 'quantitative', title: 'RA (deg)', format: '.5f' },
        { field: 'dec', type: 'quantitative', title: 'Dec (deg)', format: '.5f' },
        { field: 'value', type: 'quantitative', title: q.legend, format: '.3~g' },
      ],
    },
  };
}

export const skyPositionsFigure: FigureBuilder = {
  kind: 'sky_positions',
  description: 'the sightlines on the sky coloured by best age, density and p-value',
  perSightline: false,
  unavailable(ctx) {
    if (ctx.input.fit.fits.length === 0) return 'no sightline fits (a map: see the sky maps)';
    return rows(ctx, SKY_QUANTITIES[0]).length >= 2 ? undefined : 'fewer than two fitted sightlines have RA and Dec';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    return SKY_QUANTITIES.map((q) => ({
      name: `${request.name}_${q.key}`,
      kind: 'sky_positions' as const,
      title: q.title,
      caption: `${q.title.replace(/ on the sky$/, '')} of each sightline at its position (RA and Dec as given in the observations, east to the left, equal angular scale on both axes at the field's centre)${q.key === 'p_value' ? `; p-values below ${P_FLOOR} are drawn at ${P_FLOOR}` : ''}.`,
      spec: buildSkyPositionsSpec(ctx, q),
    }));
  },
};
