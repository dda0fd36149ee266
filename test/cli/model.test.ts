/** `hoarfrost model` end to end: files written, emitted system round trip, and bad input (clear error, exit 2, no stack trace). */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync, existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { createRequire } from 'node:module';
import AjvModule from 'ajv';
import { beforeAll, describe, expect, it } from 'vitest';
import type { EmittedSystem } from '../../src/chem/system.ts';
import { integrate } from '../../src/solve/index.ts';
import { problemFromJson } from '../model/fixtures.ts';
import { scratch } from '../support/scratch.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin', 'hoarfrost.mjs');
const NETWORK = join(ROOT, 'test', 'model', 'data', 'mini-network.yaml');

function hoarfrost(args: string[], cwd: string) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, HOARFROST_DEBUG: '' } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

function pipeline(dir: string, name: string, extra: { conditions?: string; initial?: string; grain?: string } = {}): string {
  const file = join(dir, name);
  writeFileSync(
    file,
    [
      'name: cli-model-test',
      `network: ${JSON.stringify(NETWORK)}`,
      'conditions:',
      extra.conditions ?? '  density: 2.0e4\n  dust_temperature: 10',
      'initial:',
      extra.initial ?? '  H2: 0.5\n  He: 0.09\n  C+: 7.3e-5\n  O: 1.76e-4',
      'times: { start_yr: 1.0e2, end_yr: 1.0e6, count: 9 }',
      ...(extra.grain ? [`grain: ${extra.grain}`] : []),
      '',
    ].join('\n'),
  );
  return file;
}

function expectCleanError(r: { code: number | null; stderr: string }, pattern: RegExp): void {
  expect(r.code).toBe(2);
  expect(r.stderr).toMatch(pattern);
  expect(r.stderr).not.toMatch(/internal error|\n\s+at .*\(.*:\d+:\d+\)/);
}

describe('hoarfrost model', () => {
  let dir: string;
  let run: ReturnType<typeof hoarfrost>;
  beforeAll(() => {
    dir = scratch('hoarfrost-model-');
    pipeline(dir, 'p.yaml');
    run = hoarfrost(['model', 'p.yaml', '--out', 'res', '--set', 'gas_temperature=12', '--species', 'CO,H2O(s)', '--emit-system', 'sys.json', '--mass-action-only'], dir);
  });

  it('writes abundances.csv with time_yr and every species, one row per output time', () => {
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const lines = readFileSync(join(dir, 'res', 'abundances.csv'), 'utf8').trim().split('\n');
    const header = lines[0].split(',');
    expect(header[0]).toBe('time_yr');
    expect(header).toContain('H2O(s)');
    expect(header).toHaveLength(30);
    expect(lines).toHaveLength(10);
    expect(Number(lines[9].split(',')[0])).toBeCloseTo(1e6, -1);
  });

  it('writes JSON, the SVG figure and its Vega-Lite spec, and a summary', () => {
    const json = JSON.parse(readFileSync(join(dir, 'res', 'abundances.json'), 'utf8'));
    expect(json.conditions.gas_temperature).toBe(12);
    expect(json.status).toBe('ok');
    expect(json.abundances['CO']).toHaveLength(9);
    const svg = readFileSync(join(dir, 'res', 'abundances.svg'), 'utf8');
    expect(svg).toMatch(/^<svg/);
    expect(svg).toContain('H2O(s)');
    // The title names the conditions with Unicode subscripts, not TeX-like A_V.
    expect(svg).toContain('Aᵥ = ');
    expect(svg).not.toContain('A_V');
    // PNG and PDF beside the SVG: their signatures (PNG spec section 5.2; PDF 1.7, ISO 32000-1, section 7.5.2).
    expect(readFileSync(join(dir, 'res', 'abundances.png')).subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    expect(readFileSync(join(dir, 'res', 'abundances.pdf')).subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const spec = JSON.parse(readFileSync(join(dir, 'res', 'abundances.vl.json'), 'utf8'));
    expect(spec.encoding.x.scale.type).toBe('log');
    expect(spec.encoding.y.scale.type).toBe('log');
    // The spec is valid Vega-Lite (the package's own JSON schema).
    const schemaFile = join(dirname(createRequire(import.meta.url).resolve('vega-lite')), 'vega-lite-schema.json');
    const validate = new AjvModule.default({ strict: false, allErrors: true }).compile(JSON.parse(readFileSync(schemaFile, 'utf8')));
    expect(validate(spec), JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);
    expect(run.stdout).toMatch(/most abundant at 1\.000e\+6 yr/);
    expect(run.stdout).toMatch(/conservation: largest relative drift/);
    expect(run.stdout).toMatch(/solver: \d+ steps/);
  });

  it('emits a system whose integration reproduces the CSV (to its 6 digits)', () => {
    const sys = JSON.parse(readFileSync(join(dir, 'sys.json'), 'utf8')) as EmittedSystem;
    expect(Object.keys(sys).sort()).toEqual(['omitted', 'species', 'terms', 'times_s', 'y0']);
    const out = integrate(problemFromJson(sys), Float64Array.from(sys.y0), Float64Array.from(sys.times_s), { rtol: 1e-8, atol: 1e-25, maxSteps: 50000 });
    expect(out.status).toBe('ok');
    const rows = readFileSync(join(dir, 'res', 'abundances.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').slice(1).map(Number));
    let worst = 0;
    out.y.forEach((y, k) => y.forEach((v, i) => {
      const a = rows[k][i];
      if (Math.max(a, v) > 1e-15) worst = Math.max(worst, Math.abs(v - a) / Math.max(a, v));
    }));
    expect(worst).toBeLessThan(1e-4);
  });
});

describe('hoarfrost model: three-phase ice (docs/ice-mantle.md)', () => {
  it('writes X(s) as surface plus mantle beside X(surface) and X(mantle), and plots any of them', () => {
    const dir = scratch('hoarfrost-model-');
    pipeline(dir, 'm.yaml', { grain: '{ mantle: true }' });
    const r = hoarfrost(['model', 'm.yaml', '--out', 'res', '--species', 'H2O(s),H2O(surface),H2O(mantle)'], dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const json = JSON.parse(readFileSync(join(dir, 'res', 'abundances.json'), 'utf8')) as { species: string[]; grain: { mantle: boolean }; abundances: Record<string, number[]> };
    expect(json.grain.mantle).toBe(true);
    expect(json.species).toEqual(expect.arrayContaining(['H2O(s)', 'H2O(surface)', 'H2O(mantle)', 'O(mantle)']));
    const a = json.abundances;
    a['H2O(s)'].forEach((x, k) => expect(x).toBeCloseTo(a['H2O(surface)'][k] + a['H2O(mantle)'][k], 20));
    const header = readFileSync(join(dir, 'res', 'abundances.csv'), 'utf8').split('\n')[0].split(',');
    expect(header).toEqual(expect.arrayContaining(['H2O(s)', 'H2O(surface)', 'H2O(mantle)']));
  });
});

describe('hoarfrost model: conditions of a grid pipeline', () => {
  it('takes --set for a grid axis and resolves ties to other conditions', () => {
    const dir = scratch('hoarfrost-model-tie-');
    pipeline(dir, 'grid.yaml', { conditions: '  density: { from: 1.0e3, to: 1.0e5, count: 3 }\n  gas_temperature: 12\n  dust_temperature: { tie: gas_temperature, factor: 0.75 }' });
    const r = hoarfrost(['model', 'grid.yaml', '--out', 'o', '--set', 'density=3e4'], dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const json = JSON.parse(readFileSync(join(dir, 'o', 'abundances.json'), 'utf8'));
    expect(json.conditions).toMatchObject({ density: 3e4, gas_temperature: 12, dust_temperature: 9 });
  });
});

describe('hoarfrost model: bad input', () => {
  const dir = scratch('hoarfrost-model-bad-');
  pipeline(dir, 'good.yaml');

  it('rejects an unknown --set key, listing the known ones', () => {
    expectCleanError(hoarfrost(['model', 'good.yaml', '--out', 'o', '--set', 'densty=1e4'], dir), /unknown physical condition 'densty'.*Known conditions: density/);
  });
  it('rejects a negative density given with --set', () => {
    expectCleanError(hoarfrost(['model', 'good.yaml', '--out', 'o', '--set', 'density=-5'], dir), /density must be greater than 0.*found -5/);
  });
  it('rejects a dust temperature of 0 in the pipeline file, naming the line', () => {
    pipeline(dir, 'cold.yaml', { conditions: '  density: 2.0e4\n  dust_temperature: 0' });
    expectCleanError(hoarfrost(['model', 'cold.yaml', '--out', 'o'], dir), /cold\.yaml:5.*dust_temperature must be greater than 0/);
  });
  it('asks for hoarfrost grid when a condition is a grid axis', () => {
    pipeline(dir, 'axis.yaml', { conditions: '  density: [1.0e4, 1.0e5]' });
    expectCleanError(hoarfrost(['model', 'axis.yaml', '--out', 'o'], dir), /single number.*hoarfrost grid/);
  });
  it('names figure species the network lacks', () => {
    expectCleanError(hoarfrost(['model', 'good.yaml', '--out', 'o', '--species', 'CO,H2O(ice)'], dir), /no species 'H2O\(ice\)'.*H2O\(s\)/);
  });
  it('names a species of the initial composition that the network lacks', () => {
    pipeline(dir, 'si.yaml', { initial: '  H2: 0.5\n  Si+: 8.0e-9' });
    expectCleanError(hoarfrost(['model', 'si.yaml', '--out', 'o'], dir), /'Si\+'.*network 'mini-test'.*does not have/);
    expect(existsSync(join(dir, 'o', 'abundances.csv'))).toBe(false);
  });
});
