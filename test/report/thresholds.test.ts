/**
 * Every table and figure caption states the Delta chi^2 threshold of its
 * intervals and whether they are one-parameter intervals or projections of a
 * joint region (Avni 1976; docs/statistics.md section 5).
 */
import { describe, expect, it } from 'vitest';
import { summaryCsv, summaryLatex, summaryTable } from '../../src/report/tables.ts';
import { syntheticInput } from './fixture.ts';

describe('thresholds stated with the intervals', () => {
  it('the LaTeX table, its CSV and its caption name the threshold and the reading; disjoint regions get a note', () => {
    const input = syntheticInput();
    const table = summaryTable(input);
    expect(table.parametersOfInterest).toBe(1);
    expect(table.deltaChi2).toBeCloseTo(1.0, 2);
    table.rows[0].parameters[0].disjoint = true;
    const tex = summaryLatex(table, undefined);
    expect(tex).toContain('\\Delta\\chi^2 \\le 1.00');
    expect(tex).toContain('one-parameter');
    expect(tex).toMatch(/\\tablenotemark\{d\}/);
    expect(tex).toContain('\\tablenotetext{d}');
    // A caption of the user's own keeps the statement in the table comments.
    expect(summaryLatex(table, 'Fits of the invented cloud')).toContain('within $\\Delta\\chi^2 \\le 1.00$ of the minimum');
    const csv = summaryCsv(table);
    expect(csv.split('\n')[0]).toContain('delta_chi2,parameters_of_interest');
  });

  it('a projected reading is labelled as such', () => {
    const input = syntheticInput();
    input.fit.levels = input.fit.levels.map((l) => ({ ...l, parametersOfInterest: 2, deltaChi2: l.level === 0.683 ? 2.3 : 6.18 }));
    const tex = summaryLatex(summaryTable(input), undefined);
    expect(tex).toContain('\\Delta\\chi^2 \\le 2.30');
    expect(tex).toContain('projected from the 2-parameter region');
  });
});
