/**
 * The look shared by every figure: a journal column's width, DejaVu Sans
 * (bundled, so SVG, PNG, PDF and the HTML report show the same face), small
 * type as journals print it, and colour schemes that stay ordered in
 * greyscale and for colour-blind readers (viridis and cividis: perceptually
 * uniform, monotonic in lightness; Nunez, Anderton & Renslow 2018 for cividis).
 */
import type { Config } from 'vega-lite';

export const FIGURE_FONT = 'DejaVu Sans';
/** One Vega pixel is drawn as one point. */
export const PIXELS_PER_INCH = 72;
/** Room left for the y axis, its title and the colour legend beside a plot, pixels. */
const AXIS_ALLOWANCE_PX = 60;
const LEGEND_ALLOWANCE_PX = 45;
/** Plot height over plot width for single panels. */
export const PANEL_ASPECT = 0.8;

export const SEQUENTIAL_SCHEME = 'viridis' as const;
/** For chi-square maps: cividis is readable by readers with any colour vision deficiency. */
export const MAP_SCHEME = 'cividis' as const;
/**
 * Category colours for quantities (species tracks, residuals, ice panels).
 * Chosen (from Okabe & Ito's black, blue, vermillion and bluish green, the
 * rest by a greedy search of the sRGB grid) so that every colour keeps a
 * contrast of at least 3:1 against white, the WCAG 2.1 minimum for graphical
 * objects (success criterion 1.4.11), and every pair stays apart by at least
 * Delta E*ab 20 (CIE 1976) for normal vision and as deuteranopes and
 * protanopes see them (Machado, Oliveira & Fernandes 2009, severity 1):
 * test/report/palette.test.ts checks both. Ten colours; a figure with more
 * quantities repeats them, told apart by CATEGORY_DASHES.
 */
export const CATEGORY_COLOURS = ['#000000', '#0072B2', '#D55E00', '#009E73', '#0000EE', '#880000', '#4466EE', '#444444', '#660066', '#AA88AA'];
/** Dash patterns to tell lines apart in greyscale: assigned per panel, so that a panel's lines differ for up to seven quantities. */
export const CATEGORY_DASHES = [[1, 0], [4, 2], [1, 2], [6, 2, 1, 2], [2, 2], [8, 3], [3, 1, 1, 1]];
/** Minimum contrast of a category colour against the white background (WCAG 2.1, SC 1.4.11: 3:1 for graphical objects). */
export const MIN_CONTRAST_ON_WHITE = 3;
/** Marker shapes of observed values, by kind, and their legend labels. */
export const OBSERVATION_SHAPES = { detection: 'circle', upper: 'triangle-down', lower: 'triangle-up' } as const;
export const OBSERVATION_NAMES = { detection: 'detection', upper: 'upper limit', lower: 'lower limit' } as const;

export interface FigureSize {
  /** Total width of the figure, pixels (= points). */
  totalWidth: number;
  /** Width of the plotting area. */
  plotWidth: number;
  plotHeight: number;
}

export function figureSize(columnWidthIn: number, withLegend: boolean): FigureSize {
  const totalWidth = Math.round(columnWidthIn * PIXELS_PER_INCH);
  const plotWidth = Math.max(80, totalWidth - AXIS_ALLOWANCE_PX - (withLegend ? LEGEND_ALLOWANCE_PX : 0));
  return { totalWidth, plotWidth, plotHeight: Math.round(plotWidth * PANEL_ASPECT) };
}

/** Vega-Lite config for every figure. */
export function figureConfig(): Config {
  return {
    font: FIGURE_FONT,
    background: 'white',
    padding: 4,
    view: { stroke: '#000000', strokeWidth: 0.6 },
    axis: {
      labelFont: FIGURE_FONT,
      titleFont: FIGURE_FONT,
      labelFontSize: 8,
      titleFontSize: 9,
      titleFontWeight: 'normal',
      tickColor: '#000000',
      domainColor: '#000000',
      labelColor: '#000000',
      titleColor: '#000000',
      gridColor: '#dddddd',
      gridWidth: 0.5,
      labelFlush: true,
      labelOverlap: true,
    },
    legend: { labelFont: FIGURE_FONT, titleFont: FIGURE_FONT, labelFontSize: 8, titleFontSize: 8, titleFontWeight: 'normal', gradientLength: 120, gradientThickness: 10 },
    title: { font: FIGURE_FONT, fontSize: 9, fontWeight: 'normal', anchor: 'start', offset: 4, subtitleFont: FIGURE_FONT, subtitleFontSize: 8 },
    header: { labelFont: FIGURE_FONT, titleFont: FIGURE_FONT, labelFontSize: 8, titleFontSize: 9 },
    text: { font: FIGURE_FONT },
  };
}
