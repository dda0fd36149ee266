/**
 * What each best fit misses: one cell per sightline and quantity, coloured by
 * the residual in units of its width (signed square root of the quantity's
 * share of chi^2, so that limits count as the fit counts them) and labelled
 * with the residual in dex, log10 model - log10 observed. Limits are marked
 * by a triangle in place of a number. A reader sees at once which quantity
 * drives a poor fit.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { QuantityScore } from '../../fit/types.ts';
import { figureConfig } from '../theme.ts';
import type { BuiltFigure, FigureBuilder, FigureContext, FigureRequest } from './builder.ts';

/** Colours saturate at this many sigma. */
const SIGMA_CLAMP = 3;
/** Cells of this many pixels; above MAX_LABELLED_SIGHTLINES the numbers are left out (they would not fit). */
const CELL_PX = 24;
const MAX_LABELLED_SIGHTLINES = 40;
/** Beyond this |sigma| the cell colour is dark enough that its label is drawn white. */
const WHITE_TEXT_SIGMA = 2;
/** Diverging scheme of vega, blue to orange through white: readable by readers with red-green colour deficiency (common practice). */
const DIVERGING_SCHEME = 'blueorange';
const LIMIT_MARKS = { upper: '▼', lower: '▲' } as const;

export const RESIDUAL_SIGMA_TITLE = 'Residual (σ)';
export const SIGHTLINE_TITLE = 'Sightline';
export const QUANTITY_TITLE = 'Quantity';

/** The signed residual in sigma: (d/σ) for a detection; for a limit the square root of its chi^2 share, signed as d. */
export function residualSigma(r: QuantityScore): number {
  return Math.sign(r.residualDex) * Math.sqrt(Math.max(0, r.chi2));
}

/** `+0.3`, `−0.6`, and `0.0` for a residual that rounds to zero (never `−0.0`). */
export function dexLabel(d: number): string {
  const rounded = Number(d.toFixed(1));
  if (rounded === 0) return '0.0';
  return `${rounded > 0 ? '+' : '−'}${Math.abs(rounded).toFixed(1)}`;
}

export function buildResidualsSpec(ctx: FigureContext): TopLevelSpec {
  const quantities = [...new Set([...ctx.input.quantities.map((q) => q.label), ...ctx.input.fit.fits.flatMap((f) => f.residuals.map((r) => r.label))])];
  const sightlines = ctx.input.fit.fits.map((f) => f.sightline);
  const labelled = sightlines.length <= MAX_LABELLED_SIGHTLINES;
  const rows = ctx.input.fit.fits.flatMap((f) =>
    f.residuals.map((r) => {
      const sigma = residualSigma(r);
      return {
        sightline: f.sightline,
        quantity: r.label,
        sigma,
        dex: r.residualDex,
        chi2: r.chi2,
        kind: r.kind === 'detection' ? 'detection' : r.kind === 'upper' ? 'upper limit' : 'lower limit',
        label: r.kind === 'detection' ? dexLabel(r.residualDex) : LIMIT_MARKS[r.kind],
        dark: Math.abs(sigma) > WHITE_TEXT_SIGMA,
      };
    }),
  );
  const x = { field: 'sightline', type: 'nominal' as const, title: SIGHTLINE_TITLE, sort: sightlines, axis: { labelAngle: -90, labelLimit: 200 } };
  const y = { field: 'quantity', type: 'nominal' as const, title: QUANTITY_TITLE, sort: quantities, axis: { labelLimit: 120 } };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    width: CELL_PX * sightlines.length,
    height: CELL_PX * quantities.length,
    data: { values: rows },
    layer: [
      {
        mark: { type: 'rect', stroke: '#ffffff', strokeWidth: 0.5, tooltip: true },
        encoding: {
          x,
          y,
          color: {
            field: 'sigma',
            type: 'quantitative',
            title: RESIDUAL_SIGMA_TITLE,
            scale: { scheme: DIVERGING_SCHEME, domain: [-SIGMA_CLAMP, SIGMA_CLAMP], domainMid: 0, clamp: true },
            legend: { orient: 'right', gradientLength: Math.min(120, CELL_PX * quantities.length) },
          },
          tooltip: [
            { field: 'sightline', type: 'nominal', title: 'sightline' },
            { field: 'quantity', type: 'nominal', title: 'quantity' },
            { field: 'kind', type: 'nominal', title: 'observed' },
            { field: 'dex', type: 'quantitative', title: 'model − observed (dex)', format: '+.2f' },
            { field: 'sigma', type: 'quantitative', title: 'residual (σ)', format: '+.2f' },
            { field: 'chi2', type: 'quantitative', title: 'χ² share', format: '.3~g' },
          ],
        },
      },
      ...(labelled
        ? [
            {
              mark: { type: 'text' as const, fontSize: 6.5 },
              encoding: {
                x,
                y,
                text: { field: 'label', type: 'nominal' as const },
                color: { field: 'dark', type: 'nominal' as const, scale: { domain: [false, true], range: ['#000000', '#ffffff'] }, legend: null },
              },
            },
          ]
        : []),
    ],
    resolve: { scale: { color: 'independent' } },
  };
}

export const residualsFigure: FigureBuilder = {
  kind: 'residuals',
  description: 'residuals of every best fit by sightline and quantity',
  perSightline: false,
  unavailable(ctx) {
    return ctx.input.fit.fits.some((f) => f.residuals.length > 0) ? undefined : 'no sightline fit has residuals (a map, or no quantity was fitted)';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    return [
      {
        name: request.name,
        kind: 'residuals',
        title: 'Residuals of the best fits',
        caption: `Model minus observed for every sightline and quantity at its best fit. Colour: the residual in units of its width (observational error and the ${ctx.input.fit.modelSigmaDex} dex model floor in quadrature; for a limit, the signed square root of its χ² share, so a satisfied limit is white); numbers: the residual in dex; ▼ upper and ▲ lower limits. Colours saturate at ±${SIGMA_CLAMP}σ.`,
        spec: buildResidualsSpec(ctx),
      },
    ];
  },
};
