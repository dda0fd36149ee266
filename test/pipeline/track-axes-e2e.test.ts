/**
 * End to end with a physical-track parameter on a grid axis (issue 12, item
 * 4): `hoarfrost run` on the tiny pipeline with a free-fall collapse whose
 * retardation factor takes 2 values. The grid runs twice the models, and the
 * fit's tables and the report name the axis.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { csvParse } from 'd3-dsv';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadCandidates } from '../../src/grid/candidates.ts';
import { ModelStore } from '../../src/grid/store.ts';
import { executeRun } from '../../src/pipeline/execute.ts';
import { sink } from '../support/sink.ts';

const FIXTURES = join(import.meta.dirname, 'fixtures');

let dir: string;
let code: number;
let out: string;
let err: string;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-track-axes-'));
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
  const base = readFileSync(join(FIXTURES, 'tiny-pipeline.yaml'), 'utf8');
  // The tiny grid's 9 models (3 densities x 3 sightline A_V bins) each collapse to 1e5 cm^-3 at 2 retardation factors.
  writeFileSync(join(dir, 'p.yaml'), base.replace('conditions:', 'physical_track: { kind: free-fall, final_density: 1.0e5, retardation: [0.3, 1] }\nconditions:') + 'realizations: { count: 2, seed: 1 }\n');
  const o = sink();
  const e = sink();
  code = await executeRun({ pipelineFile: join(dir, 'p.yaml'), commandLine: ['hoarfrost', 'run', 'p.yaml'], stdout: o.stream, stderr: e.stream, workers: 1 });
  out = o.text();
  err = e.text();
}, 300_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('a retardation-factor axis, end to end', () => {
  it('runs every stage with twice the models of the fixed track', () => {
    expect(code, out + err).toBe(0);
    expect(out + err).toMatch(/\b18 models\b/);
  });

  it('stores each model with its retardation, and the two values give different abundances', () => {
    const store = ModelStore.open(join(dir, 'out/store/models.sqlite'), { readonly: true });
    try {
      expect(store.meta()?.trackAxes).toEqual(['retardation']);
    } finally {
      store.close();
    }
    const table = loadCandidates(join(dir, 'out/store/models.sqlite'), ['CO']);
    expect(table.parameterNames.at(-1)).toBe('retardation');
    expect(table.nModels).toBe(18);
    const np = table.parameterNames.length;
    const values = Array.from({ length: table.nModels }, (_, m) => table.parameters[m * np + np - 1]);
    expect(values.filter((v) => v === 0.3)).toHaveLength(9);
    expect(values.filter((v) => v === 1)).toHaveLength(9);
    // Grid order: the track axis fastest, so models 0 and 1 share their conditions and differ in retardation alone; their CO at the last time differs by more than 0.01 dex.
    const last = (m: number) => table.abundances[(m * table.nTimes + table.nTimes - 1) * table.nSpecies];
    expect(Array.from(table.parameters.subarray(0, np - 1))).toEqual(Array.from(table.parameters.subarray(np, 2 * np - 1)));
    expect(Math.abs(Math.log10(last(0) / last(1)))).toBeGreaterThan(0.01);
  });

  it("names the axis in best_fits.csv and intervals.csv, each best retardation within the axis's range", () => {
    const rows = csvParse(readFileSync(join(dir, 'out/fit/best_fits.csv'), 'utf8'));
    expect(rows.columns).toEqual(expect.arrayContaining(['retardation', 'retardation_lo', 'retardation_hi']));
    expect(rows.length).toBe(3);
    for (const r of rows) {
      // The fit's mesh refines between grid values, so the best value may lie between 0.3 and 1.
      expect(Number(r.retardation)).toBeGreaterThanOrEqual(0.3);
      expect(Number(r.retardation)).toBeLessThanOrEqual(1);
    }
    const intervals = csvParse(readFileSync(join(dir, 'out/fit/intervals.csv'), 'utf8'));
    expect(intervals.some((r) => r.parameter === 'retardation')).toBe(true);
  });

  it("runs each best fit's rate realizations on its nearest grid model's own track: that model's retardation, not the axis's first value", () => {
    const best = csvParse(readFileSync(join(dir, 'out/fit/best_fits.csv'), 'utf8'));
    const spread = JSON.parse(readFileSync(join(dir, 'out/fit/spread.json'), 'utf8')) as { sightlines: { sightline: string; modelId: string }[] };
    const store = ModelStore.open(join(dir, 'out/store/realizations.sqlite'), { readonly: true });
    try {
      const rows = [...store.finishedRows(['retardation'])];
      const axis = [0.3, 1];
      for (const b of best) {
        // The grid value nearest the fitted retardation in log (the fit's mesh lies between them).
        const nearest = axis.reduce((a, v) => (Math.abs(Math.log10(v / Number(b.retardation))) < Math.abs(Math.log10(a / Number(b.retardation))) ? v : a));
        const s = spread.sightlines.find((x) => x.sightline === b.sightline);
        expect(s).toBeDefined();
        // spread.json names the grid model the realizations ran at.
        const base = s!.modelId;
        const mine = rows.filter((r) => String(r[0]).startsWith(`${base}~r`));
        expect(mine).toHaveLength(2);
        for (const r of mine) expect(r.at(-1)).toBeCloseTo(nearest, 12);
      }
    } finally {
      store.close();
    }
  });

  it('names the axis with its title in the profiles figure and in the report', () => {
    expect(readFileSync(join(dir, 'out/report/figures/profiles_01_T-1.vl.json'), 'utf8')).toMatch(/Collapse retardation factor B/);
    expect(readFileSync(join(dir, 'out/report/index.html'), 'utf8')).toMatch(/retardation/);
  });
});
