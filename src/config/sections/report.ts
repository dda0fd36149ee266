/** `report:` section. Owned by the report room (src/report). */
import { z } from 'zod';
import { outputNameProblem } from '../output-name.ts';

/** Figure kinds the report can draw (src/report/figures/). */
export const FIGURE_KINDS = ['chi2_map', 'tracks', 'fit_vs_av', 'profiles', 'sky_map', 'posterior', 'sensitivity', 'residuals', 'ice_vs_av', 'parameters', 'sky_positions'] as const;
export type FigureKind = (typeof FIGURE_KINDS)[number];

export const figureFormat = z.enum(['svg', 'png', 'pdf']);

const figureKind = z.string().refine((k): k is FigureKind => (FIGURE_KINDS as readonly string[]).includes(k), {
  message: `unknown figure kind; the report draws: ${FIGURE_KINDS.join(', ')}`,
});

/** One requested figure: a kind alone, or a kind with its own name and choices. */
export const figureRequest = z.union([
  figureKind,
  z
    .object({
      kind: figureKind,
      /** File name stem; per-sightline figures add `_NN_<sightline>` when there are several. */
      name: z
        .string()
        .check((ctx) => {
          const problem = outputNameProblem(ctx.value);
          if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value });
        })
        .optional(),
      /** Sightlines to draw (per-sightline kinds); default: the report's `sightlines`. */
      sightlines: z.array(z.string()).min(1).optional(),
      /** Quantities to plot (tracks): labels such as `CO(s)/H2O(s)` or species such as `CO(s)`. */
      species: z.array(z.string()).min(1).optional(),
      formats: z.array(figureFormat).min(1).optional(),
    })
    .strict(),
]);
export type FigureRequestConfig = z.infer<typeof figureRequest>;

export const reportSection = z
  .object({
    /** Title of the HTML report; default: the pipeline's name. */
    title: z.string().optional(),
    /** Figures to draw; default: every kind that applies to the data. */
    figures: z.array(figureRequest).optional(),
    formats: z.array(figureFormat).min(1).default(['svg', 'png', 'pdf']),
    /** Figure width, inches: one journal column (common practice: 3.3 to 3.5 in). */
    column_width_in: z.number().min(2).max(8).default(3.4),
    /** Resolution of PNG figures, dots per inch (journals ask 300 or more for raster art: common practice). */
    png_dpi: z.number().int().min(72).max(1200).default(300),
    /** Quantities to plot in track figures (labels or species); default: every fitted quantity. */
    species: z.array(z.string()).min(1).optional(),
    /** Sightlines that get per-sightline figures; default: all of a table, none of a map. */
    sightlines: z.array(z.string()).min(1).optional(),
    /** At most this many sightlines get per-sightline figures by default (a larger survey lists them in `sightlines`). */
    max_sightline_figures: z.number().int().min(0).default(40),
    /** Runner-up models drawn faintly beside the best fit in track figures. */
    runner_up_tracks: z.number().int().min(0).max(10).default(0),
    /** Caption of the LaTeX table. */
    table_caption: z.string().optional(),
  })
  .strict();
export type ReportSection = z.infer<typeof reportSection>;

/** The section's defaults, for a pipeline file without `report:`. */
export const DEFAULT_REPORT_SECTION: ReportSection = reportSection.parse({});
