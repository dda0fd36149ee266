/**
 * `hoarfrost grid`, `fit`, `report` and `observations` run the stages of
 * `hoarfrost run` (issue 11): each input meets one policy whichever verb
 * reads it, and the stage state is recorded whichever verb ran the stage, so
 * a later `run` skips what a verb already did.
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { readState } from '../../src/pipeline/state.ts';
import { expectNoStack, runCli } from '../support/cli.ts';

const FIXTURES = join(import.meta.dirname, '../pipeline/fixtures');
const dirs: string[] = [];

function project(): string {
  const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-verbs-'));
  dirs.push(dir);
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
  return dir;
}

afterEach(() => {
  for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});

const stageState = (dir: string) => readState(join(dir, 'out'));

/** The project with sightline T-2's A_V left blank; with `ratiosOnly`, the fit asks for ratios alone, which need no A_V. */
function withoutAv(ratiosOnly: boolean): string {
  const dir = project();
  writeFileSync(join(dir, 'tiny-obs.csv'), readFileSync(join(dir, 'tiny-obs.csv'), 'utf8').replace('T-2,10.0,0.8,', 'T-2,,,'));
  if (ratiosOnly) {
    const pipeline = readFileSync(join(dir, 'tiny-pipeline.yaml'), 'utf8').replace(/  quantities:\n(    - .*\n)+/, '  quantities:\n    - { species: CO(s), as: ratio }\n');
    writeFileSync(join(dir, 'tiny-pipeline.yaml'), pipeline);
  }
  return dir;
}

function expectRefused(r: { code: number | null; stdout: string; stderr: string }, message: RegExp, dir: string): void {
  expect(r.code, r.stdout + r.stderr).toBe(2);
  expectNoStack(r.stderr);
  expect(r.stderr).toMatch(message);
  expect(existsSync(join(dir, 'out', 'store', 'models.sqlite'))).toBe(false);
}

describe('one policy for a sightline without A_V when the model A_V is tied to the sightlines', () => {
  for (const [verb, ...options] of [['run', '--workers', '1'], ['grid', '--workers', '1']]) {
    it(`hoarfrost ${verb} refuses it where the fit asks for its abundances (the observe stage's words)`, () => {
      const dir = withoutAv(false);
      expectRefused(runCli([verb, 'tiny-pipeline.yaml', ...options], dir), /tiny-obs\.csv:5, field 'A_V': .* this sightline has no A_V/, dir);
    });
  }

  const verbs = [['run', '--workers', '1'], ['grid', '--workers', '1'], ['grid', '--status'], ['grid', '--shard', '1/2', '--workers', '1'], ['slurm', '--shards', '2'], ['merge']];
  for (const [verb, ...options] of verbs) {
    it(`hoarfrost ${verb} ${options.join(' ')} refuses it where the fit asks for ratios alone (the grid stage's words)`, () => {
      const dir = withoutAv(true);
      expectRefused(runCli([verb, 'tiny-pipeline.yaml', ...options], dir), /visual_extinction is tied to the sightlines, but 1 sightline\(s\) have no A_V: T-2/, dir);
    });
  }
});

describe('stage state recorded by the verbs', () => {
  it('grid, fit and report record their stages; run then finds every stage unchanged', () => {
    const dir = project();
    const grid = runCli(['grid', 'tiny-pipeline.yaml', '--workers', '1'], dir);
    expect(grid.code, grid.stderr).toBe(0);
    expect(grid.stdout).toMatch(/^done: 9 computed \(9 ok, 0 failed\)/m);
    expect(Object.keys(stageState(dir)).sort()).toEqual(['grid', 'observe']);

    const fit = runCli(['fit', 'tiny-pipeline.yaml'], dir);
    expect(fit.code, fit.stderr).toBe(0);
    expect(fit.stdout).toMatch(/Best fits, with 68\.3%, Delta chi2 <= 1\.00, one-parameter intervals/);
    expect(Object.keys(stageState(dir)).sort()).toEqual(['fit', 'grid', 'observe']);

    const report = runCli(['report', 'tiny-pipeline.yaml'], dir);
    expect(report.code, report.stderr).toBe(0);
    expect(Object.keys(stageState(dir)).sort()).toEqual(['fit', 'grid', 'observe', 'report']);

    const run = runCli(['run', 'tiny-pipeline.yaml'], dir);
    expect(run.code, run.stderr).toBe(0);
    for (const stage of ['observe', 'grid', 'fit', 'report']) expect(run.stdout).toMatch(new RegExp(`^${stage}\\s+unchanged`, 'm'));
  });

  it('observations on a pipeline runs the observe stage and records it', () => {
    const dir = project();
    const r = runCli(['observations', 'tiny-pipeline.yaml'], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/table of 3 sightlines/);
    expect(Object.keys(stageState(dir))).toEqual(['observe']);
  });
});
