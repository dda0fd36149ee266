/**
 * `hoarfrost fit PIPELINE` end to end: a pipeline over an invented cloud, its
 * observations table, and a model store of the pipeline's grid written with
 * invented analytic abundances (see test/fit/synthetic.ts) and recorded by
 * the grid stage, which finds it complete, so no model has to run.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join, resolve } from 'node:path';
import Database from 'better-sqlite3';
import { csvParseRows } from 'd3-dsv';
import { describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { ModelStore, type StoredModel } from '../../src/grid/store.ts';
import { defaultStages } from '../../src/pipeline/default-stages.ts';
import { runStages } from '../../src/pipeline/runner.ts';
import { readState } from '../../src/pipeline/state.ts';
import { analyticAbundances, logSpaced } from '../fit/synthetic.ts';
import { expectNoStack, runCli } from '../support/cli.ts';
import { scratch } from '../support/scratch.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const NETWORK = join(ROOT, 'config', 'networks', 'dark-cloud.yaml');
const STORE_SPECIES = ['H2O(s)', 'CO(s)', 'CO2(s)', 'CH3OH(s)', 'CO'];
const DENSITIES = logSpaced(1e3, 1e6, 7);
const TIMES = logSpaced(1e4, 1e7, 13);
/** N_H/A_V of the pipeline (Bohlin, Savage & Drake 1978). */
const NH_PER_AV = 1.87e21;
/** Invented sightlines: name, A_V, true density index, true time index. */
const STARS: [string, number, number, number][] = [
  ['QM-1', 8, 2, 5],
  ['QM-2', 12, 4, 8],
  ['QM-3', 20, 5, 11],
];

/** The store of the pipeline's grid, each model's abundances analytic in the five store species (0 for the rest of the network); then the grid stage records it. */
async function writeStore(pipelineFile: string): Promise<void> {
  const pipeline = loadPipeline(pipelineFile);
  const plan = planGrid(pipeline);
  const timesYr = plan.shared.options.timesYr;
  const columns = STORE_SPECIES.map((s) => plan.species.indexOf(s));
  const store = ModelStore.open(join(plan.storeDir, 'models.sqlite'));
  const models: StoredModel[] = plan.points.map((p) => {
    const abundances = new Float64Array(timesYr.length * plan.species.length);
    timesYr.forEach((t, k) => analyticAbundances(p.conditions.density, t).forEach((x, j) => (abundances[k * plan.species.length + columns[j]] = x)));
    return { id: p.id, hash: p.hash, conditions: p.conditions, status: 'ok', abundances };
  });
  store.setGrid({ gridHash: plan.gridHash, species: plan.species, timesYr, points: plan.points, shard: '', toolVersion: plan.shared.toolVersion, networkHash: plan.shared.networkHash });
  store.write(models, 'run-1');
  store.close();
  await runStages(pipeline, defaultStages(), { stages: ['grid'], workers: 1 });
}

/** A project folder: observations (exact columns from the true models, stated errors), column mapping, pipeline, store. */
async function project(options: { fitSpecies?: string[]; waterLimit?: boolean; store?: boolean; names?: string[] } = {}): Promise<string> {
  const dir = scratch('hoarfrost-fit-cli-');
  const species = ['H2O(s)', 'CO(s)', 'CO2(s)', 'CH3OH(s)', 'NH3(s)'];
  const col = (s: string) => s.replace('(s)', '_ice');
  const header = ['star', 'av', 'av_err', ...species.flatMap((s) => [`N_${col(s)}`, `N_${col(s)}_err`])];
  const rows = STARS.map(([star, av, i, k], row) => {
    const name = options.names?.[row] ?? star;
    const x = analyticAbundances(DENSITIES[i], TIMES[k]);
    const cells = species.flatMap((s, j) => {
      if (s === 'NH3(s)') return ['1.0e16', '3.0e15'];
      const n = x[j] * NH_PER_AV * av;
      if (s === 'H2O(s)' && options.waterLimit) return [`<${n.toExponential(4)}`, ''];
      return [n.toExponential(6), (0.25 * n).toExponential(3)];
    });
    return [`"${name.replace(/"/g, '""')}"`, String(av), '0.01', ...cells].join(',');
  });
  writeFileSync(join(dir, 'quillmarsh.csv'), `# INVENTED test data: the Quillmarsh Cloud is not a real object.\n${header.join(',')}\n${rows.join('\n')}\n`);
  const mapping = ['id: star', 'av: av', 'av_error: av_err', 'species:', ...species.map((s) => `  "${s}": { value: N_${col(s)}, error: N_${col(s)}_err, unit: cm-2, limit_confidence: 0.997 }`)];
  writeFileSync(join(dir, 'quillmarsh.columns.yaml'), mapping.join('\n') + '\n');
  const fitSpecies = options.fitSpecies ?? ['CO(s)', 'CO2(s)', 'CH3OH(s)'];
  const pipeline = [
    'name: Quillmarsh Cloud (invented test)',
    'output: out',
    `network: ${NETWORK}`,
    'observations:',
    '  file: quillmarsh.csv',
    `  nh_per_av: ${NH_PER_AV}`,
    '  reference: H2O(s)',
    'conditions:',
    `  density: [${DENSITIES.join(', ')}]`,
    `times: { start_yr: ${TIMES[0]}, end_yr: ${TIMES[TIMES.length - 1]}, count: ${TIMES.length} }`,
    'fit:',
    '  quantities:',
    '    - { species: H2O(s), as: abundance }',
    ...fitSpecies.map((s) => `    - { species: ${s}, as: ratio }`),
    '  model_sigma_dex: 0.1',
  ];
  writeFileSync(join(dir, 'pipeline.yaml'), pipeline.join('\n') + '\n');
  if (options.store !== false) await writeStore(join(dir, 'pipeline.yaml'));
  return dir;
}

const hoarfrost = (dir: string, args: string[] = []) => runCli(['fit', join(dir, 'pipeline.yaml'), ...args], dir);

describe('hoarfrost fit', () => {
  it('prints the best fits with intervals, writes the tables and records the fit stage', async () => {
    const dir = await project();
    const r = hoarfrost(dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Best fits, with 68\.3%, Delta chi2 <= 1\.00, one-parameter intervals/);
    expect(r.stdout).toMatch(/Cautions:/);
    const csv = readFileSync(join(dir, 'out', 'fit', 'best_fits.csv'), 'utf8').trim().split('\n');
    const header = csv[0].split(',');
    for (const c of ['sightline', 'density', 'age_yr', 'chi2', 'dof', 'p_value', 'density_lo', 'density_hi', 'age_lo_yr', 'age_hi_yr', 'gas_temperature']) expect(header).toContain(c);
    // Exact columns from the true models: each best fit is the truth.
    STARS.forEach(([name, , i, k], row) => {
      const cells = csv[row + 1].split(',');
      expect(cells[header.indexOf('sightline')]).toBe(name);
      expect(Number(cells[header.indexOf('density')])).toBeCloseTo(DENSITIES[i], 6);
      expect(Number(cells[header.indexOf('age_yr')])).toBeCloseTo(TIMES[k], 6);
      expect(r.stdout).toMatch(new RegExp(`^${name}\\s`, 'm'));
    });
    for (const f of ['fit.json', 'profiles.json', 'intervals.csv', 'residuals.csv']) expect(existsSync(join(dir, 'out', 'fit', f))).toBe(true);
    expect(Object.keys(readState(join(dir, 'out'))).sort()).toEqual(['fit', 'grid', 'observe']);
  });

  it('writes sightline names that a spreadsheet would take for formulas as text (OWASP CSV injection)', async () => {
    // The reader trims names, so the tab of '\t+QM-3' is gone by then; the writer's own test covers a leading tab.
    const names = ['=1+1', '@QM-2', '\t+QM-3'];
    const dir = await project({ names });
    const r = hoarfrost(dir);
    expect(r.code, r.stderr).toBe(0);
    const expected = ['=1+1', '@QM-2', '+QM-3'];
    for (const file of ['best_fits.csv', 'intervals.csv', 'residuals.csv']) {
      const rows = csvParseRows(readFileSync(join(dir, 'out', 'fit', file), 'utf8').trimEnd());
      const column = rows[0].indexOf(file === 'intervals.csv' ? 'fit' : 'sightline');
      const names = new Set(rows.slice(1).map((row) => row[column]));
      expect([...names].sort(), file).toEqual(expected.map((n) => `'${n}`).sort());
    }
    const best = readFileSync(join(dir, 'out', 'fit', 'best_fits.csv'), 'utf8').split('\n');
    expect(best.slice(1, 4).map((line) => line.split(',')[0])).toEqual(expected.map((n) => `"'${n}"`));
    // Numbers stay numbers: no numeric cell is quoted or prefixed.
    for (const line of best.slice(1, 4)) for (const cell of line.split(',').slice(1)) expect(cell).not.toMatch(/^["']/);
  });

  it('ratios to a reference with only limits: a clear error', async () => {
    const r = hoarfrost(await project({ waterLimit: true }));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/H2O\(s\).*only as a limit/);
    expect(r.stderr).not.toMatch(/internal error/);
  });

  it('no grid yet: says which command makes it', async () => {
    const r = hoarfrost(await project({ store: false }));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/the fit stage needs the results of the grid stage, and there are none in .*hoarfrost grid PIPELINE/);
  });

  // Issue 16: the fit and the report use exactly the finished grid the pipeline plans, or say what to run.
  const storeOf = (dir: string) => join(dir, 'out', 'store', 'models.sqlite');

  it('refuses a store that lacks models of the grid, and so does the report', async () => {
    const dir = await project();
    expect(hoarfrost(dir).code).toBe(0);
    const db = new Database(storeOf(dir));
    db.prepare('DELETE FROM models WHERE id IN (SELECT id FROM models LIMIT 2)').run();
    db.close();
    // The report first: a refused fit leaves no fit results for the report to be refused on.
    for (const verb of ['report', 'fit']) {
      const r = runCli([verb, join(dir, 'pipeline.yaml')], dir);
      expect(r.code, r.stdout).toBe(2);
      expectNoStack(r.stderr);
      expect(r.stderr).toMatch(/the model store lacks 2 of the 7 models the pipeline plans.*hoarfrost grid/);
    }
  });

  it('refuses a store of another grid (an axis narrowed since)', async () => {
    const dir = await project();
    const file = join(dir, 'pipeline.yaml');
    writeFileSync(file, readFileSync(file, 'utf8').replace(/density: \[[^\]]*\]/, `density: [${DENSITIES.slice(0, 4).join(', ')}]`));
    const r = hoarfrost(dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/the model store holds another grid than the pipeline plans.*hoarfrost grid/);
  });

  it('refuses while a grid is computing into the store', async () => {
    const dir = await project();
    // This test's own process stands for the running grid: alive, on this host.
    writeFileSync(`${storeOf(dir)}.running`, JSON.stringify({ pid: process.pid, host: hostname(), started: new Date().toISOString() }));
    const r = hoarfrost(dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(new RegExp(`a grid \\(process ${process.pid}, started .*\\) is computing into the model store`));
    expect(existsSync(join(dir, 'out', 'fit', 'best_fits.csv'))).toBe(false);
  });
});

