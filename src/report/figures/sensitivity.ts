/**
 * What a sightline's fit hangs on (docs/uncertainty.md): the reactions whose
 * rate coefficient correlates most with the best fit's chi^2 over the Monte
 * Carlo realizations (Pearson as Wakelam et al. 2010, or Spearman), as bars.
 */
import { slug } from '../escape.ts';
import { numberText } from '../numbers.ts';
import { sightlineFigureName, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';
import { sensitivityBarsSpec } from './model-spread.ts';

export const sensitivityFigure: FigureBuilder = {
  kind: 'sensitivity',
  description: "the reactions each sightline's chi^2 hangs on, from the Monte Carlo realizations of the rate coefficients",
  perSightline: true,
  unavailable(ctx) {
    return ctx.input.sensitivity === undefined ? 'no realizations were run (add a realizations: section to the pipeline)' : undefined;
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const out: BuiltFigure[] = [];
    for (const id of request.sightlines) {
      const s = ctx.input.sensitivity?.find((x) => x.sightline === id);
      if (!s) continue;
      const method = s.method === 'pearson' ? 'Pearson' : 'Spearman';
      const chance = s.chanceCoefficient === null ? '' : `; |r| < ${s.chanceCoefficient.toFixed(2)} can be chance`;
      out.push({
        name: sightlineFigureName(request, ctx.input.fit.fits.findIndex((f) => f.sightline === id), request.sightlines.length, slug(id)),
        kind: 'sensitivity',
        title: `What the fit of ${id} hangs on`,
        caption: `The ${s.top.length} reactions whose rate coefficient correlates most with the chi² of the best fit of ${id} (at ${numberText(s.ageYr)} yr) over ${s.realizations} Monte Carlo realizations of the rate coefficients (${method} coefficient${chance}${chance ? ', the dashed lines' : ''}); a positive coefficient means a larger rate coefficient worsens the fit. All coefficients, and those of every fitted quantity, are in fit/sensitivity.csv.`,
        sightline: id,
        spec: sensitivityBarsSpec(s.top, undefined, `${method} coefficient over ${s.realizations} realizations${chance ? ` (dashed: chance level ${s.chanceCoefficient!.toFixed(2)})` : ''}`, 'χ²', s.chanceCoefficient),
      });
    }
    return out;
  },
};
