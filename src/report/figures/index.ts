/**
 * The figure kinds and the resolution of the pipeline's `report.figures`
 * into requests: defaults filled in, unknown kinds, unknown sightlines,
 * unsafe or repeated names refused with a UserError naming the field.
 */
import { FIGURE_KINDS, type FigureKind, type FigureRequestConfig } from '../../config/sections/report.ts';
import { throwProblems, UserError } from '../../config/errors.ts';
import { DEFAULT_LEVELS } from '../../fit/regions.ts';
import { checkOutputName, outputNameProblem } from '../paths.ts';
import type { ReportInput } from '../types.ts';
import type { BuiltFigure, FigureBuilder, FigureContext, FigureRequest } from './builder.ts';
import { chi2MapFigure } from './chi2-map.ts';
import { fitVsAvFigure } from './fit-vs-av.ts';
import { posteriorFigure } from './posterior.ts';
import { iceVsAvFigure } from './ice-vs-av.ts';
import { parametersFigure } from './parameters.ts';
import { profilesFigure } from './profiles.ts';
import { residualsFigure } from './residuals.ts';
import { skyMapFigure } from './sky-map.ts';
import { skyPositionsFigure } from './sky-positions.ts';
import { tracksFigure } from './tracks.ts';
import { sensitivityFigure } from './sensitivity.ts';

export const FIGURE_BUILDERS: Record<FigureKind, FigureBuilder> = {
  chi2_map: chi2MapFigure,
  tracks: tracksFigure,
  fit_vs_av: fitVsAvFigure,
  profiles: profilesFigure,
  sky_map: skyMapFigure,
  posterior: posteriorFigure,
  sensitivity: sensitivityFigure,
  residuals: residualsFigure,
  ice_vs_av: iceVsAvFigure,
  parameters: parametersFigure,
  sky_positions: skyPositionsFigure,
};

/** Kinds drawn when the pipeline lists none, in this order (sky maps only for map observations). */
const DEFAULT_KINDS: Record<'table' | 'map', FigureKind[]> = {
  table: ['residuals', 'ice_vs_av', 'fit_vs_av', 'parameters', 'sky_positions', 'chi2_map', 'profiles', 'posterior', 'tracks', 'sensitivity'],
  map: ['sky_map', 'fit_vs_av'],
};
/** Per-sightline kinds, drawn by default for a map only at the pixels listed in `report.sightlines`. */
const PER_SIGHTLINE_KINDS: FigureKind[] = ['chi2_map', 'profiles', 'posterior', 'tracks', 'sensitivity'];

export function figureContext(input: ReportInput, warnings: string[]): FigureContext {
  const levels = [...new Set(input.fit.levels.map((l) => l.level))].sort((a, b) => a - b);
  return {
    input,
    fits: new Map(input.fit.fits.map((f) => [f.sightline, f] as const)),
    profiles: new Map((input.profiles?.sightlines ?? []).map((p) => [p.sightline, p] as const)),
    levels: levels.length > 0 ? levels : [...DEFAULT_LEVELS],
    warnings,
  };
}

function where(input: ReportInput, field: string): { file?: string; field: string } {
  return { file: input.configFile, field };
}

/** The sightlines that get per-sightline figures by default (a cut is reported once). */
function defaultSightlines(input: ReportInput, warnings: string[]): string[] {
  const cfg = input.config;
  if (cfg.sightlines) return cfg.sightlines;
  if (input.observations.kind === 'map') return [];
  const n = input.fit.fits.length;
  const cut = `per-sightline figures are drawn for the first ${cfg.max_sightline_figures} of ${n} sightlines; list the ones you want in report.sightlines or raise report.max_sightline_figures.`;
  if (n > cfg.max_sightline_figures && !warnings.includes(cut)) warnings.push(cut);
  return input.fit.fits.slice(0, cfg.max_sightline_figures).map((f) => f.sightline);
}

export function resolveRequests(input: ReportInput, ctx: FigureContext): FigureRequest[] {
  const problems: UserError[] = [];
  const known = new Set(input.fit.fits.map((f) => f.sightline));
  const checkSightlines = (list: string[], field: string): void => {
    const missing = list.filter((s) => !known.has(s));
    if (missing.length > 0) {
      const sample = [...known].slice(0, 8).map((s) => `'${s}'`).join(', ');
      problems.push(new UserError(`sightline${missing.length > 1 ? 's' : ''} ${missing.map((s) => `'${s}'`).join(', ')} ha${missing.length > 1 ? 've' : 's'} no fit; the fitted sightlines include ${sample}${known.size > 8 ? ', ...' : ''}. Check the spelling.`, where(input, field)));
    }
  };
  if (input.config.sightlines) checkSightlines(input.config.sightlines, 'report.sightlines');
  const quantityNames = new Set([...input.quantities.flatMap((q) => [q.label, q.numerator]), ...input.tracks.map((t) => t.label)]);
  const checkSpecies = (list: string[], field: string): void => {
    const missing = list.filter((s) => !quantityNames.has(s));
    if (missing.length > 0) {
      const labels = [...new Set(input.quantities.map((q) => q.label))].map((l) => `'${l}'`).join(', ');
      problems.push(new UserError(`${missing.map((s) => `'${s}'`).join(', ')} ${missing.length > 1 ? 'are' : 'is'} not among the fitted quantities; name a quantity (${labels}) or its species.`, where(input, field)));
    }
  };
  if (input.config.species) checkSpecies(input.config.species, 'report.species');
  const raw: { cfg: Exclude<FigureRequestConfig, string> | { kind: string }; field: string; explicit: boolean }[] = input.config.figures
    ? input.config.figures.map((f, i) => ({ cfg: typeof f === 'string' ? { kind: f } : f, field: `report.figures[${i}]`, explicit: true }))
    : [...DEFAULT_KINDS[input.observations.kind], ...(input.observations.kind === 'map' && input.config.sightlines ? PER_SIGHTLINE_KINDS : [])]
        // A fit read by its profile alone (fit.method: profile) chose no posterior: no note that its figure is missing.
        .filter((kind) => kind !== 'posterior' || input.fit.fits.some((f) => f.posterior !== undefined))
        // The sensitivity figure is a default only of a run with realizations; without them it is not missed.
        .filter((kind) => kind !== 'sensitivity' || input.sensitivity !== undefined)
        // Sightlines without positions (no RA/Dec column) have no sky figure to miss.
        .filter((kind) => kind !== 'sky_positions' || input.observations.sightlines.some((s) => s.ra !== undefined && s.dec !== undefined))
        .map((kind) => ({ cfg: { kind }, field: 'report.figures', explicit: false }));
  const requests: FigureRequest[] = [];
  const names = new Map<string, string>();
  for (const { cfg, field, explicit } of raw) {
    const builder = (FIGURE_BUILDERS as Record<string, FigureBuilder | undefined>)[cfg.kind];
    if (!builder) {
      problems.push(new UserError(`there is no figure kind '${cfg.kind}'. The report draws: ${FIGURE_KINDS.map((k) => `${k} (${FIGURE_BUILDERS[k].description})`).join('; ')}.`, where(input, `${field}.kind`)));
      continue;
    }
    const why = builder.unavailable(ctx);
    if (why) {
      if (explicit) problems.push(new UserError(`the figure '${cfg.kind}' cannot be drawn: ${why}. Remove it from report.figures.`, where(input, field)));
      else ctx.warnings.push(`${cfg.kind}: not drawn: ${why}.`);
      continue;
    }
    const full = cfg as Exclude<FigureRequestConfig, string>;
    const name = full.name ?? cfg.kind;
    const nameProblem = outputNameProblem(name);
    if (nameProblem) {
      problems.push(new UserError(nameProblem, where(input, `${field}.name`)));
      continue;
    }
    if (names.has(name)) {
      problems.push(new UserError(`the figure name '${name}' is used twice (also at ${names.get(name)}); give each figure its own name.`, where(input, `${field}.name`)));
      continue;
    }
    names.set(name, field);
    const sightlines = full.sightlines ?? (builder.perSightline ? defaultSightlines(input, ctx.warnings) : []);
    if (full.sightlines) checkSightlines(full.sightlines, `${field}.sightlines`);
    if (full.species) checkSpecies(full.species, `${field}.species`);
    requests.push({ kind: builder.kind, name, named: full.name !== undefined, explicit, sightlines, species: full.species ?? input.config.species ?? [], formats: full.formats, field });
  }
  throwProblems(problems, `${problems.length} problems in the report section:`, { file: input.configFile });
  return requests;
}

/** Every figure of the report, names checked unique across kinds. */
export function buildFigures(input: ReportInput, warnings: string[]): BuiltFigure[] {
  const ctx = figureContext(input, warnings);
  const figures: BuiltFigure[] = [];
  const seen = new Map<string, FigureKind>();
  for (const request of resolveRequests(input, ctx)) {
    for (const fig of FIGURE_BUILDERS[request.kind].build(ctx, request)) {
      checkOutputName(fig.name, `${request.field}.name`, input.configFile);
      const other = seen.get(fig.name);
      if (other) throw new UserError(`two figures would be written as '${fig.name}' (${other} and ${fig.kind}); give one of them another name in report.figures.`, where(input, request.field));
      seen.set(fig.name, fig.kind);
      figures.push(request.formats ? { ...fig, formats: request.formats } : fig);
    }
  }
  return figures;
}
