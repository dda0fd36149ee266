/**
 * chi^2 profiles of one sightline: for each fitted parameter, Delta chi^2
 * minimised over every other parameter against that parameter's grid values,
 * with the Delta chi^2 thresholds the fit's intervals used as lines (the
 * interval is where the profile lies below a line).
 */
import type { TopLevelSpec } from 'vega-lite';
import { intervalReading, levelStatement, statedLevel } from '../../fit/regions.ts';
import type { Profile1D, SightlineFit } from '../../fit/types.ts';
import { slug } from '../escape.ts';
import { figureConfig, figureSize } from '../theme.ts';
import { DELTA_CHI2_TITLE, logAxis, paddedDomain, parameterTitle, positionScale, scaleKind } from './axes.ts';
import { bestValue, levelLabel, sightlineFigureName, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

/** Panels per row. */
const COLUMNS = 2;
/** Spacing between panels, pixels. */
const PANEL_SPACING = 10;
/** Room for the first column's y axis and its labels, pixels. */
const AXIS_ROOM = 45;
/** The y axis shows Delta chi^2 up to this multiple of the largest threshold (the region's surroundings, not the far tail). */
const Y_HEADROOM = 2.5;
const LEVEL_DASHES = [[4, 2], [1, 2], [6, 2, 1, 2]];

export function buildProfilesSpec(ctx: FigureContext, fit: SightlineFit, profiles: Profile1D[]): TopLevelSpec {
  const { totalWidth } = figureSize(ctx.input.config.column_width_in, false);
  const columns = Math.min(COLUMNS, profiles.length);
  const panelWidth = Math.round((totalWidth - AXIS_ROOM - PANEL_SPACING * (columns - 1)) / columns);
  // The thresholds the fit's intervals used (for p parameters of interest, as the fit states them), so the lines cut the profiles where the intervals end.
  const thresholds = ctx.levels.map((level) => {
    const stated = statedLevel(level, ctx.input.fit.levels, 1);
    return { level: `${levelLabel(level)} (Δχ² = ${stated.deltaChi2.toFixed(2)}, ${intervalReading(stated.parametersOfInterest)})`, threshold: stated.deltaChi2 };
  });
  const yMax = Y_HEADROOM * Math.max(...thresholds.map((t) => t.threshold));
  const levelNames = thresholds.map((t) => t.level);
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    config: figureConfig(),
    columns,
    spacing: PANEL_SPACING,
    resolve: { scale: { x: 'independent', y: 'shared' } },
    concat: profiles.map((profile, p) => {
      const kind = scaleKind(profile.values);
      const domain = paddedDomain(kind, profile.values, 0.03);
      const best = bestValue(fit, profile.parameter);
      // Values no candidate open to this sightline reaches (held or excluded) have no profile point.
      const rows = profile.values.flatMap((v, i) => (profile.deltaChi2[i] === null ? [] : [{ value: v, dchi2: profile.deltaChi2[i] }]));
      const x = {
        field: 'value',
        type: 'quantitative' as const,
        title: parameterTitle(profile.parameter),
        scale: positionScale(kind, domain),
        axis: kind === 'log' ? logAxis(domain[0], domain[1]) : { tickCount: 4 },
      };
      // The panels share the y scale: only the first of each row labels it.
      const firstInRow = p % columns === 0;
      const y = { field: 'dchi2', type: 'quantitative' as const, title: firstInRow ? DELTA_CHI2_TITLE : null, scale: { domain: [0, yMax], nice: false }, axis: firstInRow ? {} : { labels: false } };
      return {
        width: panelWidth,
        height: Math.round(panelWidth * 0.8),
        layer: [
          {
            data: { values: thresholds },
            mark: { type: 'rule', color: '#555555', strokeWidth: 0.8 },
            encoding: {
              y: { field: 'threshold', type: 'quantitative' },
              strokeDash: { field: 'level', type: 'nominal', title: 'Interval level', scale: { domain: levelNames, range: levelNames.map((_, i) => LEVEL_DASHES[i % LEVEL_DASHES.length]) }, legend: { orient: 'bottom', direction: 'vertical', symbolType: 'stroke' } },
            },
          },
          {
            data: { values: rows },
            mark: { type: 'line', color: '#000000', strokeWidth: 1.2, clip: true, point: { filled: true, size: 12, color: '#000000' }, tooltip: true },
            encoding: { x, y },
          },
          {
            data: { values: best === undefined ? [] : [{ value: best }] },
            mark: { type: 'rule', color: '#0072B2', strokeWidth: 0.8 },
            encoding: { x: { field: 'value', type: 'quantitative' } },
          },
        ],
      };
    }),
  };
}

export const profilesFigure: FigureBuilder = {
  kind: 'profiles',
  description: 'χ² profiles of each fitted parameter with the confidence thresholds',
  perSightline: true,
  unavailable(ctx) {
    return ctx.input.profiles ? undefined : 'it needs the fit profiles (profiles.json), which were not given';
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const out: BuiltFigure[] = [];
    for (const id of request.sightlines) {
      const fit = ctx.fits.get(id);
      const profiles = (ctx.profiles.get(id)?.profiles ?? []).filter((p) => p.values.length > 1);
      if (!fit || profiles.length === 0) {
        ctx.warnings.push(`profiles: sightline '${id}' has no profile over a fitted parameter; no figure drawn.`);
        continue;
      }
      out.push({
        name: sightlineFigureName(request, ctx.input.fit.fits.findIndex((f) => f.sightline === id), request.sightlines.length, slug(id)),
        kind: 'profiles',
        title: `χ² profiles of ${id}`,
        caption: `Δχ² profiles of ${id} for each fitted parameter (chi² minimised over the others); the horizontal lines are the Δχ² thresholds of the intervals (${ctx.levels.map((l) => levelStatement(statedLevel(l, ctx.input.fit.levels, 1), 'Δχ²')).join('; ')}), the vertical line the best fit.`,
        sightline: id,
        spec: buildProfilesSpec(ctx, fit, profiles),
      });
    }
    return out;
  },
};
