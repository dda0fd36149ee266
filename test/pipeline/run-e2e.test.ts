/**
 * End to end: `hoarfrost run` with the real stages on a tiny pipeline (the
 * tiny test network, 3 sightlines, 9 models) in a temporary folder.
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { executeRun, type ExecuteOptions } from '../../src/pipeline/execute.ts';
import { readLock } from '../../src/pipeline/lock.ts';
import { sink } from '../support/sink.ts';

const FIXTURES = join(import.meta.dirname, 'fixtures');

async function run(pipelineFile: string, extra: Partial<ExecuteOptions> = {}): Promise<{ code: number; out: string }> {
  const out = sink();
  const err = sink();
  const code = await executeRun({ pipelineFile, commandLine: ['hoarfrost', 'run', 'tiny-pipeline.yaml'], stdout: out.stream, stderr: err.stream, workers: 1, ...extra });
  return { code, out: out.text() };
}

/** `name status` of each stage line of the output. */
function stageStatuses(out: string): string[] {
  return out
    .split('\n')
    .filter((l) => /^(observe|grid|fit|report) /.test(l))
    .map((l) => l.split(/\s+/).slice(0, 2).join(' '));
}

function listFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out.push(relative(dir, p).split('\\').join('/'));
    }
  };
  walk(dir);
  return out.sort();
}

function project(): string {
  const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-run-'));
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
  return dir;
}

const TABLES = /^(observations\/.*\.(json|csv)|fit\/.*\.(csv|json)|report\/tables\/.*)$/;

let dir: string;
let pipeline: string;
let first: { code: number; out: string };

beforeAll(async () => {
  dir = project();
  pipeline = join(dir, 'tiny-pipeline.yaml');
  first = await run(pipeline);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('hoarfrost run, end to end', () => {
  it('runs every stage and writes every file it lists', () => {
    expect(first.code).toBe(0);
    expect(stageStatuses(first.out)).toEqual(['observe ran', 'grid ran', 'fit ran', 'report ran']);
    // One line per stage with the time it took.
    for (const l of first.out.split('\n').filter((x) => /^(observe|grid|fit|report) /.test(x))) expect(l).toMatch(/\d+\.\d+ s|\d+ min \d+ s/);
    const out = join(dir, 'out');
    const files = listFiles(out);
    for (const f of [
      '.hoarfrost/stages.json',
      'provenance.json',
      'observations/observations.json',
      'observations/quantities.csv',
      'store/models.sqlite',
      'fit/best_fits.csv',
      'fit/fit.json',
      'fit/intervals.csv',
      'fit/profiles.json',
      'report/index.html',
      'report/tables/best_fits.csv',
      'report/tables/best_fits.json',
      'report/tables/best_fits.tex',
    ]) {
      expect(files, f).toContain(f);
    }
    // Every file a stage recorded exists, and every figure spec has its SVG (the pipeline asks for svg only).
    const state = JSON.parse(readFileSync(join(out, '.hoarfrost/stages.json'), 'utf8')) as { stages: Record<string, { outputs: string[] }> };
    for (const s of Object.values(state.stages)) for (const o of s.outputs) expect(existsSync(join(out, o)), o).toBe(true);
    const specs = files.filter((f) => f.endsWith('.vl.json'));
    expect(specs.length).toBeGreaterThanOrEqual(4);
    for (const s of specs) expect(files).toContain(s.replace(/\.vl\.json$/, '.svg'));
    expect(first.out).toContain(`report: ${join(out, 'report/index.html')}`);
    const best = readFileSync(join(out, 'fit/best_fits.csv'), 'utf8').trim().split('\n');
    expect(best[0]).toMatch(/^sightline,density,age_yr,chi2,dof,/);
    expect(best.slice(1).map((r) => r.split(',')[0])).toEqual(['T-1', 'T-2', 'T-3']);
  });

  it('writes a provenance file with versions, hashes and the command line', () => {
    const p = JSON.parse(readFileSync(join(dir, 'out/provenance.json'), 'utf8'));
    expect(p.tool.name).toBe('hoarfrost');
    expect(p.node).toBe(process.version);
    expect(p.commandLine).toEqual(['hoarfrost', 'run', 'tiny-pipeline.yaml']);
    expect(p.pipeline.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(p.network.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(p.network.file).toBe('tiny-network.yaml');
    expect(p.store).toBe(p.stages.grid.outputHash);
    expect(Object.keys(p.stages)).toEqual(['observe', 'grid', 'fit', 'report']);
  });

  it('keeps timestamps and absolute paths out of every table', () => {
    const out = join(dir, 'out');
    const tables = listFiles(out).filter((f) => TABLES.test(f));
    expect(tables.length).toBeGreaterThanOrEqual(8);
    for (const t of tables) {
      const text = readFileSync(join(out, t), 'utf8');
      expect(text, t).not.toContain(dir);
      expect(text, t).not.toMatch(/20\d\d-\d\d-\d\dT\d\d:\d\d/);
    }
  });

  it('skips every stage on a rerun', async () => {
    const r = await run(pipeline);
    expect(r.code).toBe(0);
    expect(stageStatuses(r.out)).toEqual(['observe unchanged', 'grid unchanged', 'fit unchanged', 'report unchanged']);
  });

  it('reruns only fit and report after a change of a fit setting', async () => {
    writeFileSync(pipeline, readFileSync(pipeline, 'utf8').replace('fit:\n', 'fit:\n  model_sigma_dex: 0.5\n'));
    const r = await run(pipeline);
    expect(stageStatuses(r.out)).toEqual(['observe unchanged', 'grid unchanged', 'fit ran', 'report ran']);
    expect(JSON.parse(readFileSync(join(dir, 'out/fit/fit.json'), 'utf8')).modelSigmaDex).toBe(0.5);
  });

  it('--lock then --check passes; after a change of observations --check fails and names the sightline', async () => {
    const lockFile = join(dir, 'tiny.lock.json');
    const locked = await run(pipeline, { lock: lockFile });
    expect(locked.code).toBe(0);
    const lock = readLock(lockFile);
    expect(lock.sightlines.map((s) => s.sightline)).toEqual(['T-1', 'T-2', 'T-3']);
    // Default tolerance: 1.5 grid steps of each parameter (the steps fit.json states), so one step passes.
    const steps = JSON.parse(readFileSync(join(dir, 'out/fit/fit.json'), 'utf8')).gridStepsDex;
    expect(lock.tolerance.densityDex).toBeCloseTo(1.5 * steps.density, 2);
    expect(lock.tolerance.ageDex).toBeCloseTo(1.5 * steps.age_yr, 2);
    expect(lock.tolerance.rule).toMatch(/1\.5 grid steps/);
    expect(lock.sightlines[0].parameters?.density).toBeDefined();
    expect(Object.keys(lock.tables)).toContain('fit/best_fits.csv');

    const same = await run(pipeline, { check: lockFile });
    expect(same.code).toBe(0);
    expect(same.out).toContain('passed');

    // T-2's water ice ten times larger: its abundance and every ratio to it move by a decade.
    const obs = join(dir, 'tiny-obs.csv');
    writeFileSync(obs, readFileSync(obs, 'utf8').replace('T-2,10.0,0.8,9.5e17,1.2e17', 'T-2,10.0,0.8,9.5e18,1.2e18'));
    const moved = await run(pipeline, { check: lockFile });
    // The grid reads only the sightlines' A_V bins, which did not change.
    expect(stageStatuses(moved.out)).toEqual(['observe ran', 'grid unchanged', 'fit ran', 'report ran']);
    expect(moved.code).toBe(1);
    expect(moved.out).toMatch(/FAILED; \d sightlines? moved beyond [\d.]+ dex/);
    expect(moved.out).toMatch(/\n {2}T-2: (best|density|age)/);
    expect(moved.out).not.toMatch(/\n {2}T-1: /);
  });

  it('gives byte-identical tables for the same pipeline in a fresh folder', async () => {
    const other = project();
    try {
      // Bring the first project back to the fixture's inputs, then run both.
      for (const f of ['tiny-obs.csv', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
      await run(pipeline);
      const r = await run(join(other, 'tiny-pipeline.yaml'), { workers: 2 });
      expect(r.code).toBe(0);
      const a = listFiles(join(dir, 'out')).filter((f) => TABLES.test(f));
      const b = listFiles(join(other, 'out')).filter((f) => TABLES.test(f));
      expect(b).toEqual(a);
      for (const t of a) expect(readFileSync(join(other, 'out', t)).equals(readFileSync(join(dir, 'out', t))), t).toBe(true);
    } finally {
      rmSync(other, { recursive: true, force: true });
    }
  });

  it("reruns the grid when a sightline's A_V moves to another model A_V bin, computing only the new models", async () => {
    const obs = join(dir, 'tiny-obs.csv');
    // T-3: A_V 16 -> 24 mag, model A_V 8 -> 12 mag: a new bin of 3 densities.
    writeFileSync(obs, readFileSync(obs, 'utf8').replace('T-3,16.0,1.2', 'T-3,24.0,1.2'));
    const r = await run(pipeline);
    expect(stageStatuses(r.out)).toEqual(['observe ran', 'grid ran', 'fit ran', 'report ran']);
    expect(r.out).toMatch(/grid .*9 models \(3 computed, 6 from the store\)/);
  });
});
