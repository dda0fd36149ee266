/**
 * The shape every figure builder has: from the report's input and one
 * resolved request, a list of figures (one per sightline for per-sightline
 * kinds, one per image for sky maps, one for the survey-wide kinds), each a
 * typed Vega-Lite spec with its file name stem, title and caption.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { FigureKind } from '../../config/sections/report.ts';
import type { SightlineFit, SightlineProfiles } from '../../fit/types.ts';
import type { ReportInput } from '../types.ts';

export interface BuiltFigure {
  /** File name stem, already checked safe. */
  name: string;
  kind: FigureKind;
  title: string;
  /** One sentence for the HTML report, plain text (escaped where shown). */
  caption: string;
  sightline?: string;
  spec: TopLevelSpec;
  /** Formats the pipeline asked for this figure; default: the report's. */
  formats?: ('svg' | 'png' | 'pdf')[];
}

/** A figure request with the report's defaults filled in. */
export interface FigureRequest {
  kind: FigureKind;
  /** File name stem (the kind's name unless the pipeline gave one). */
  name: string;
  /** Whether the pipeline named this figure (one sightline then keeps the name as given). */
  named: boolean;
  /** Whether the pipeline asked for it (a default figure that does not apply is skipped, an asked one is an error). */
  explicit: boolean;
  sightlines: string[];
  /** Quantity labels or species to plot (tracks); empty: all. */
  species: string[];
  formats?: ('svg' | 'png' | 'pdf')[];
  /** Where the request sits in the pipeline file, for error messages. */
  field: string;
}

export interface FigureContext {
  input: ReportInput;
  fits: Map<string, SightlineFit>;
  profiles: Map<string, SightlineProfiles>;
  /** Confidence levels of the fit, ascending (e.g. 0.683, 0.954). */
  levels: number[];
  /** Figures that could not be drawn and why. */
  warnings: string[];
}

export interface FigureBuilder {
  kind: FigureKind;
  /** What the kind draws, for messages. */
  description: string;
  /** Why this kind cannot be drawn for this input, or undefined when it can. */
  unavailable(ctx: FigureContext): string | undefined;
  /** Whether figures are drawn per sightline (then `request.sightlines` applies). */
  perSightline: boolean;
  build(ctx: FigureContext, request: FigureRequest): BuiltFigure[];
}

/** Level as a label: 0.683 -> `68.3%`. */
export function levelLabel(level: number): string {
  return `${Number((level * 100).toFixed(1))}%`;
}

/** Name of one per-sightline figure: the request's name, with the sightline's place and a safe slug when there are several. */
export function sightlineFigureName(request: FigureRequest, index: number, count: number, slugText: string): string {
  if (request.named && count === 1) return request.name;
  return `${request.name}_${String(index + 1).padStart(2, '0')}_${slugText}`;
}

/** Value of a parameter (a grid condition or age_yr) at a fit's best candidate. */
export function bestValue(fit: SightlineFit, parameter: string): number | undefined {
  return parameter === 'age_yr' ? fit.best.ageYr : fit.best.parameters[parameter];
}
