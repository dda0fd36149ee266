/**
 * Tables of a map's fit: one row per fitted pixel (CSV, JSON) and a summary a
 * paper can print (LaTeX, HTML): pixels fitted, poor fits, intervals at the
 * grid's edge, and the distribution of the best values over the pixels
 * (median and the central 68% of pixels, the 16th to 84th percentile: common
 * practice for a spread that is not assumed Gaussian). Every number comes
 * from the fit stage's map images (OUT/fit/map.json).
 */
import { quantileSorted } from 'simple-statistics';
import { toCsv, type CsvCell } from '../config/csv.ts';
import type { MapFitJson, MapImageName } from '../fit/types.ts';
import type { Sightline } from '../obs/types.ts';
import { escapeLatex } from './escape.ts';
import { parameterTitle } from './figures/axes.ts';
import { numberHtml, numberLatex, pValueText } from './numbers.ts';
import { pixelToWorld, readTanWcs } from './wcs.ts';

/** Percentiles bounding the central 68% of pixels (the share of a Gaussian within 1 sigma). */
export const SPREAD_PERCENTILES = [0.16, 0.84] as const;

export interface MapPixelRow {
  sightline: string;
  x: number;
  y: number;
  /** Sky position of the pixel centre from the observed maps' TAN WCS, deg; null without one. */
  ra: number | null;
  dec: number | null;
  av: number | null;
  density: number;
  densityLo: number | null;
  densityHi: number | null;
  ageYr: number;
  ageLoYr: number | null;
  ageHiYr: number | null;
  atEdge: boolean;
  chi2: number;
  dof: number;
  reducedChi2: number;
  pValue: number;
}

export interface Distribution {
  /** `density`, `age_yr`, `reduced_chi2` or `p_value`. */
  quantity: string;
  median: number;
  lo: number;
  hi: number;
  min: number;
  max: number;
}

export interface MapSummary {
  pixels: number;
  fitted: number;
  poorFits: number;
  atEdge: number;
  poorFitP: number;
  level: number;
  distributions: Distribution[];
  rows: MapPixelRow[];
}

function at(map: MapFitJson, name: MapImageName, i: number): number | null {
  const v = map.images[name][i];
  return v === null || v === undefined || !Number.isFinite(v) ? null : v;
}

export function mapSummary(map: MapFitJson, sightlines: readonly Sightline[], poorFitP: number, header?: Record<string, string | number | boolean>): MapSummary {
  const tan = header ? readTanWcs(header) : undefined;
  const wcs = typeof tan === 'object' ? tan : undefined;
  const av = new Map<number, number>();
  for (const s of sightlines) if (s.pixel && s.av !== undefined) av.set(s.pixel.y * map.nx + s.pixel.x, s.av);
  const rows: MapPixelRow[] = [];
  for (let i = 0; i < map.nx * map.ny; i++) {
    const density = at(map, 'best_density', i);
    const ageYr = at(map, 'best_age_yr', i);
    const chi2 = at(map, 'best_chi2', i);
    if (density === null || ageYr === null || chi2 === null) continue;
    const x = i % map.nx;
    const y = Math.floor(i / map.nx);
    rows.push({
      sightline: `${x},${y}`,
      x,
      y,
      ra: wcs ? pixelToWorld(wcs, x, y)[0] : null,
      dec: wcs ? pixelToWorld(wcs, x, y)[1] : null,
      av: av.get(i) ?? null,
      density,
      densityLo: at(map, 'density_lo', i),
      densityHi: at(map, 'density_hi', i),
      ageYr,
      ageLoYr: at(map, 'age_lo_yr', i),
      ageHiYr: at(map, 'age_hi_yr', i),
      atEdge: at(map, 'at_edge', i) === 1,
      chi2,
      dof: at(map, 'dof', i) ?? Number.NaN,
      reducedChi2: at(map, 'reduced_chi2', i) ?? Number.NaN,
      pValue: at(map, 'p_value', i) ?? Number.NaN,
    });
  }
  const distribution = (quantity: string, values: number[]): Distribution => {
    const sorted = values.filter(Number.isFinite).sort((a, b) => a - b);
    if (sorted.length === 0) return { quantity, median: Number.NaN, lo: Number.NaN, hi: Number.NaN, min: Number.NaN, max: Number.NaN };
    return { quantity, median: quantileSorted(sorted, 0.5), lo: quantileSorted(sorted, SPREAD_PERCENTILES[0]), hi: quantileSorted(sorted, SPREAD_PERCENTILES[1]), min: sorted[0], max: sorted[sorted.length - 1] };
  };
  return {
    pixels: map.nx * map.ny,
    fitted: rows.length,
    poorFits: rows.filter((r) => r.pValue < poorFitP).length,
    atEdge: rows.filter((r) => r.atEdge).length,
    poorFitP,
    level: map.level.level,
    distributions: [
      distribution('density', rows.map((r) => r.density)),
      distribution('age_yr', rows.map((r) => r.ageYr)),
      distribution('reduced_chi2', rows.map((r) => r.reducedChi2)),
      distribution('p_value', rows.map((r) => r.pValue)),
    ],
    rows,
  };
}

export function mapPixelsCsv(summary: MapSummary): string {
  const header = ['sightline', 'x', 'y', 'ra_deg', 'dec_deg', 'av_mag', 'density', 'density_lo', 'density_hi', 'age_yr', 'age_yr_lo', 'age_yr_hi', 'at_edge', 'level', 'chi2', 'dof', 'reduced_chi2', 'p_value'];
  const rows = summary.rows.map((r): CsvCell[] => [r.sightline, r.x, r.y, r.ra, r.dec, r.av, r.density, r.densityLo, r.densityHi, r.ageYr, r.ageLoYr, r.ageHiYr, r.atEdge, summary.level, r.chi2, r.dof, r.reducedChi2, r.pValue]);
  return toCsv(header, rows);
}

export function mapSummaryJson(summary: MapSummary): string {
  return `${JSON.stringify({ format: 'hoarfrost-report-map-table/1', ...summary }, null, 2)}\n`;
}

const LATEX_NAMES: Record<string, string> = {
  density: '$n_{\\rm H}$ (cm$^{-3}$)',
  age_yr: 'Age (yr)',
  reduced_chi2: '$\\chi^2$/dof',
  p_value: '$p$',
};
const HTML_NAMES: Record<string, string> = { reduced_chi2: 'χ²/dof', p_value: 'p' };

export function mapSummaryLatex(summary: MapSummary, caption: string | undefined): string {
  const text = caption !== undefined ? escapeLatex(caption) : 'Best-fitting models over the pixels of the map';
  const body = summary.distributions.map((d) => {
    // p-values keep the digits that tell them from 1 (0.9999 is not 1.0).
    const n = (x: number) => `$${d.quantity === 'p_value' ? pValueText(x, 'latex') : numberLatex(x)}$`;
    return [LATEX_NAMES[d.quantity] ?? escapeLatex(d.quantity), n(d.median), `${n(d.lo)}--${n(d.hi)}`, `${n(d.min)}--${n(d.max)}`].join(' & ');
  });
  const pct = `${Number((summary.level * 100).toFixed(1))}\\%`;
  return [
    '% Summary of a map fit written by hoarfrost: AASTeX deluxetable layout.',
    '\\begin{deluxetable}{lccc}',
    '\\tabletypesize{\\footnotesize}',
    '\\tablewidth{0pt}',
    `\\tablecaption{${text}\\label{tab:map_fits}}`,
    '\\tablehead{\\colhead{Quantity} & \\colhead{Median} & \\colhead{16th--84th percentile} & \\colhead{Range}}',
    '\\startdata',
    body.join(' \\\\\n'),
    '\\enddata',
    `\\tablecomments{${summary.fitted} of ${summary.pixels} pixels fitted; ${summary.poorFits} poor fit${summary.poorFits === 1 ? '' : 's'} ($p < ${summary.poorFitP}$); ${summary.atEdge} pixel${summary.atEdge === 1 ? '' : 's'} with a ${pct} density or age interval reaching the edge of the model grid. Percentiles are over the fitted pixels' best values; the per-pixel values and intervals are in the CSV table and the FITS images.}`,
    '\\end{deluxetable}',
    '',
  ].join('\n');
}

export function mapSummaryHtml(summary: MapSummary): string {
  const counts = `<p>${summary.fitted} of ${summary.pixels} pixels fitted; <span${summary.poorFits > 0 ? ' class="poor"' : ''}>${summary.poorFits} poor fit${summary.poorFits === 1 ? '' : 's'}</span> (p &lt; ${summary.poorFitP}); ${summary.atEdge} with a ${Number((summary.level * 100).toFixed(1))}% density or age interval reaching the grid's edge.</p>`;
  const rows = summary.distributions.map((d) => {
    const n = (x: number) => (d.quantity === 'p_value' ? pValueText(x, 'html') : numberHtml(x));
    return `<tr><th scope="row">${HTML_NAMES[d.quantity] ?? parameterTitle(d.quantity)}</th><td>${n(d.median)}</td><td>${n(d.lo)}–${n(d.hi)}</td><td>${n(d.min)}–${n(d.max)}</td></tr>`;
  });
  return `${counts}\n<table class="summary"><thead><tr><th scope="col">Over the fitted pixels</th><th scope="col">Median</th><th scope="col">16th–84th percentile</th><th scope="col">Range</th></tr></thead><tbody>${rows.join('')}</tbody></table>`;
}
