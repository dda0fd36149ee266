import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync, mkdirSync, existsSync } from 'node:fs';
import { PassThrough } from 'node:stream';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { executeRun } from '../../src/pipeline/execute.ts';
import { runStages } from '../../src/pipeline/runner.ts';
import { parseStageName, type StageName, type StageSet } from '../../src/pipeline/stages.ts';
import { statePath } from '../../src/pipeline/state.ts';

interface FakeData {
  observe: { rows: string[] };
  grid: { models: number };
  fit: { best: string };
  report: { files: number };
}

/** Fake stages that record every run and load, and write small output files. */
function fakeStages(calls: string[], fail?: StageName): StageSet<FakeData> {
  const write = (outDir: string, rel: string, text: string) => {
    mkdirSync(join(outDir, rel, '..'), { recursive: true });
    writeFileSync(join(outDir, rel), text);
  };
  return {
    observe: {
      inputs: (ctx) => ({ config: ctx.pipeline.config.observations, files: { observations: ctx.pipeline.resolvePath(ctx.pipeline.config.observations!.file) }, after: [] }),
      run: async (ctx) => {
        calls.push('run observe');
        const rows = readFileSync(ctx.pipeline.resolvePath(ctx.pipeline.config.observations!.file), 'utf8').trim().split('\n');
        write(ctx.outDir, 'observations/rows.json', JSON.stringify(rows));
        return { summary: `${rows.length} rows`, outputs: ['observations/rows.json'], data: { rows } };
      },
      load: async (ctx) => {
        calls.push('load observe');
        return { rows: JSON.parse(readFileSync(join(ctx.outDir, 'observations/rows.json'), 'utf8')) as string[] };
      },
    },
    grid: {
      inputs: (ctx) => ({ config: { conditions: ctx.pipeline.config.conditions, times: ctx.pipeline.config.times }, files: { network: ctx.pipeline.resolvePath(ctx.pipeline.config.network) }, after: [] }),
      run: async (ctx) => {
        calls.push('run grid');
        if (fail === 'grid') throw new UserError('grid broke');
        write(ctx.outDir, 'grid/store.txt', 'models: 4');
        return { summary: '4 models', outputs: ['grid/store.txt'], data: { models: 4 } };
      },
      load: async () => {
        calls.push('load grid');
        return { models: 4 };
      },
      outputHash: () => 'store-hash-4',
    },
    fit: {
      inputs: (ctx) => ({ config: ctx.pipeline.config.fit, files: {}, after: ['observe', 'grid'] }),
      run: async (ctx) => {
        calls.push('run fit');
        const obs = await ctx.upstream('observe');
        const grid = await ctx.upstream('grid');
        const best = `${obs.rows.length} rows x ${grid.models} models, sigma ${ctx.pipeline.config.fit!.model_sigma_dex}`;
        write(ctx.outDir, 'fit/best_fits.csv', `${best}\n`);
        return { summary: best, outputs: ['fit/best_fits.csv'], data: { best } };
      },
      load: async (ctx) => {
        calls.push('load fit');
        return { best: readFileSync(join(ctx.outDir, 'fit/best_fits.csv'), 'utf8').trim() };
      },
    },
    report: {
      inputs: (ctx) => ({ config: ctx.pipeline.config.report, files: {}, after: ['fit'] }),
      run: async (ctx) => {
        calls.push('run report');
        const fit = await ctx.upstream('fit');
        write(ctx.outDir, 'report/index.html', `<p>${fit.best}</p>`);
        return { summary: '1 file', outputs: ['report/index.html'], data: { files: 1 } };
      },
      load: async () => ({ files: 1 }),
    },
  };
}

let dir: string;
const pipelineText = (sigma: number) => `name: fake\nnetwork: net.yaml\nobservations:\n  file: obs.csv\nfit:\n  quantities:\n    - species: CO(s)\n  model_sigma_dex: ${sigma}\n`;

beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-runner-'));
  writeFileSync(join(dir, 'net.yaml'), 'reactions: []\n');
  writeFileSync(join(dir, 'obs.csv'), 'a\nb\n');
  writeFileSync(join(dir, 'p.yaml'), pipelineText(0.3));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

type ExecuteStages = NonNullable<Parameters<typeof executeRun>[0]['stages']>;

/** Every file under a folder with its modification time and bytes. */
function snapshot(root: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else out.set(relative(root, p), `${statSync(p).mtimeMs} ${readFileSync(p, 'base64')}`);
    }
  };
  walk(root);
  return out;
}

const statuses = (r: Awaited<ReturnType<typeof runStages>>) => r.stages.map((s) => `${s.name}:${s.status}`);

describe('the stage runner', () => {
  it('runs every stage in order the first time and records them', async () => {
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls));
    expect(calls).toEqual(['run observe', 'run grid', 'run fit', 'run report']);
    expect(statuses(r)).toEqual(['observe:ran', 'grid:ran', 'fit:ran', 'report:ran']);
    const state = JSON.parse(readFileSync(statePath(join(dir, 'out')), 'utf8'));
    expect(Object.keys(state.stages)).toEqual(['observe', 'grid', 'fit', 'report']);
    expect(state.stages.grid.outputHash).toBe('store-hash-4');
    expect(readFileSync(join(dir, 'out/report/index.html'), 'utf8')).toBe('<p>2 rows x 4 models, sigma 0.3</p>');
  });

  it('skips every stage on a rerun with nothing changed', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls));
    expect(calls).toEqual([]);
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:skipped', 'fit:skipped', 'report:skipped']);
    expect(r.stages[2].summary).toBe('2 rows x 4 models, sigma 0.3');
  });

  it('a run with nothing to do writes nothing: the output folder is left exactly as it was (a read-only output that is up to date can be run)', async () => {
    const sink = new PassThrough();
    const run = () => executeRun({ pipelineFile: join(dir, 'p.yaml'), commandLine: ['run', 'p.yaml'], stdout: sink, stderr: sink, stages: fakeStages([]) as unknown as ExecuteStages });
    expect(await run()).toBe(0);
    const out = join(dir, 'out');
    const before = snapshot(out);
    expect(before.has('provenance.json')).toBe(true);
    expect(await run()).toBe(0);
    expect(snapshot(out)).toEqual(before);
  });

  it('reruns only fit and report after a change of a fit setting, reloading the skipped stages it reads', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    writeFileSync(join(dir, 'p.yaml'), pipelineText(0.5));
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls));
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:skipped', 'fit:ran', 'report:ran']);
    expect(calls).toEqual(['run fit', 'load observe', 'load grid', 'run report']);
    expect(readFileSync(join(dir, 'out/fit/best_fits.csv'), 'utf8')).toContain('sigma 0.5');
  });

  it('reruns the observe stage and everything that reads it when the observations file changes', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    writeFileSync(join(dir, 'obs.csv'), 'a\nb\nc\n');
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    expect(statuses(r)).toEqual(['observe:ran', 'grid:skipped', 'fit:ran', 'report:ran']);
  });

  it('does not rerun later stages when a rerun stage writes the same outputs', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    // The network file's bytes change, so the grid reruns, but the store's content hash stays the same.
    writeFileSync(join(dir, 'net.yaml'), 'reactions: [ ]\n');
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:ran', 'fit:skipped', 'report:skipped']);
  });

  it('reruns a stage whose output file was deleted or edited', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    writeFileSync(join(dir, 'out/fit/best_fits.csv'), 'edited by hand\n');
    let r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:skipped', 'fit:ran', 'report:skipped']);
    rmSync(join(dir, 'out/report/index.html'));
    r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:skipped', 'fit:skipped', 'report:ran']);
  });

  it('--from forces a stage and every later one', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls), { from: 'fit' });
    expect(statuses(r)).toEqual(['observe:skipped', 'grid:skipped', 'fit:ran', 'report:ran']);
  });

  it('--only runs one stage and warns when an earlier one is out of date', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    writeFileSync(join(dir, 'obs.csv'), 'a\n');
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls), { only: 'report' });
    expect(statuses(r)).toEqual(['observe:not run', 'grid:not run', 'fit:not run', 'report:ran']);
    expect(calls).toEqual(['run report', 'load fit']);
    expect(r.stages[0].warnings[0]).toContain('the observe stage is out of date');
  });

  it('--only on a fresh output folder is a clear error', async () => {
    const e = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]), { only: 'fit' }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(UserError);
    expect((e as Error).message).toMatch(/the fit stage needs the results of the observe stage.*Run the whole pipeline first/);
  });

  it('a failed stage leaves no record, so the next run does it again', async () => {
    await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    writeFileSync(join(dir, 'net.yaml'), 'reactions: [changed]\n');
    await expect(runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([], 'grid'))).rejects.toThrow('grid broke');
    const state = JSON.parse(readFileSync(statePath(join(dir, 'out')), 'utf8'));
    expect(Object.keys(state.stages)).toEqual(['observe', 'fit', 'report']);
    const calls: string[] = [];
    const r = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages(calls));
    expect(statuses(r)[1]).toBe('grid:ran');
  });

  it('hashes contents, not paths: the same project in another folder skips nothing it should not and runs the same', async () => {
    const r1 = await runStages(loadPipeline(join(dir, 'p.yaml')), fakeStages([]));
    const other = mkdtempSync(join(tmpdir(), 'hoarfrost-runner-copy-'));
    try {
      for (const f of ['net.yaml', 'obs.csv', 'p.yaml']) writeFileSync(join(other, f), readFileSync(join(dir, f)));
      const r2 = await runStages(loadPipeline(join(other, 'p.yaml')), fakeStages([]));
      expect(r2.stages.map((s) => s.inputHash)).toEqual(r1.stages.map((s) => s.inputHash));
      expect(r2.stages.map((s) => s.outputHash)).toEqual(r1.stages.map((s) => s.outputHash));
      expect(existsSync(join(other, 'out/report/index.html'))).toBe(true);
    } finally {
      rmSync(other, { recursive: true, force: true });
    }
  });
});

describe('stage names', () => {
  it('accepts the four stages and refuses anything else with the list', () => {
    expect(parseStageName('grid', '--from')).toBe('grid');
    expect(() => parseStageName('fitt', '--from')).toThrow(UserError);
    expect(() => parseStageName('fitt', '--from')).toThrow("unknown stage 'fitt' for --from. The stages are, in order: observe, grid, fit, report.");
  });
});
