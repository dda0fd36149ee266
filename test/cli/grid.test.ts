/** `hoarfrost grid`, `merge` and `slurm` as a user runs them: child processes, signals, exit codes. */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { mainStoreFile, planGrid } from '../../src/grid/plan.ts';
import { BIN, scratch, writePipeline } from '../grid/helpers.ts';
import { runCli } from '../support/cli.ts';

/** About 300 models of ~10 ms: long enough to be killed part way on any machine. */
const BIG_GRID = `conditions:
  density: { from: 1.0e3, to: 1.0e6, count: 25 }
  gas_temperature: { from: 8, to: 20, count: 6, scale: linear }
  cr_ionisation_rate: [1.3e-17, 5.0e-17]
`;
const POLL_MS = 20;
const KILL_AFTER_MODELS = 30;
const WAIT_LIMIT_MS = 30_000;

const hoarfrost = (args: string[], cwd: string) => runCli(args, cwd, 60_000);

interface Row {
  id: string;
  run: string;
  computed_at: string;
}

function readRows(file: string): Row[] | undefined {
  if (!existsSync(file)) return undefined;
  try {
    const db = new Database(file, { readonly: true, fileMustExist: true, timeout: 1000 });
    try {
      return db.prepare('SELECT id, run, computed_at FROM models').all() as Row[];
    } finally {
      db.close();
    }
  } catch {
    return undefined; // schema not written yet
  }
}

async function waitForRows(file: string, atLeast: number, child: ChildProcess): Promise<number> {
  const start = Date.now();
  while (Date.now() - start < WAIT_LIMIT_MS) {
    const n = readRows(file)?.length ?? 0;
    if (n >= atLeast) return n;
    if (child.exitCode !== null) throw new Error(`the grid exited (code ${child.exitCode}) before ${atLeast} models were stored`);
    await new Promise((r) => setTimeout(r, POLL_MS));
  }
  throw new Error(`fewer than ${atLeast} models stored after ${WAIT_LIMIT_MS} ms`);
}

function exited(child: ChildProcess): Promise<{ code: number | null; signal: NodeJS.Signals | null }> {
  return new Promise((resolve) => child.on('exit', (code, signal) => resolve({ code, signal })));
}

describe('hoarfrost grid in a child process', () => {
  it('resumes after SIGKILL: every model once, none recomputed, store intact', async () => {
    const dir = scratch();
    const file = writePipeline(dir, BIG_GRID);
    const plan = planGrid(loadPipeline(file));
    const store = mainStoreFile(plan);
    expect(plan.points).toHaveLength(300);

    const child = spawn(process.execPath, [BIN, 'grid', file, '--workers', '2'], { cwd: dir, stdio: 'ignore' });
    const done = exited(child);
    await waitForRows(store, KILL_AFTER_MODELS, child);
    child.kill('SIGKILL');
    expect((await done).signal).toBe('SIGKILL');

    const db = new Database(store);
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    db.close();
    const survivors = readRows(store)!;
    expect(survivors.length).toBeGreaterThanOrEqual(KILL_AFTER_MODELS);
    // The test shows nothing if the grid had finished before the kill.
    expect(survivors.length).toBeLessThan(plan.points.length);

    const status = hoarfrost(['grid', file, '--status'], dir);
    expect(status.code).toBe(0);
    expect(status.stdout).toMatch(new RegExp(`done\\s+${survivors.length}\\n`));
    expect(status.stdout).toMatch(new RegExp(`missing\\s+${plan.points.length - survivors.length}\\n`));
    const json = JSON.parse(hoarfrost(['grid', file, '--status', '--json'], dir).stdout) as Record<string, unknown>;
    expect(json).toMatchObject({ points: 300, done: survivors.length, failed: 0, missing: 300 - survivors.length, stale: 0, gridHash: plan.gridHash });

    const rerun = hoarfrost(['grid', file, '--workers', '2'], dir);
    expect(rerun.code).toBe(0);
    expect(rerun.stderr).toContain(`${survivors.length} already in`);
    expect(rerun.stdout).toContain(`done: ${plan.points.length - survivors.length} computed`);

    const after = readRows(store)!;
    expect(after).toHaveLength(plan.points.length);
    expect(new Set(after.map((r) => r.id))).toEqual(new Set(plan.points.map((p) => p.id)));
    const byId = new Map(after.map((r) => [r.id, r]));
    for (const r of survivors) expect(byId.get(r.id)).toEqual(r);
    const db2 = new Database(store);
    expect(db2.pragma('integrity_check', { simple: true })).toBe('ok');
    db2.close();
  });

  it('stops cleanly on Ctrl-C (SIGINT), keeping finished models, exit 130', async () => {
    const dir = scratch();
    const file = writePipeline(dir, BIG_GRID);
    const store = mainStoreFile(planGrid(loadPipeline(file)));
    const child = spawn(process.execPath, [BIN, 'grid', file, '--workers', '2'], { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout!.on('data', (d) => (stdout += d));
    child.stderr!.on('data', (d) => (stderr += d));
    const done = exited(child);
    await waitForRows(store, KILL_AFTER_MODELS, child);
    child.kill('SIGINT');
    const { code } = await done;
    expect(code).toBe(130);
    expect(stderr).toContain('stopping: finishing the models in flight');
    const m = /stopped: (\d+) computed/.exec(stdout);
    expect(m).not.toBeNull();
    const kept = readRows(store)!.length;
    expect(kept).toBe(Number(m![1]));
    expect(kept).toBeLessThan(300);
    expect(stdout).toContain(`${300 - kept} left`);
  });

  it('prints plain progress lines when not on a terminal', () => {
    const dir = scratch();
    const file = writePipeline(dir, 'conditions:\n  density: [1.0e3, 1.0e4, 1.0e5]\n');
    const r = hoarfrost(['grid', file, '--workers', '1'], dir);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/^grid: 3 models, 0 already in .*models\.sqlite, 3 to compute on 1 worker$/m);
    expect(r.stderr).toMatch(/^grid: 3\/3 models, 0 failed, [\d.]+\/min, 0s left$/m);
    expect(r.stderr).not.toContain('\r');
    expect(r.stdout).toMatch(/^done: 3 computed \(3 ok, 0 failed\)/);
  });
});

describe('hoarfrost grid, merge, slurm: bad input', () => {
  const cases: [string, string, RegExp][] = [
    ['an empty axis', 'conditions:\n  density: []\n', /pipeline\.yaml:6, field 'conditions\.density': the list of values is empty/],
    ['a range with from > to', 'conditions:\n  gas_temperature: { from: 30, to: 10, count: 3 }\n', /pipeline\.yaml:6, .*a range needs from < to/],
    ['an unknown condition', 'conditions:\n  temperature: 10\n', /unknown condition 'temperature'\. Known conditions: density/],
  ];
  for (const [what, body, message] of cases) {
    it(`refuses ${what} with exit 2 and no stack trace`, () => {
      const dir = scratch();
      const r = hoarfrost(['grid', writePipeline(dir, body)], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      expect(existsSync(join(dir, 'out', 'store', 'models.sqlite'))).toBe(false);
    });
  }

  it('refuses a shard like 4/3 and a bad worker count', () => {
    const dir = scratch();
    const file = writePipeline(dir, '');
    const r = hoarfrost(['grid', file, '--shard', '4/3'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--shard 4/3: the shard number K must be between 1 and 3');
    const w = hoarfrost(['grid', file, '--workers', '0'], dir);
    expect(w.code).toBe(2);
    expect(w.stderr).toContain("--workers expects a whole number of at least 1, found '0'");
  });

  it('slurm refuses bad options; merge says when there is nothing to merge', () => {
    const dir = scratch();
    const file = writePipeline(dir, 'conditions:\n  density: [1.0e3, 1.0e4]\n');
    expect(hoarfrost(['slurm', file, '--shards', '3'], dir).stderr).toContain('--shards 3 is more than the 2 points of the grid');
    expect(hoarfrost(['slurm', file, '--shards', '2', '--time', 'soon'], dir).stderr).toContain("--time 'soon' is not a Slurm time");
    expect(hoarfrost(['slurm', file, '--shards', 'x'], dir).code).toBe(2);
    const m = hoarfrost(['merge', file], dir);
    expect(m.code).toBe(2);
    expect(m.stderr).toMatch(/no shard stores \(shard-K-of-N\.sqlite\) to merge/);
  });

  it('slurm writes an array script with absolute paths and 1-based shards', () => {
    const dir = scratch();
    const file = writePipeline(dir, 'conditions:\n  density: [1.0e3, 1.0e4, 1.0e5]\n');
    const r = hoarfrost(['slurm', file, '--shards', '3', '--partition', 'short', '--time', '01:00:00', '--cpus', '2'], dir);
    expect(r.code).toBe(0);
    const script = readFileSync(join(dir, 'out', 'slurm', 'grid-array.sh'), 'utf8');
    expect(script).toMatch(/^#!\/bin\/bash\n/);
    expect(script).toContain('#SBATCH --array=1-3\n');
    expect(script).toContain('#SBATCH --partition=short\n');
    expect(script).toContain('#SBATCH --time=01:00:00\n');
    expect(script).toContain('#SBATCH --cpus-per-task=2\n');
    expect(script).toContain(`exec '${process.execPath}' '${BIN}' grid '${file}' --shard "\${SLURM_ARRAY_TASK_ID}/3"`);
    const check = spawnSync('bash', ['-n', join(dir, 'out', 'slurm', 'grid-array.sh')]);
    expect(check.status).toBe(0);
  });
});
