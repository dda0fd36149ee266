/**
 * The generated job-array script on a real single-node Slurm (Debian's
 * slurm-wlm and munge, started on loopback by scripts/slurm-local.sh): submit,
 * wait with a bounded loop, merge, and compare with a local run bit for bit.
 * When Slurm cannot start the test says why; with HOARFROST_REQUIRE_SLURM=1
 * (CI) it fails instead of skipping.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { loadCandidates } from '../../src/grid/candidates.ts';
import { runGrid } from '../../src/grid/run.ts';
import { storeContentHash } from '../../src/grid/store.ts';
import { BIN, scratch, writePipeline } from '../grid/helpers.ts';
import { needReference, referenceMissing, SLURM } from '../support/references.ts';

const SCRIPT = fileURLToPath(new URL('../../scripts/slurm-local.sh', import.meta.url));
const JOB_WAIT_MS = 120_000;
const POLL_MS = 500;
const SHARDS = 3;
const GRID = 'conditions:\n  density: { from: 1.0e3, to: 1.0e6, count: 4 }\n  gas_temperature: [10, 15, 20]\n';
const ALL_SPECIES = ['CO', 'H2', 'H', 'H2+', 'e-', 'H3+', 'HCO+', 'CO(s)'];

let clusterDir = '';
let unavailable: string | null = null;
let env: NodeJS.ProcessEnv = process.env;

function run(cmd: string, args: string[], cwd?: string) {
  const r = spawnSync(cmd, args, { cwd, env, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout ?? '', stderr: r.stderr ?? '', error: r.error };
}

beforeAll(() => {
  unavailable = referenceMissing(SLURM);
  if (unavailable) return;
  clusterDir = scratch('hoarfrost-slurm-');
  const started = run('bash', [SCRIPT, 'start', clusterDir]);
  if (started.code !== 0) {
    unavailable = `it could not start: ${(started.stderr || started.stdout || String(started.error)).trim()}`;
    return;
  }
  env = { ...process.env, SLURM_CONF: join(clusterDir, 'slurm.conf') };
}, 60_000);

afterAll(() => {
  if (clusterDir) run('bash', [SCRIPT, 'stop', clusterDir]);
}, 60_000);

describe('the grid as a Slurm job array', () => {
  it('runs every shard on Slurm, merges, and equals a local run', async (ctx) => {
    needReference(ctx, SLURM, unavailable);
    const dir = scratch();
    const file = writePipeline(dir, GRID);
    // Memory and a further directive pass through to the script, and the real sbatch accepts them.
    const written = run(process.execPath, [BIN, 'slurm', file, '--shards', String(SHARDS), '--cpus', '1', '--time', '10', '--mem', '200M', '--sbatch=--comment=hoarfrost-test'], dir);
    expect(written.code, written.stderr).toBe(0);
    const script = join(dir, 'out', 'slurm', 'grid-array.sh');
    expect(readFileSync(script, 'utf8')).toMatch(/^#SBATCH --mem=200M\n#SBATCH --comment=hoarfrost-test$/m);

    const submitted = run('sbatch', ['--parsable', script], dir);
    expect(submitted.code, submitted.stderr).toBe(0);
    const job = submitted.stdout.trim().split(';')[0];
    expect(job).toMatch(/^\d+$/);
    const start = Date.now();
    let queued = job;
    while (queued !== '' && Date.now() - start < JOB_WAIT_MS) {
      await new Promise((r) => setTimeout(r, POLL_MS));
      queued = run('squeue', ['-h', '-j', job, '-o', '%i %T']).stdout.trim();
    }
    if (queued !== '') {
      run('scancel', [job]);
      throw new Error(`the array job ${job} was still queued or running after ${JOB_WAIT_MS / 1000} s:\n${queued}`);
    }
    const logs = readdirSync(join(dir, 'out', 'slurm')).filter((f) => f.endsWith('.log')).sort();
    expect(logs).toEqual([1, 2, 3].map((k) => `shard-${k}-of-${SHARDS}.log`));
    for (const log of logs) expect(readFileSync(join(dir, 'out', 'slurm', log), 'utf8')).toMatch(/^done: [45] computed \([45] ok, 0 failed\)/m);

    const merged = run(process.execPath, [BIN, 'merge', file], dir);
    expect(merged.code, merged.stderr).toBe(0);
    expect(merged.stdout).toContain(`merged ${SHARDS} shard stores`);
    expect(merged.stdout).toContain('grid: 12 points, 12 done, 0 failed, 0 missing.');

    const local = await runGrid(loadPipeline(writePipeline(scratch(), GRID)), { workers: 1 });
    const mergedStore = join(dir, 'out', 'store', 'models.sqlite');
    const a = loadCandidates(local.storeFile, ALL_SPECIES);
    const b = loadCandidates(mergedStore, ALL_SPECIES);
    expect(b.modelIds).toEqual(a.modelIds);
    expect(Buffer.from(b.abundances.buffer).equals(Buffer.from(a.abundances.buffer))).toBe(true);
    expect(storeContentHash(mergedStore)).toBe(storeContentHash(local.storeFile));
  }, 180_000);
});
