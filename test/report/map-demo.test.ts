/**
 * The map demo (pipelines/demo-map.yaml) run end to end on a smaller grid
 * (two densities, 11 output times; its observations as they are): the
 * report's tables of a map are not empty, and every number in them is the
 * fit stage's (OUT/fit/map.json, OUT/fit/fit.json), read at test time, so the
 * test holds whatever the demo data become.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { csvParse } from 'd3-dsv';
import { quantileSorted } from 'simple-statistics';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import type { FitStageResult, MapFitJson } from '../../src/fit/types.ts';
import { defaultStages } from '../../src/pipeline/default-stages.ts';
import { runStages } from '../../src/pipeline/runner.ts';
import { numberLatex, pValueText } from '../../src/report/numbers.ts';
import { scratch } from '../support/scratch.ts';

const ROOT = resolve(import.meta.dirname, '../..');

/** The demo map pipeline with absolute paths, its output in a scratch folder and a grid small enough for a test. */
function smallMapPipeline(dir: string): string {
  const text = readFileSync(join(ROOT, 'pipelines/demo-map.yaml'), 'utf8')
    .replace(/^output: .*$/m, `output: ${join(dir, 'out')}`)
    .replace(/^network: \.\.\//m, `network: ${ROOT}/`)
    .replace(/file: demo\//, `file: ${ROOT}/pipelines/demo/`)
    .replace(/columns_file: demo\//, `columns_file: ${ROOT}/pipelines/demo/`)
    .replace(/density: \{ from: ([^,]+), to: ([^,]+), count: \d+ \}/, 'density: { from: $1, to: $2, count: 2 }')
    .replace(/times: \{ start_yr: ([^,]+), end_yr: ([^,]+), count: \d+ \}/, 'times: { start_yr: $1, end_yr: $2, count: 11 }');
  expect(text).toContain('count: 2 }');
  const file = join(dir, 'map.yaml');
  writeFileSync(file, text);
  return file;
}

describe('the map demo report tables', () => {
  let out: string;
  let map: MapFitJson;
  let fit: FitStageResult;
  beforeAll(async () => {
    const dir = scratch('hoarfrost-map-demo-');
    await runStages(loadPipeline(smallMapPipeline(dir)), defaultStages(), { workers: 1 });
    out = join(dir, 'out');
    map = JSON.parse(readFileSync(join(out, 'fit/map.json'), 'utf8'));
    fit = JSON.parse(readFileSync(join(out, 'fit/fit.json'), 'utf8'));
  }, 120_000);

  it('writes one CSV row per fitted pixel with the values of the map images', () => {
    const rows = csvParse(readFileSync(join(out, 'report/tables/best_fits.csv'), 'utf8'));
    expect(map.fittedPixels).toBeGreaterThan(0);
    expect(rows).toHaveLength(map.fittedPixels);
    for (const r of rows) {
      const i = Number(r.y) * map.nx + Number(r.x);
      expect(r.sightline).toBe(`${r.x},${r.y}`);
      expect(Number(r.density)).toBe(map.images.best_density[i]);
      expect(Number(r.age_yr)).toBe(map.images.best_age_yr[i]);
      expect(Number(r.chi2)).toBe(map.images.best_chi2[i]);
      expect(Number(r.p_value)).toBe(map.images.p_value[i]);
      expect(r.at_edge).toBe(String(map.images.at_edge[i] === 1));
      // The demo map's WCS is RA---TAN/DEC--TAN: every pixel has a sky position near the pointing.
      expect(Math.abs(Number(r.ra_deg) - 150.25)).toBeLessThan(0.2);
      expect(Math.abs(Number(r.dec_deg) + 7.5)).toBeLessThan(0.2);
    }
  });

  it('writes a LaTeX summary with rows, the pixel counts and the medians of the map images', () => {
    const tex = readFileSync(join(out, 'report/tables/best_fits.tex'), 'utf8');
    const body = tex.slice(tex.indexOf('\\startdata') + '\\startdata'.length, tex.indexOf('\\enddata')).trim();
    expect(body.length).toBeGreaterThan(0);
    const rows = body.split(' \\\\\n');
    expect(rows).toHaveLength(4);
    const fitted = map.images.best_density.filter((v) => v !== null);
    const poor = map.images.p_value.filter((p) => p !== null && p < fit.poorFitP).length;
    const edge = map.images.at_edge.filter((e) => e === 1).length;
    expect(tex).toContain(`${fitted.length} of ${map.nx * map.ny} pixels fitted; ${poor} poor fit${poor === 1 ? '' : 's'} ($p < ${fit.poorFitP}$); ${edge} pixel`);
    const median = (name: 'best_density' | 'best_age_yr') => quantileSorted((map.images[name].filter((v) => v !== null) as number[]).sort((a, b) => a - b), 0.5);
    expect(rows[0].split(' & ')[1]).toBe(`$${numberLatex(median('best_density'))}$`);
    expect(rows[1].split(' & ')[1]).toBe(`$${numberLatex(median('best_age_yr'))}$`);
    const pMax = Math.max(...(map.images.p_value.filter((p) => p !== null) as number[]));
    expect(rows[3].split(' & ')[3]).toMatch(new RegExp(`--\\$${pValueText(pMax, 'latex').replace(/[.\\^{}]/g, '\\$&')}\\$$`));
    if (pMax < 0.9999) expect(rows[3]).not.toMatch(/--\$1\.0\$$/);
  });

  it('shows the summary in the HTML instead of an empty table', () => {
    const html = readFileSync(join(out, 'report/index.html'), 'utf8');
    expect(html).toContain(`${map.fittedPixels} of ${map.nx * map.ny} pixels fitted`);
    expect(html).toContain('16th–84th percentile');
  });
});
