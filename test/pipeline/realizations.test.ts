/**
 * The pipeline's `realizations:` section end to end on the tiny pipeline:
 * realizations at the best fits, the spread and sensitivity outputs, the
 * spread in the fit, the bands on the tracks and the sensitivity figure.
 */
import { appendFileSync, cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, describe, expect, it } from 'vitest';
import { executeRun } from '../../src/pipeline/execute.ts';
import type { SpreadReport } from '../../src/pipeline/realizations.ts';
import type { FitStageResult } from '../../src/fit/types.ts';

const FIXTURES = join(import.meta.dirname, 'fixtures');
const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function project(extra: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-mc-'));
  dirs.push(dir);
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
  appendFileSync(join(dir, 'tiny-pipeline.yaml'), extra);
  return dir;
}

async function run(dir: string): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const stream = (add: (s: string) => void) => new Writable({ write: (c, _e, done) => (add(String(c)), done()) });
  const code = await executeRun({ pipelineFile: join(dir, 'tiny-pipeline.yaml'), commandLine: ['hoarfrost', 'run'], stdout: stream((s) => (out += s)), stderr: stream((s) => (err += s)), workers: 1 });
  return { code, out, err };
}

describe('realizations at the best fits in a pipeline run', () => {
  it('writes the spread and every coefficient, draws bands and the sensitivity figure, and refits with the spread', async () => {
    const dir = project('\nrealizations: { count: 5, seed: 3 }\n');
    const first = await run(dir);
    expect(first.code, first.err + first.out).toBe(0);
    const out = join(dir, 'out');
    const spread = JSON.parse(readFileSync(join(out, 'fit/spread.json'), 'utf8')) as SpreadReport;
    const fit = JSON.parse(readFileSync(join(out, 'fit/fit.json'), 'utf8')) as FitStageResult;
    expect(spread).toMatchObject({ format: 'hoarfrost-spread/1', count: 5, seed: 3, method: 'pearson' });
    expect(spread.sightlines.map((s) => s.sightline)).toEqual(fit.fits.map((f) => f.sightline));
    // Best fits on the fit's refined mesh (fit.refine, ids `~CORNER+...`) run their realizations at their own, interpolated conditions.
    expect(fit.interpolation).toBeDefined();
    expect(spread.sightlines.some((s) => s.modelId.startsWith('~'))).toBe(true);
    for (const s of spread.sightlines) {
      const f = fit.fits.find((x) => x.sightline === s.sightline)!;
      expect(s.modelId).toBe(f.best.modelId);
      expect(s.realizations).toBe(5);
      expect(s.quantities.map((q) => q.label)).toEqual(f.residuals.map((r) => r.label));
      for (const q of s.quantities) {
        expect(q.sdDexAtBest).toBeGreaterThan(0);
        expect(q.top.length).toBeGreaterThan(0);
        expect(q.lo.every((lo, k) => lo <= q.median[k] && q.median[k] <= q.hi[k])).toBe(true);
      }
      // Covariance: symmetric, its diagonal the squared spread at the best fit.
      s.quantities.forEach((q, j) => expect(s.covariance[j][j]).toBeCloseTo(q.sdDexAtBest ** 2, 12));
    }
    const csv = readFileSync(join(out, 'fit/sensitivity.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('sightline,quantity,age_yr,rank,reaction,equation,law,uncertainty_factor,coefficient');
    expect(csv.some((l) => l.split(',')[1] === 'chi2')).toBe(true);
    const top = readFileSync(join(out, 'fit/sensitivity_top10.csv'), 'utf8').trim().split('\n').slice(1);
    expect(top.length).toBeGreaterThan(0);
    expect(top.every((l) => Number(l.split(',')[3]) <= 10)).toBe(true);
    const html = readFileSync(join(out, 'report/index.html'), 'utf8');
    expect(html).toMatch(/Monte Carlo realizations of the rate coefficients/);
    expect(html).toMatch(/What the fit of/);
    const trackSpec = readFileSync(join(out, 'report/figures', readFileSync(join(out, 'report/index.html'), 'utf8').match(/figures\/(tracks[^"]*?)\.vl\.json/)![1] + '.vl.json'), 'utf8');
    expect(trackSpec).toMatch(/"type": "area"/);
    expect(existsSync(join(out, 'store/realizations.sqlite'))).toBe(true);

    // The spread into the fit: with 'spread' every quantity's floor is its spread at the best fit.
    const text = readFileSync(join(dir, 'tiny-pipeline.yaml'), 'utf8').replace(/^fit:\n/m, 'fit:\n  model_uncertainty: spread\n');
    expect(text).toMatch(/model_uncertainty: spread/);
    writeFileSync(join(dir, 'tiny-pipeline.yaml'), text);
    const second = await run(dir);
    expect(second.code, second.err + second.out).toBe(0);
    expect(second.err + second.out).toMatch(/realizations: \d+ .*\d+ already in the store, 0 to compute/);
    const refit = JSON.parse(readFileSync(join(out, 'fit/fit.json'), 'utf8')) as FitStageResult;
    const s0 = spread.sightlines[0];
    const r0 = refit.fits.find((f) => f.sightline === s0.sightline)!;
    const d0 = r0.residuals.find((r) => r.kind === 'detection' && r.label === s0.quantities[0].label);
    if (d0) {
      // The observed part: one side of an asymmetric error, or, for a measurement shared with a
      // ratio (X(H2O(s)) beside CO(s)/H2O(s), fit.correlated_errors), the mean of both sides'
      // variances (docs/statistics.md section 2). The mesh's interpolation error stays in quadrature.
      const shared = r0.residuals.some((r) => r.denominator === d0.numerator);
      const obsVar = shared ? 0.5 * (d0.sigmaLoDex ** 2 + d0.sigmaHiDex ** 2) : (d0.residualDex > 0 ? d0.sigmaHiDex : d0.sigmaLoDex) ** 2;
      const meshDex = refit.interpolation?.errorDex[d0.label] ?? 0;
      expect(d0.sigmaDex).toBeCloseTo(Math.sqrt(obsVar + s0.quantities[0].sdDexAtBest ** 2 + meshDex ** 2), 9);
    }
    expect(d0).toBeDefined();
  }, 240_000);
});
