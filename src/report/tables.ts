/**
 * Tables of best fits with their intervals for a paper: CSV (RFC 4180),
 * JSON, and LaTeX in the AASTeX `deluxetable` layout (AAS Journals' AASTeX
 * 6.3 guide: \tablehead with \colhead, \startdata ... \enddata,
 * \tablenotetext, \tablecomments). Every text from user files is escaped.
 * The tables hold no time stamps or paths, so the same run gives the same bytes.
 */
import { toCsv, type CsvCell } from '../config/csv.ts';
import { intervalReading, statedLevel, TABLE_LEVEL } from '../fit/regions.ts';
import type { JointFit, ParameterInterval, SightlineFit } from '../fit/types.ts';
import { escapeLatex } from './escape.ts';
import { chi2DofText, numberLatex, pValueText } from './numbers.ts';
import type { ReportInput } from './types.ts';

export interface ParameterCell {
  parameter: string;
  best: number;
  lo: number | null;
  hi: number | null;
  loAtEdge: boolean;
  hiAtEdge: boolean;
  /** Only the best grid value lies inside: narrower than the grid spacing. */
  unresolved: boolean;
  /** Values between lo and hi lie outside the region: the region has several parts. */
  disjoint: boolean;
}

export interface SummaryRow {
  sightline: string;
  av: number | null;
  parameters: ParameterCell[];
  chi2: number;
  dof: number;
  reducedChi2: number;
  pValue: number;
  agreement: number;
  /** Observed quantities that entered the fit (detections and limits). */
  used: number;
  warnings: string[];
}

export interface SummaryTable {
  /** Confidence level of the intervals shown. */
  level: number;
  /** Delta chi^2 threshold of that level and its p (1: one-parameter intervals; more: projected). */
  deltaChi2: number;
  parametersOfInterest: number;
  /** Fitted parameters, in the fit stage's order (grid conditions, then age_yr). */
  parameters: string[];
  rows: SummaryRow[];
  /** p-value below which the fit stage calls a fit poor. */
  poorFitP: number;
}

export function summaryTable(input: ReportInput): SummaryTable {
  const levels = [...new Set(input.fit.levels.map((l) => l.level))].sort((a, b) => a - b);
  const level = levels[0] ?? TABLE_LEVEL;
  const av = new Map(input.observations.sightlines.map((s) => [s.id, s.av] as const));
  const parameters = orderParameters(input.fit.fittedParameters);
  const rows = input.fit.fits.map((fit) => ({
    sightline: fit.sightline,
    av: av.get(fit.sightline) ?? null,
    parameters: parameters.map((p) => cell(fit, p, level)),
    chi2: fit.best.chi2,
    dof: fit.dof,
    reducedChi2: fit.reducedChi2,
    pValue: fit.pValue,
    agreement: fit.agreementFraction,
    used: fit.counts.detections + fit.counts.upperLimits + fit.counts.lowerLimits,
    warnings: fit.warnings,
  }));
  // A fit.json written before p was stated used p = 2 for its intervals.
  const stated = statedLevel(level, input.fit.levels, 2);
  return { level, deltaChi2: stated.deltaChi2, parametersOfInterest: stated.parametersOfInterest, parameters, rows, poorFitP: input.fit.poorFitP };
}

/** Density and age first (the quantities a reader looks for), the rest in the fit's order. */
export function orderParameters(fitted: readonly string[]): string[] {
  const first = ['density', 'age_yr'].filter((p) => fitted.includes(p));
  return [...first, ...fitted.filter((p) => !first.includes(p))];
}

function cell(fit: SightlineFit, parameter: string, level: number): ParameterCell {
  const iv: ParameterInterval | undefined = fit.intervals.find((i) => i.parameter === parameter && Math.abs(i.level - level) < 1e-9);
  const best = parameter === 'age_yr' ? fit.best.ageYr : fit.best.parameters[parameter];
  return { parameter, best, lo: iv?.lo ?? null, hi: iv?.hi ?? null, loAtEdge: iv?.loAtEdge ?? false, hiAtEdge: iv?.hiAtEdge ?? false, unresolved: iv?.unresolved ?? false, disjoint: iv?.disjoint ?? false };
}

// ---------------------------------------------------------------- CSV

export function summaryCsv(table: SummaryTable): string {
  const header = ['sightline', 'av_mag'];
  for (const p of table.parameters) header.push(p, `${p}_lo`, `${p}_hi`, `${p}_at_edge`, `${p}_unresolved`, `${p}_disjoint`);
  header.push('level', 'delta_chi2', 'parameters_of_interest', 'chi2', 'dof', 'reduced_chi2', 'p_value', 'agreement', 'warnings');
  const rows = table.rows.map((r) => {
    const f: CsvCell[] = [r.sightline, r.av];
    for (const c of r.parameters) f.push(c.best, c.lo, c.hi, c.loAtEdge || c.hiAtEdge, c.unresolved, c.disjoint);
    f.push(table.level, table.deltaChi2, table.parametersOfInterest, r.chi2, r.dof, r.reducedChi2, r.pValue, r.agreement, r.warnings.join('; '));
    return f;
  });
  return toCsv(header, rows);
}

// ---------------------------------------------------------------- JSON

export function summaryJson(table: SummaryTable, input: ReportInput): string {
  const joint = input.fit.joint.map((j) => ({
    name: j.name,
    members: j.members,
    shared: j.sharedBest,
    chi2: j.chi2,
    dof: j.dof,
    pValue: j.pValue,
    intervals: j.intervals.filter((i) => Math.abs(i.level - table.level) < 1e-9),
    warnings: j.warnings,
  }));
  return `${JSON.stringify({ format: 'hoarfrost-report-table/1', level: table.level, deltaChi2: table.deltaChi2, parametersOfInterest: table.parametersOfInterest, parameters: table.parameters, rows: table.rows, joint }, null, 2)}\n`;
}

// ---------------------------------------------------------------- LaTeX

const LATEX_HEADS: Record<string, [string, string]> = {
  density: ['$n_{\\rm H}$', '(cm$^{-3}$)'],
  age_yr: ['Age', '(yr)'],
  gas_temperature: ['$T_{\\rm gas}$', '(K)'],
  dust_temperature: ['$T_{\\rm dust}$', '(K)'],
  visual_extinction: ['$A_V^{\\rm model}$', '(mag)'],
  cr_ionisation_rate: ['$\\zeta$', '(s$^{-1}$)'],
  uv_field: ['$G_0$', '(Habing)'],
  diffusion_ratio: ['$E_{\\rm diff}/E_{\\rm b}$', ''],
  grain_radius: ['$a$', '($\\mu$m)'],
  dust_to_gas: ['Dust/gas', ''],
  reactive_desorption: ['$f_{\\rm RD}$', ''],
};

function latexCell(c: ParameterCell): string {
  const note = [c.loAtEdge || c.hiAtEdge ? 'a' : '', c.unresolved ? 'c' : '', c.disjoint ? 'd' : ''].filter((n) => n !== '').map((n) => `\\tablenotemark{${n}}`).join('');
  if (c.lo === null || c.hi === null) return `$${numberLatex(c.best)}$${note}`;
  return `$${numberLatex(c.best)}$ ($${numberLatex(c.lo)}$--$${numberLatex(c.hi)}$)${note}`;
}

/** Notes of the LaTeX table by mark; only the marks some row uses are defined. */
function tableNotes(poorFitP: number): Record<string, string> {
  return {
    a: 'The interval reaches the edge of the model grid: the true range may extend beyond it.',
    b: `Poor fit: $p < ${poorFitP}$.`,
    c: 'Only the best grid value lies inside the interval: it is narrower than the grid spacing there.',
    d: 'The region has several disjoint parts: grid values between the bounds lie outside it.',
  };
}

/** A joint group's row: the shared parameters with their intervals, the others profiled per member (no one value). */
function jointLatexRow(j: JointFit, table: SummaryTable): string {
  const cells = table.parameters.map((p) => {
    if (!j.shared.includes(p)) return '\\nodata';
    const iv = j.intervals.find((i) => i.parameter === p && Math.abs(i.level - table.level) < 1e-9);
    return latexCell({ parameter: p, best: j.sharedBest[p], lo: iv?.lo ?? null, hi: iv?.hi ?? null, loAtEdge: iv?.loAtEdge ?? false, hiAtEdge: iv?.hiAtEdge ?? false, unresolved: iv?.unresolved ?? false, disjoint: iv?.disjoint ?? false });
  });
  const poor = j.pValue < table.poorFitP ? '\\tablenotemark{b}' : '';
  return [`${escapeLatex(j.name)} (${j.members.map(escapeLatex).join(', ')})`, '\\nodata', ...cells, chi2DofText(j.chi2, j.dof), `$${pValueText(j.pValue, 'latex')}$${poor}`].join(' & ');
}

export function summaryLatex(table: SummaryTable, caption: string | undefined, joint: readonly JointFit[] = []): string {
  const pct = `${Number((table.level * 100).toFixed(1))}\\%`;
  const threshold = `$\\Delta\\chi^2 \\le ${table.deltaChi2.toFixed(2)}$`;
  const reading = table.parametersOfInterest === 1 ? 'one-parameter' : `projected from the ${table.parametersOfInterest}-parameter region`;
  const text = caption !== undefined ? escapeLatex(caption) : `Best-fitting models with ${pct} confidence intervals (${threshold}, ${reading})`;
  const heads = table.parameters.map((p) => LATEX_HEADS[p] ?? [escapeLatex(p), '']);
  const columns = `lr${'c'.repeat(heads.length)}rr`;
  const head1 = ['Sightline', '$A_V$', ...heads.map((h) => h[0]), '$\\chi^2$/dof', '$p$'];
  const head2 = ['', '(mag)', ...heads.map((h) => h[1]), '', ''];
  const colheads = (cells: string[]) => cells.map((c) => `\\colhead{${c}}`).join(' & ');
  const body = table.rows.map((r) => {
    const poor = r.pValue < table.poorFitP ? '\\tablenotemark{b}' : '';
    const cells = [
      escapeLatex(r.sightline),
      r.av === null ? '\\nodata' : `${Number(r.av.toPrecision(3))}`,
      ...r.parameters.map(latexCell),
      chi2DofText(r.chi2, r.dof),
      `$${pValueText(r.pValue, 'latex')}$${poor}`,
    ];
    return cells.join(' & ');
  });
  const jointRows = joint.map((j) => jointLatexRow(j, table));
  const rows = [...body, ...(jointRows.length > 0 ? [`\\cutinhead{Joint fits: parameters shared by the group}\n${jointRows[0]}`, ...jointRows.slice(1)] : [])];
  const allText = rows.join('\n');
  const notes = Object.entries(tableNotes(table.poorFitP)).filter(([mark]) => allText.includes(`\\tablenotemark{${mark}}`));
  const jointComment = joint.length > 0 ? ' Joint fits: one value of each shared parameter for the whole group (listed in parentheses); the other parameters are fitted per sightline and have no single value.' : '';
  return [
    '% Best fits written by hoarfrost: AASTeX deluxetable layout.',
    `\\begin{deluxetable*}{${columns}}`,
    '\\tabletypesize{\\footnotesize}',
    '\\tablewidth{0pt}',
    `\\tablecaption{${text}\\label{tab:best_fits}}`,
    `\\tablehead{${colheads(head1)} \\\\`,
    `  ${colheads(head2)}}`,
    '\\startdata',
    rows.join(' \\\\\n'),
    '\\enddata',
    `\\tablecomments{Intervals are the ${pct} confidence intervals of ${table.parametersOfInterest === 1 ? 'each parameter alone' : `each parameter read as the projection of the joint region of ${table.parametersOfInterest} parameters`}: the values whose profile $\\chi^2$ (minimised over the other parameters) lies within ${threshold} of the minimum (Avni 1976; ${intervalReading(table.parametersOfInterest)}). A best fit is a statement about the model grid, not a measurement of the cloud.${jointComment}}`,
    ...notes.map(([mark, note]) => `\\tablenotetext{${mark}}{${note}}`),
    '\\end{deluxetable*}',
    '',
  ].join('\n');
}
