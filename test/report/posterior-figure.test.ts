/**
 * The posterior figure: drawn from a real posterior of the fit room (an
 * invented sightline of the synthetic grid), rendered to SVG without a vega
 * warning, its caption stating the priors and the credible levels.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { fitSection } from '../../src/config/sections/fit.ts';
import { runFitStage } from '../../src/fit/stage.ts';
import { figureContext } from '../../src/report/figures/index.ts';
import { posteriorFigure } from '../../src/report/figures/posterior.ts';
import { renderSvg, svgToPng } from '../../src/report/render.ts';
import { analyticAbundances, detection, logSpaced, observationSet, SPECIES, syntheticTable } from '../fit/synthetic.ts';
import { scratch } from '../support/scratch.ts';
import { syntheticInput } from './fixture.ts';

describe('posterior figure', () => {
  it('draws marginals of density and age and the 2-D credible regions, stating the priors', async () => {
    const table = syntheticTable({ densities: logSpaced(1e3, 1e6, 7), times: logSpaced(1e4, 1e7, 16) });
    const x = analyticAbundances(10 ** 4.2, 10 ** 5.3).map(Math.log10);
    const q = SPECIES.map((s, j) => detection('Frostmere-01', s, j === 0 ? x[0] : x[j] - x[0], 0.15, j === 0 ? undefined : 'H2O(s)'));
    const { result } = runFitStage({ table, section: fitSection.parse({ quantities: [{ species: 'CO(s)' }] }), observations: observationSet(['Frostmere-01']), quantities: q });
    const input = syntheticInput();
    input.fit.fits[0] = { ...input.fit.fits[0], posterior: result.fits[0].posterior };
    const warnings: string[] = [];
    const ctx = figureContext(input, warnings);
    const figs = posteriorFigure.build(ctx, { kind: 'posterior', name: 'posterior', named: false, explicit: true, sightlines: ['Frostmere-01'], species: [], field: 'report.figures[0]' });
    expect(figs).toHaveLength(1);
    expect(figs[0].caption).toMatch(/priors uniform in log10 density and uniform in log10 age_yr/);
    expect(figs[0].caption).toMatch(/68\.3% and 95\.4%/);
    // Like every report figure: no title inside the file; its title and caption are outside.
    expect('title' in figs[0].spec).toBe(false);
    const svg = await renderSvg(figs[0].spec);
    expect(svg.warnings).toEqual([]);
    expect(svg.svg).toContain('probability per cell');
    const dir = scratch();
    writeFileSync(join(dir, 'posterior.png'), svgToPng(svg.svg, 100));
    if (process.env.HOARFROST_KEEP_FIGURE) writeFileSync(process.env.HOARFROST_KEEP_FIGURE, svgToPng(svg.svg, 150));
  });
});
