/**
 * A layered slab of the default network, end to end: the fit's model values
 * (column-averaged abundance and column ratio) against a sum of the layers
 * made here from `hoarfrost model` runs at each cell's depth.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { csvParse } from 'd3-dsv';
import { ROOT, expectNoStack, runCli } from '../support/cli.ts';
import { scratch } from '../support/scratch.ts';

const NETWORK = join(ROOT, 'config/networks/dark-cloud.yaml');

function pipelineYaml(dir: string, visual: string, extra = ''): string {
  writeFileSync(
    join(dir, 'stars.csv'),
    ['star,av,av_err,N_H2O_ice,N_H2O_ice_err,N_CO_ice,N_CO_ice_err', 'ST-1,6.2,0.3,1.0e17,2.0e16,2.0e16,5.0e15'].join('\n') + '\n',
  );
  writeFileSync(
    join(dir, 'stars.columns.yaml'),
    ['id: star', 'av: av', 'av_error: av_err', 'species:', '  "H2O(s)": { value: N_H2O_ice, error: N_H2O_ice_err, unit: cm-2 }', '  "CO(s)": { value: N_CO_ice, error: N_CO_ice_err, unit: cm-2 }'].join('\n') + '\n',
  );
  const file = join(dir, 'p.yaml');
  writeFileSync(
    file,
    `name: layered-test
output: out
network: ${NETWORK}
observations: { file: stars.csv, ice_threshold_av: 0 ${extra} }
conditions:
  density: 2.0e4
  visual_extinction: ${visual}
  gas_temperature: 10
  dust_temperature: 10
times: { start_yr: 1.0e4, end_yr: 3.0e5, count: 3 }
fit:
  refine: 1
  quantities:
    - { species: H2O(s), as: abundance }
    - { species: CO(s), as: ratio }
`,
  );
  return file;
}

describe('a layered slab of the default network', () => {
  it('fits the column-averaged abundance and the column ratio summed from `hoarfrost model` runs of its layers', () => {
    const dir = scratch();
    const file = pipelineYaml(dir, '{ layers: slab, step: 2 }');
    const grid = runCli(['grid', file], dir, 300_000);
    expect(grid.code, grid.stderr).toBe(0);
    // A_V 6.2 rounds to 6: the slab's middle at 3 mag; cells 0-2 mag (model at 1 mag) and 2-3 mag (model at 3 mag, the cell's middle).
    expect(grid.stdout + grid.stderr).toMatch(/\b2 models/);
    const fit = runCli(['fit', file], dir, 300_000);
    expectNoStack(fit.stderr);
    expect(fit.code, fit.stderr).toBe(0);
    const best = csvParse(readFileSync(join(dir, 'out/fit/best_fits.csv'), 'utf8'));
    expect(best[0].visual_extinction).toBe('6');
    const age = Number(best[0].age_yr);
    const layers = [1, 3].map((av) => {
      const out = join(dir, `model-${av}`);
      const r = runCli(['model', file, '--set', `visual_extinction=${av}`, '--out', out], dir, 120_000);
      expect(r.code, r.stderr).toBe(0);
      const json = JSON.parse(readFileSync(join(out, 'abundances.json'), 'utf8')) as { times_yr: number[]; abundances: Record<string, number[]> };
      const t = json.times_yr.findIndex((v) => Math.abs(v - age) <= 1e-9 * age);
      expect(t).toBeGreaterThanOrEqual(0);
      return { h2o: json.abundances['H2O(s)'][t], co: json.abundances['CO(s)'][t] };
    });
    // The sum of docs/cloud-structure.md section 1: weights 2/3 and 1/3 (the cells' widths inside 0-3 mag over 3 mag).
    const weights = [2 / 3, 1 / 3];
    const h2o = layers.reduce((s, l, k) => s + weights[k] * l.h2o, 0);
    const co = layers.reduce((s, l, k) => s + weights[k] * l.co, 0);
    const residuals = csvParse(readFileSync(join(dir, 'out/fit/residuals.csv'), 'utf8'));
    const model = Object.fromEntries(residuals.map((r) => [r.quantity, Number(r.model_log10)]));
    expect(model['X(H2O(s))']).toBeCloseTo(Math.log10(h2o), 10);
    expect(model['CO(s)/H2O(s)']).toBeCloseTo(Math.log10(co / h2o), 10);
    // The layers differ: the sum is not any single layer's value.
    expect(Math.abs(Math.log10(layers[0].h2o / layers[1].h2o))).toBeGreaterThan(0.01);
  });

  it('refuses an ice threshold with layered columns, naming the field', () => {
    const dir = scratch();
    const file = pipelineYaml(dir, '{ layers: slab, step: 1 }', ', ice_threshold_av: 3');
    writeFileSync(file, readFileSync(file, 'utf8').replace('ice_threshold_av: 0 , ice_threshold_av: 3', 'ice_threshold_av: 3'));
    const r = runCli(['grid', file], dir, 300_000);
    expectNoStack(r.stderr);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('observations.ice_threshold_av');
    expect(r.stderr).toContain('Set ice_threshold_av: 0');
  });
});
