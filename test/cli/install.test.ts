/**
 * The installable command: what `npm pack` ships (and so what `npm install -g`
 * of the tarball installs) holds every file the runtime looks up beside its
 * own code, and the unpacked package runs from a folder outside the clone.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HOARFROST_BIN } from '../../src/grid/slurm.ts';
import { DEFAULT_WORKER_URL } from '../../src/grid/pool.ts';
import { PRESET_DIR } from '../../src/model/initial.ts';
import { DEFAULT_BAND_TABLE } from '../../src/obs/bands.ts';
import { PROJECT_TEMPLATE_FILES } from '../../src/pipeline/init.ts';
import { expectNoStack } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '../..');

interface PackInfo {
  filename: string;
  files: { path: string }[];
}

function npmPack(args: string[]): PackInfo {
  const r = spawnSync('npm', ['pack', '--json', '--ignore-scripts', ...args], { cwd: ROOT, encoding: 'utf8', timeout: 60_000 });
  expect(r.status, r.stderr).toBe(0);
  return (JSON.parse(r.stdout) as PackInfo[])[0];
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => join(e.parentPath, e.name));
}

describe('npm pack', () => {
  it('ships every file the runtime finds beside its code: sources, the default network, presets, band strengths, init templates, docs', () => {
    const packed = new Set(npmPack(['--dry-run']).files.map((f) => f.path));
    const lookedUp = [
      HOARFROST_BIN,
      fileURLToPath(DEFAULT_WORKER_URL),
      DEFAULT_BAND_TABLE,
      ...PROJECT_TEMPLATE_FILES,
      ...filesUnder(PRESET_DIR),
      ...filesUnder(join(ROOT, 'src')),
      ...filesUnder(join(ROOT, 'docs')),
    ].map((f) => relative(ROOT, f));
    expect(lookedUp).toContain('config/networks/dark-cloud.yaml');
    expect(lookedUp).toContain('config/initial/low-metal.yaml');
    expect(lookedUp.filter((f) => !packed.has(f))).toEqual([]);
    // The tests, benches and scripts stay in the clone.
    expect([...packed].filter((f) => /^(test|bench|scripts)\//.test(f))).toEqual([]);
  });
});

describe('the packed command run from a folder outside the clone', () => {
  let scratch: string;
  let bin: string;
  beforeAll(() => {
    scratch = mkdtempSync(join(tmpdir(), 'hoarfrost-install-'));
    const { filename } = npmPack(['--pack-destination', scratch]);
    const unpacked = join(scratch, 'unpacked');
    mkdirSync(unpacked);
    const tar = spawnSync('tar', ['-xzf', join(scratch, filename), '-C', unpacked], { encoding: 'utf8' });
    expect(tar.status, tar.stderr).toBe(0);
    // npm install would fetch the dependencies; the clone's own stand in for them.
    symlinkSync(join(ROOT, 'node_modules'), join(unpacked, 'package/node_modules'), 'dir');
    bin = join(unpacked, 'package/bin/hoarfrost.mjs');
  });
  afterAll(() => rmSync(scratch, { recursive: true, force: true }));

  const hoarfrost = (args: string[], cwd: string) => {
    const r = spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', timeout: 120_000, env: { ...process.env, HOARFROST_DEBUG: '' } });
    return { code: r.status, stdout: r.stdout, stderr: r.stderr };
  };

  it('init writes a project whose observations read with the default band table and network, and a preset resolves', () => {
    const work = join(scratch, 'elsewhere');
    mkdirSync(work);
    const init = hoarfrost(['init', 's'], work);
    expect(init.code, init.stderr).toBe(0);
    expect(init.stdout).toContain('next: hoarfrost run s/pipeline.yaml');
    expect(readFileSync(join(work, 's/network.yaml'), 'utf8')).toBe(readFileSync(join(ROOT, 'config/networks/dark-cloud.yaml'), 'utf8'));

    const project = join(work, 's');
    const observe = hoarfrost(['run', 'pipeline.yaml', '--only', 'observe'], project);
    expect(observe.code, observe.stderr).toBe(0);
    expect(observe.stdout).toMatch(/observe\s.*12 sightlines/);
    expectNoStack(observe.stderr);

    const check = hoarfrost(['network', 'check', 'network.yaml'], project);
    expect(check.code, check.stderr).toBe(0);

    // The default initial composition `low-metal` is a preset of the package's config/initial/, not of the current folder.
    const short = readFileSync(join(project, 'pipeline.yaml'), 'utf8').replace('end_yr: 1.0e7', 'end_yr: 1.0e4').replace('count: 41 ', 'count: 3 ');
    expect(short).toContain('end_yr: 1.0e4');
    writeFileSync(join(project, 'short.yaml'), short);
    const model = hoarfrost(['model', 'short.yaml', '--out', 'one-model', '--set', 'density=2e4', 'visual_extinction=5'], project);
    expect(model.code, model.stderr).toBe(0);
    expect(readdirSync(join(project, 'one-model')).length).toBeGreaterThan(0);
    expectNoStack(model.stderr);
  });
});
