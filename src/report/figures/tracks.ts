/**
 * Abundance (or ratio) tracks against time for a sightline's best-fit model,
 * with the observed values over them: detections with their error bars,
 * upper and lower limits as triangles pointing the way the truth may lie.
 * The observations are drawn at the best-fit age (spread a little in time so
 * that quantities do not hide each other), and the age interval is shaded.
 */
import type { TopLevelSpec } from 'vega-lite';
import { levelStatement, statedLevel } from '../../fit/regions.ts';
import type { SightlineFit } from '../../fit/types.ts';
import type { ObservedQuantity } from '../../obs/types.ts';
import { slug } from '../escape.ts';
import { CATEGORY_COLOURS, CATEGORY_DASHES, figureConfig, figureSize, OBSERVATION_NAMES, OBSERVATION_SHAPES } from '../theme.ts';
import type { ModelTrack } from '../types.ts';
import { numberText } from '../numbers.ts';
import { logAxis, paddedDomain, parameterTitle } from './axes.ts';
import { sightlineFigureName, type BuiltFigure, type FigureBuilder, type FigureContext, type FigureRequest } from './builder.ts';

/** Observations of the quantities of one panel are spread this many pixels apart in time around the best age, so that no two symbols overlap. */
const OBSERVATION_STEP_PX = 9;
/** Abundances and ratios get a panel each; stacked panels are this much of a single panel's height, at least MIN_PANEL_HEIGHT. */
const STACKED_PANEL_SCALE = 0.8;
const MIN_PANEL_HEIGHT = 100;
const PANEL_SPACING = 8;
/** The y axis shows the observations and this many dex below them and above them of the tracks. */
const Y_MARGIN_BELOW_DEX = 2;
const Y_MARGIN_ABOVE_DEX = 1;
const RUNNER_UP_OPACITY = 0.35;
/** Symbol area, px², and the width of the caps of the error bars, px: caps wider than the symbol keep a 0.1 dex bar visible. */
const SYMBOL_SIZE = 24;
const CAP_WIDTH_PX = 9;
/** Triangles look smaller than circles of the same area. */
const LIMIT_SYMBOL_SIZE = 40;

function wanted(label: string, numerator: string, species: readonly string[]): boolean {
  return species.length === 0 || species.includes(label) || species.includes(numerator);
}

/** Short titles: vega reserves room for an axis title longer than its axis, which opens a gap in the figure. */
export function yTitle(quantities: readonly { denominator?: string }[]): string {
  const denominators = [...new Set(quantities.map((q) => q.denominator ?? ''))];
  if (denominators.length === 1 && denominators[0] === '') return 'X relative to H';
  if (denominators.length === 1) return `Ratio to ${denominators[0]}`;
  return 'Abundance or ratio';
}

/**
 * The y range in log10: all of the observations, and the tracks down to
 * Y_MARGIN_BELOW_DEX below and Y_MARGIN_ABOVE_DEX above them (a track falling
 * to 1e-20 early on would otherwise squash the part that is compared).
 */
function yRange(obsLog: number[], trackLog: number[]): [number, number] {
  const tLo = Math.min(...trackLog);
  const tHi = Math.max(...trackLog);
  if (obsLog.length === 0) return trackLog.length > 0 ? [tLo, tHi] : [-1, 0];
  const oLo = Math.min(...obsLog);
  const oHi = Math.max(...obsLog);
  if (trackLog.length === 0) return [oLo, oHi];
  return [Math.min(oLo, Math.max(oLo - Y_MARGIN_BELOW_DEX, tLo)), Math.max(oHi, Math.min(oHi + Y_MARGIN_ABOVE_DEX, tHi))];
}

/** A panel's quantities share a denominator (none: abundances relative to H), so they share a y axis. */
function denominatorOf(label: string, observed: readonly ObservedQuantity[]): string {
  const q = observed.find((o) => o.label === label);
  if (q) return q.denominator ?? '';
  const slash = label.indexOf('/');
  return slash >= 0 ? label.slice(slash + 1) : '';
}

/** What a sightline's best fit is, in words: density, temperature, model A_V, age (a model hash says nothing to a reader). */
export function bestFitText(fit: SightlineFit): string {
  const p = fit.best.parameters;
  const parts = [
    p.density !== undefined ? `n_H = ${numberText(p.density)} cm⁻³` : undefined,
    p.gas_temperature !== undefined ? `T = ${numberText(p.gas_temperature)} K` : undefined,
    p.visual_extinction !== undefined ? `model A_V = ${numberText(p.visual_extinction)} mag` : undefined,
    `age ${numberText(fit.best.ageYr)} yr`,
  ];
  return parts.filter((x) => x !== undefined).join(', ');
}

export function buildTracksSpec(ctx: FigureContext, fit: SightlineFit, tracks: ModelTrack[], observed: ObservedQuantity[], labels: string[]): TopLevelSpec {
  const { plotWidth, plotHeight } = figureSize(ctx.input.config.column_width_in, true);
  const bestAge = fit.best.ageYr;
  const ageInterval = fit.intervals.find((i) => i.parameter === 'age_yr' && Math.abs(i.level - ctx.levels[0]) < 1e-9);
  const lineRows: { t: number; value: number; quantity: string; model: string; role: string }[] = [];
  for (const tr of tracks) {
    tr.timesYr.forEach((t, i) => {
      const l = tr.log10[i];
      if (l !== null && Number.isFinite(l) && t > 0) lineRows.push({ t, value: 10 ** l, quantity: tr.label, model: tr.modelId, role: tr.role });
    });
  }
  // The 68 % band of the rate-coefficient realizations around a best-fit track (docs/uncertainty.md).
  const bandRows: { t: number; lo: number; hi: number; quantity: string }[] = [];
  for (const tr of tracks) {
    if (!tr.band) continue;
    tr.timesYr.forEach((t, i) => {
      if (t > 0 && Number.isFinite(tr.band!.lo[i]) && Number.isFinite(tr.band!.hi[i])) bandRows.push({ t, lo: 10 ** tr.band!.lo[i], hi: 10 ** tr.band!.hi[i], quantity: tr.label });
    });
  }
  const times = lineRows.map((r) => r.t);
  const xDomain = paddedDomain('log', times.length > 0 ? [...times, bestAge] : [bestAge], 0);
  const dexPerPx = (Math.log10(xDomain[1]) - Math.log10(xDomain[0])) / plotWidth;
  const groups = [...new Set(labels.map((l) => denominatorOf(l, observed)))].sort();
  const groupOf = new Map(labels.map((l) => [l, denominatorOf(l, observed)] as const));
  // Within a panel, each quantity its own dash and its own place beside the best age.
  const placeInGroup = new Map<string, { k: number; n: number }>();
  for (const g of groups) {
    const members = labels.filter((l) => groupOf.get(l) === g);
    members.forEach((l, k) => placeInGroup.set(l, { k, n: members.length }));
  }
  const obsRows = observed.map((q) => {
    const { k, n } = placeInGroup.get(q.label) ?? { k: 0, n: 1 };
    const shift = (k - (n - 1) / 2) * OBSERVATION_STEP_PX * dexPerPx;
    return {
      t: bestAge * 10 ** shift,
      value: 10 ** q.log10,
      lo: 10 ** (q.log10 - q.sigmaLoDex),
      hi: 10 ** (q.log10 + q.sigmaHiDex),
      quantity: q.label,
      kind: OBSERVATION_NAMES[q.kind],
      detected: q.kind === 'detection',
    };
  });
  const colour = { domain: labels, range: labels.map((_, i) => CATEGORY_COLOURS[i % CATEGORY_COLOURS.length]) };
  const dashes = { domain: labels, range: labels.map((l) => CATEGORY_DASHES[(placeInGroup.get(l)?.k ?? 0) % CATEGORY_DASHES.length]) };
  const legend = { orient: 'bottom' as const, columns: 2, symbolType: 'stroke', symbolOpacity: 1 };
  const shapeScale = { domain: Object.values(OBSERVATION_NAMES), range: Object.values(OBSERVATION_SHAPES) };
  // Above the plot, in one row: beside the quantity legend it would make the figure wider than a column.
  const shapeLegend = { orient: 'top' as const, direction: 'horizontal' as const, columns: 3, symbolFillColor: '#ffffff', symbolStrokeColor: '#000000', symbolStrokeWidth: 1, symbolSize: 40, title: null, columnPadding: 6 };
  const height = groups.length > 1 ? Math.max(MIN_PANEL_HEIGHT, Math.round(plotHeight * STACKED_PANEL_SCALE)) : plotHeight;
  const panels = groups.map((denominator, g) => {
    const inGroup = new Set(labels.filter((l) => groupOf.get(l) === denominator));
    const lines = lineRows.filter((r) => inGroup.has(r.quantity));
    const points = obsRows.filter((r) => inGroup.has(r.quantity));
    const obsLog = observed.filter((q) => inGroup.has(q.label)).flatMap((q) => [q.log10 - q.sigmaLoDex, q.log10 + q.sigmaHiDex]);
    const yDomain = paddedDomain('log', yRange(obsLog, lines.map((r) => Math.log10(r.value))).map((l) => 10 ** l), 0.05);
    const last = g === groups.length - 1;
    const x = {
      field: 't',
      type: 'quantitative' as const,
      title: last ? parameterTitle('age_yr') : null,
      scale: { type: 'log' as const, domain: xDomain, nice: false },
      axis: { ...logAxis(xDomain[0], xDomain[1]), ...(last ? {} : { labels: false }) },
    };
    const y = { field: 'value', type: 'quantitative' as const, title: yTitle([{ denominator: denominator || undefined }]), scale: { type: 'log' as const, domain: yDomain, nice: false }, axis: logAxis(yDomain[0], yDomain[1]) };
    const colourEnc = { field: 'quantity', type: 'nominal' as const, title: 'Quantity', scale: colour, legend };
    const shapeEnc = { field: 'kind', type: 'nominal' as const, title: 'Observed', scale: shapeScale, legend: shapeLegend };
    const tooltip = [
      { field: 'quantity', type: 'nominal' as const, title: 'quantity' },
      { field: 'kind', type: 'nominal' as const, title: 'observed' },
      { field: 'value', type: 'quantitative' as const, title: 'value', format: '.3~g' },
    ];
    return {
      width: plotWidth,
      height,
      layer: [
        {
          data: { values: ageInterval ? [{ lo: ageInterval.lo, hi: ageInterval.hi }] : [] },
          mark: { type: 'rect' as const, color: '#000000', opacity: 0.08 },
          encoding: { x: { field: 'lo', type: 'quantitative' as const }, x2: { field: 'hi' } },
        },
        {
          data: { values: [{ t: bestAge }] },
          mark: { type: 'rule' as const, color: '#777777', strokeWidth: 0.7, strokeDash: [2, 2] },
          encoding: { x: { field: 't', type: 'quantitative' as const } },
        },
        ...(bandRows.length > 0
          ? [
              {
                data: { values: bandRows.filter((r) => inGroup.has(r.quantity)) },
                mark: { type: 'area' as const, opacity: 0.18, clip: true },
                encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' }, color: { field: 'quantity', type: 'nominal' as const, title: 'Quantity', scale: colour, legend } },
              },
            ]
          : []),
        ...(['runner-up', 'best'] as const).map((role) => ({
          data: { values: lines.filter((r) => r.role === role) },
          mark: { type: 'line' as const, strokeWidth: role === 'best' ? 1.2 : 0.8, opacity: role === 'best' ? 1 : RUNNER_UP_OPACITY, clip: true },
          encoding: {
            x,
            y,
            color: colourEnc,
            // Same field and title as the colour: vega-lite merges the two into one legend of dashed, coloured lines.
            strokeDash: { field: 'quantity', type: 'nominal' as const, title: 'Quantity', scale: dashes, legend },
            detail: { field: 'model', type: 'nominal' as const },
          },
        })),
        {
          // Limits: filled triangles in the quantity's colour.
          data: { values: points.filter((r) => !r.detected) },
          mark: { type: 'point' as const, filled: true, size: LIMIT_SYMBOL_SIZE, stroke: '#ffffff', strokeWidth: 0.5, opacity: 1, tooltip: true, clip: true },
          encoding: { x, y, color: colourEnc, shape: shapeEnc, tooltip },
        },
        {
          // Detections: open symbols, so that the error bar drawn over them shows even when it is shorter than the symbol.
          data: { values: points.filter((r) => r.detected) },
          mark: { type: 'point' as const, filled: false, fill: '#ffffff', size: SYMBOL_SIZE, strokeWidth: 1.3, opacity: 1, tooltip: true, clip: true },
          encoding: { x, y, color: colourEnc, shape: shapeEnc, tooltip },
        },
        {
          data: { values: points.filter((r) => r.detected) },
          mark: { type: 'errorbar' as const, ticks: { size: CAP_WIDTH_PX, thickness: 1.2 }, thickness: 1.2, clip: true },
          encoding: { x, y: { ...y, field: 'lo' }, y2: { field: 'hi' }, color: colourEnc },
        },
      ],
    };
  });
  const head = { $schema: 'https://vega.github.io/schema/vega-lite/v6.json', config: figureConfig() } as const;
  return panels.length === 1 ? { ...head, ...panels[0] } : { ...head, spacing: PANEL_SPACING, vconcat: panels };
}

function bandCaption(tracks: readonly ModelTrack[]): string {
  const n = tracks.find((t) => t.band)?.band?.realizations;
  const centred = tracks.some((t) => t.band?.nearestModel !== undefined);
  return n === undefined
    ? ''
    : ` Coloured bands around the best-fit tracks: the 68 % range of ${n} Monte Carlo realizations of the rate coefficients (docs/uncertainty.md)${centred ? '; for a best fit between grid values, the range of the nearest grid model, centred on the track' : ''}.`;
}

export const tracksFigure: FigureBuilder = {
  kind: 'tracks',
  description: 'abundance or ratio tracks of the best-fit models against time with the observed values',
  perSightline: true,
  unavailable(ctx) {
    return ctx.input.tracks.length === 0 ? 'no model tracks were given for the best fits' : undefined;
  },
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[] {
    const out: BuiltFigure[] = [];
    const runnerUps = ctx.input.config.runner_up_tracks;
    for (const id of request.sightlines) {
      const fit = ctx.fits.get(id);
      if (!fit) continue;
      const runnerUpIds = new Set(fit.runnerUps.slice(0, runnerUps).map((r) => r.modelId));
      const numerators = new Map(ctx.input.quantities.map((q) => [q.label, q.numerator] as const));
      const tracks = ctx.input.tracks.filter(
        (t) => t.sightline === id && wanted(t.label, numerators.get(t.label) ?? t.label, request.species) && (t.role === 'best' || runnerUpIds.has(t.modelId)),
      );
      const observed = ctx.input.quantities.filter((q) => q.sightline === id && wanted(q.label, q.numerator, request.species));
      if (tracks.length === 0) {
        ctx.warnings.push(`tracks: no model tracks for sightline '${id}'${request.species.length > 0 ? ` and quantities ${request.species.join(', ')}` : ''}; no figure drawn.`);
        continue;
      }
      const labels = [...new Set([...observed.map((q) => q.label), ...tracks.map((t) => t.label)])];
      out.push({
        name: sightlineFigureName(request, ctx.input.fit.fits.findIndex((f) => f.sightline === id), request.sightlines.length, slug(id)),
        kind: 'tracks',
        title: `Model tracks for ${id}: best fit ${bestFitText(fit)}`,
        caption: `Abundances or ratios of the best-fit model for ${id} (${bestFitText(fit)}) against time (lines), with the observed values at the best-fit age (dotted line), spread sideways so that none hides another: detections as open circles with 1σ error bars, upper limits as downward and lower limits as upward triangles; the shaded band is the ${levelStatement(statedLevel(ctx.levels[0], ctx.input.fit.levels, 1), 'Δχ²')} age interval.${bandCaption(tracks)}`,
        sightline: id,
        spec: buildTracksSpec(ctx, fit, tracks, observed, labels),
      });
    }
    return out;
  },
};
