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
import { nearestGridModel, nearestTimeIndex, spreadForReport, type SpreadReport } from '../../src/pipeline/realizations.ts';
import type { ModelTrack } from '../../src/report/types.ts';
import type { GridPlan } from '../../src/grid/plan.ts';
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

describe('the grid model and time nearest a best fit between grid values', () => {
  it('picks the node nearest in log10 of each parameter, and the output time nearest in log10', () => {
    const points = [1e3, 1e4, 1e5].flatMap((density, i) => [5, 10].map((av, j) => ({ id: `g${i}${j}`, index: 2 * i + j, conditions: { density, visual_extinction: av } })));
    const plan = { points } as unknown as GridPlan;
    // 10^3.4 is nearer 10^3 than 10^4 in log; A_V 8 nearer 10 than 5 (differences in log: 0.097 vs 0.204).
    expect(nearestGridModel(plan, { density: 10 ** 3.4, visual_extinction: 8 })).toBe('g01');
    expect(nearestGridModel(plan, { density: 10 ** 3.6, visual_extinction: 6 })).toBe('g10');
    expect(nearestTimeIndex([1e3, 1e4, 1e5], 3e3)).toBe(0);
    expect(nearestTimeIndex([1e3, 1e4, 1e5], 3.3e3)).toBe(1);
    expect(nearestTimeIndex([1e3, 1e4, 1e5], 1e7)).toBe(2);
  });
});

describe('the band of a best fit between grid values', () => {
  it("is the nearest grid model's spread about its median, interpolated in log time and centred on the track", () => {
    const report = {
      format: 'hoarfrost-spread/1',
      count: 4,
      seed: 1,
      method: 'pearson',
      chanceCoefficient: null,
      sightlines: [
        {
          sightline: 's',
          modelId: 'g1',
          ageYr: 1e5,
          timesYr: [1e4, 1e5, 1e6],
          realizations: 4,
          missing: 0,
          quantities: [{ label: 'X(CO)', key: 'CO', lo: [-5.2, -5.5, -6], median: [-5, -5.1, -5.4], hi: [-4.9, -4.9, -5], sdDex: [0.1, 0.2, 0.3], sdDexAtBest: 0.2, top: [] }],
          covariance: [[0.04]],
          chi2: { median: 1, lo: 0.5, hi: 2, top: [] },
        },
      ],
    } as unknown as SpreadReport;
    const track = { sightline: 's', label: 'X(CO)', modelId: '~g1', role: 'best', timesYr: [1e4, 10 ** 4.5, 1e6, 1e7], log10: [-4.8, -4.9, null, -5.5] } as unknown as ModelTrack;
    const [out] = spreadForReport([track], report).tracks;
    expect(out.band?.nearestModel).toBe('g1');
    // At 1e4: -4.8 + (-5.2 + 5) = -5.0; at 10^4.5, halfway in log time: offsets -0.3 (lo) and 0.15 (hi); past the last time the last offsets.
    expect(out.band!.lo[0]).toBeCloseTo(-5.0, 12);
    expect(out.band!.lo[1]).toBeCloseTo(-4.9 - 0.3, 12);
    expect(out.band!.hi[1]).toBeCloseTo(-4.9 + 0.15, 12);
    expect(out.band!.lo[2]).toBeNaN();
    expect(out.band!.hi[3]).toBeCloseTo(-5.5 + 0.4, 12);
    // A best fit on a grid model keeps the realizations' own band.
    const [own] = spreadForReport([{ ...track, modelId: 'g1', timesYr: [1e4, 1e5, 1e6], log10: [-5, -5.1, -5.4] }], report).tracks;
    expect(own.band).toEqual({ lo: [-5.2, -5.5, -6], hi: [-4.9, -4.9, -5], realizations: 4 });
  });
});

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
    for (const s of spread.sightlines) {
      const f = fit.fits.find((x) => x.sightline === s.sightline)!;
      // A best fit on the refined mesh (id `~...`, between grid values) has its realizations run at the nearest grid model and output time.
      if (f.best.modelId.startsWith('~')) expect(s.modelId.startsWith('~')).toBe(false);
      else expect(s.modelId).toBe(f.best.modelId);
      expect(Math.abs(Math.log10(s.ageYr / f.best.ageYr))).toBeLessThanOrEqual(0.5 * Math.log10(s.timesYr[1] / s.timesYr[0]) + 1e-12);
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
    // The sensitivity figure, like every report figure, has its title and caption outside the file.
    const sensitivityName = readFileSync(join(out, 'report/index.html'), 'utf8').match(/figures\/(sensitivity[^"]*?)\.vl\.json/)![1];
    const sensitivitySpec = JSON.parse(readFileSync(join(out, 'report/figures', `${sensitivityName}.vl.json`), 'utf8')) as Record<string, unknown>;
    expect('title' in sensitivitySpec).toBe(false);
    expect(readFileSync(join(out, 'report/figures', `${sensitivityName}.caption.txt`), 'utf8')).toMatch(/Monte Carlo realizations/);
    // Best fits between grid values get the nearest grid model's band, centred on their track, and the caption says so.
    if (fit.fits.some((f) => f.best.modelId.startsWith('~'))) expect(html).toMatch(/the range of the nearest grid model, centred on the track/);
    expect(existsSync(join(out, 'store/realizations.sqlite'))).toBe(true);

    // The spread into the fit: with 'spread' every quantity's floor is its spread at the best fit.
    const text = readFileSync(join(dir, 'tiny-pipeline.yaml'), 'utf8').replace(/^fit:\n/m, 'fit:\n  model_uncertainty: spread\n  joint: [{ name: all-stars, sightlines: all, share: [density] }]\n');
    expect(text).toMatch(/model_uncertainty: spread/);
    writeFileSync(join(dir, 'tiny-pipeline.yaml'), text);
    const second = await run(dir);
    expect(second.code, second.err + second.out).toBe(0);
    expect(second.err + second.out).toMatch(/realizations: \d+ .*\d+ already in the store, 0 to compute/);
    const refit = JSON.parse(readFileSync(join(out, 'fit/fit.json'), 'utf8')) as FitStageResult;
    const s0 = spread.sightlines[0];
    const r0 = refit.fits.find((f) => f.sightline === s0.sightline)!;
    const d0 = r0.residuals.find((r) => r.kind === 'detection' && r.label === s0.quantities[0].label);
    expect(d0).toBeDefined();
    if (d0) {
      // The model variance is the realizations' (their covariance's diagonal), with the interpolation error of the refined mesh kept in quadrature.
      const interpolation = refit.interpolation?.errorDex[d0.label] ?? 0;
      const model2 = s0.covariance[0][0] + interpolation ** 2;
      const detections = r0.residuals.filter((r) => r.kind === 'detection').length;
      // Two or more detections covary through the realizations (their covariance has off-diagonal terms): the width shown is the symmetrised one of the whitened sum.
      const obs2 = detections > 1 ? 0.5 * (d0.sigmaLoDex ** 2 + d0.sigmaHiDex ** 2) : (d0.residualDex > 0 ? d0.sigmaHiDex : d0.sigmaLoDex) ** 2;
      expect(d0.sigmaDex).toBeCloseTo(Math.sqrt(obs2 + model2), 9);
    }
    // The joint group takes the model error between its members from their common realizations (no fallback to the floor's shared part).
    expect(refit.joint).toHaveLength(1);
    expect(Number.isFinite(refit.joint[0].chi2)).toBe(true);
    expect(refit.warnings.join('\n')).not.toMatch(/not the realizations' covariance/);
    expect(refit.joint[0].chi2).not.toBeCloseTo(refit.joint[0].memberFits.reduce((sum, m) => sum + m.chi2, 0), 6);
    // The off-diagonal covariance of the realizations is not zero where two quantities were fitted (so it reaches the chi^2).
    expect(spread.sightlines.some((s) => s.covariance.length > 1 && s.covariance[0][1] !== 0)).toBe(true);
  }, 240_000);
});
