/**
 * Figures of the Monte Carlo realizations (docs/uncertainty.md): abundances
 * against time with the one-sigma band of the realizations around the
 * median, and the reactions a value hangs on as a bar chart of correlation
 * coefficients. Plain rows in, a Vega-Lite spec out.
 */
import type { TopLevelSpec } from 'vega-lite';
import { CATEGORY_COLOURS, CATEGORY_DASHES, figureConfig } from '../theme.ts';
import { logAxis } from './axes.ts';

export interface SpreadRow {
  time_yr: number;
  species: string;
  /** Abundances relative to H: the median and the 15.9 % and 84.1 % quantiles of the realizations. */
  median: number;
  lo: number;
  hi: number;
}

/** Abundances below this are not drawn on the log axis (they are all in the CSV). */
export const SPREAD_FIGURE_FLOOR = 1e-14;

export function spreadBandsSpec(rows: readonly SpreadRow[], species: readonly string[], title: string, realizations: number): TopLevelSpec {
  const values = rows.filter((r) => r.hi >= SPREAD_FIGURE_FLOOR).map((r) => ({ ...r, lo: Math.max(r.lo, SPREAD_FIGURE_FLOOR), median: Math.max(r.median, SPREAD_FIGURE_FLOOR) }));
  const times = values.map((v) => v.time_yr);
  const tLo = Math.min(...times);
  const tHi = Math.max(...times);
  const yHi = values.reduce((m, v) => Math.max(m, v.hi), SPREAD_FIGURE_FLOOR * 10);
  const x = { field: 'time_yr', type: 'quantitative' as const, title: 'Time (yr)', scale: { type: 'log' as const, domain: [tLo, tHi], nice: false }, axis: logAxis(tLo, tHi) };
  const yScale = { type: 'log' as const, domain: [SPREAD_FIGURE_FLOOR, yHi], nice: false };
  const colour = { field: 'species', type: 'nominal' as const, title: 'Species', sort: [...species], scale: { domain: [...species], range: CATEGORY_COLOURS } };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: { text: title, subtitle: `median and 68 % band of ${realizations} realizations of the rate coefficients; below ${SPREAD_FIGURE_FLOOR} not drawn` },
    width: 300,
    height: 220,
    data: { values },
    encoding: { x, color: colour },
    layer: [
      {
        mark: { type: 'area', opacity: 0.25, clip: true },
        encoding: { y: { field: 'lo', type: 'quantitative', title: 'Abundance relative to H', scale: yScale, axis: logAxis(SPREAD_FIGURE_FLOOR, yHi) }, y2: { field: 'hi' } },
      },
      {
        mark: { type: 'line', strokeWidth: 1.2, clip: true },
        encoding: {
          y: { field: 'median', type: 'quantitative', scale: yScale },
          strokeDash: { field: 'species', type: 'nominal', title: 'Species', sort: [...species], scale: { domain: [...species], range: CATEGORY_DASHES } },
        },
      },
    ],
    config: figureConfig(),
  };
}

export interface SensitivityBar {
  /** Reaction as the reader sees it: number and equation. */
  reaction: string;
  coefficient: number;
}

/**
 * The top reactions of one value, strongest first, as horizontal bars of the
 * correlation coefficient (-1 to 1), with dashed lines at the coefficient
 * chance alone reaches when it is known.
 */
/** `title` undefined: no title inside the figure (the report's figures carry their title and caption outside). */
export function sensitivityBarsSpec(bars: readonly SensitivityBar[], title: string | undefined, subtitle: string, valueName: string, chance?: number | null): TopLevelSpec {
  const x = { field: 'coefficient', type: 'quantitative' as const, title: `Correlation of log k with ${valueName}`, scale: { domain: [-1, 1] } };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    ...(title !== undefined ? { title: { text: title, subtitle } } : {}),
    width: 240,
    height: { step: 14 },
    layer: [
      {
        data: { values: bars.map((b) => ({ ...b, sign: b.coefficient >= 0 ? 'raises it' : 'lowers it' })) },
        mark: { type: 'bar' },
        encoding: {
          y: { field: 'reaction', type: 'nominal', sort: null, title: null, axis: { labelLimit: 260 } },
          x,
          color: { field: 'sign', type: 'nominal', title: 'A larger k', scale: { domain: ['raises it', 'lowers it'], range: [CATEGORY_COLOURS[5], CATEGORY_COLOURS[4]] } },
        },
      },
      {
        data: { values: chance === undefined || chance === null ? [] : [{ coefficient: -chance }, { coefficient: chance }] },
        mark: { type: 'rule', color: '#555555', strokeDash: [3, 3], strokeWidth: 0.8 },
        encoding: { x },
      },
    ],
    config: figureConfig(),
  };
}
