/** Grids of the real model on the tiny test network: determinism across workers and shards, staleness, merging. */
import { copyFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadPipeline, type Pipeline } from '../../src/config/pipeline.ts';
import { loadCandidates } from '../../src/grid/candidates.ts';
import { findShardStores, mergeShards } from '../../src/grid/merge.ts';
import { mainStoreFile, planGrid, shardStoreFile } from '../../src/grid/plan.ts';
import { runGrid } from '../../src/grid/run.ts';
import { gridStatus } from '../../src/grid/status.ts';
import { storeContentHash } from '../../src/grid/store.ts';
import { ModelStore } from '../../src/grid/store.ts';
import { caught, scratch, writePipeline } from './helpers.ts';

const GRID = `conditions:
  density: { from: 1.0e3, to: 1.0e6, count: 4 }
  gas_temperature: [10, 20]
  dust_temperature: { tie: gas_temperature }
  cr_ionisation_rate: [1.3e-17, 1.0e-16]
`;
const ALL_SPECIES = ['CO', 'H2', 'H', 'H2+', 'e-', 'H3+', 'HCO+', 'CO(s)'];

function abundanceBytes(storeFile: string): { ids: string[]; bytes: Buffer } {
  const t = loadCandidates(storeFile, ALL_SPECIES);
  return { ids: t.modelIds, bytes: Buffer.from(t.abundances.buffer, t.abundances.byteOffset, t.abundances.byteLength) };
}

describe('grid of the real model', () => {
  let dir: string;
  let pipeline: Pipeline;
  let oneWorker: string;

  beforeAll(async () => {
    dir = scratch();
    pipeline = loadPipeline(writePipeline(dir, GRID));
    const r = await runGrid(pipeline, { workers: 1 });
    expect(r).toMatchObject({ gridPoints: 16, computed: 16, ok: 16, failed: 0 });
    oneWorker = join(dir, 'one-worker.sqlite');
    copyFileSync(r.storeFile, oneWorker);
  });

  it('gives bit-identical abundances with 1 worker, 2 workers, and 3 shards merged', async () => {
    const two = loadPipeline(writePipeline(scratch(), GRID));
    const r2 = await runGrid(two, { workers: 2 });
    const sharded = loadPipeline(writePipeline(scratch(), GRID));
    for (const index of [1, 2, 3]) {
      const r = await runGrid(sharded, { workers: 1, shard: { index, count: 3 } });
      expect(r.share).toBe(index === 1 ? 6 : 5);
    }
    const merged = mergeShards(planGrid(sharded));
    expect(merged).toMatchObject({ copied: 16, duplicates: 0, missing: 0, failed: 0 });

    const a = abundanceBytes(oneWorker);
    const b = abundanceBytes(r2.storeFile);
    const c = abundanceBytes(merged.storeFile);
    expect(a.ids).toHaveLength(16);
    expect(b.ids).toEqual(a.ids);
    expect(c.ids).toEqual(a.ids);
    expect(b.bytes.equals(a.bytes)).toBe(true);
    expect(c.bytes.equals(a.bytes)).toBe(true);
    // Sanity of the values themselves: CO freezes out more at higher density by 1e7 yr.
    const t = loadCandidates(oneWorker, ['CO(s)']);
    expect(t.abundances[(0 * t.nTimes + t.nTimes - 1)]).toBeLessThan(t.abundances[(12 * t.nTimes + t.nTimes - 1)]);
    expect(storeContentHash(r2.storeFile)).toBe(storeContentHash(merged.storeFile));
  });

  it('finds everything up to date on a rerun, and stale after an input changes', async () => {
    const again = await runGrid(pipeline, { workers: 1 });
    expect(again).toMatchObject({ upToDate: 16, computed: 0 });
    const changed = loadPipeline(writePipeline(dir, `${GRID}solver: { rtol: 1.0e-7 }\n`, 'changed.yaml'));
    const plan = planGrid(changed);
    expect(gridStatus(mainStoreFile(plan), plan.points)).toMatchObject({ done: 0, stale: 16, missing: 0 });
    const wider = loadPipeline(writePipeline(dir, GRID.replace('[10, 20]', '[10, 20, 30]'), 'wider.yaml'));
    const widerPlan = planGrid(wider);
    expect(gridStatus(mainStoreFile(widerPlan), widerPlan.points)).toMatchObject({ done: 16, missing: 8, stale: 0 });
  });

  it('merges reporting duplicates and missing points, and refuses a shard of another grid', async () => {
    const d = scratch();
    const p = loadPipeline(writePipeline(d, GRID));
    const plan = planGrid(p);
    await runGrid(p, { workers: 1, shard: { index: 1, count: 2 } });
    await runGrid(p, { workers: 1, shard: { index: 1, count: 4 } });
    // Shard 1/4 is a subset of 1/2 (points 0, 4, 8, 12): four duplicates; 2/2 was never run.
    const r = mergeShards(plan);
    expect(r).toMatchObject({ copied: 8, duplicates: 4, missing: 8 });
    expect(r.duplicateSample[0].files).toEqual(['shard-1-of-2.sqlite', 'shard-1-of-4.sqlite']);
    expect(findShardStores(plan.storeDir).map((f) => f.slice(-19))).toEqual(['shard-1-of-2.sqlite', 'shard-1-of-4.sqlite']);

    const other = loadPipeline(writePipeline(scratch(), GRID.replace('count: 4', 'count: 5')));
    await runGrid(other, { workers: 1, shard: { index: 2, count: 2 } });
    const foreign = shardStoreFile(planGrid(other), { index: 2, count: 2 });
    const copy = join(plan.storeDir, 'shard-2-of-2.sqlite');
    copyFileSync(foreign, copy);
    const before = storeContentHash(mainStoreFile(plan));
    const e = caught(() => mergeShards(plan));
    expect(e.message).toContain(copy);
    expect(e.message).toMatch(/made from a different grid/);
    expect(storeContentHash(mainStoreFile(plan))).toBe(before);
  });

  it('refuses a shard store given for another shard', async () => {
    const d = scratch();
    const p = loadPipeline(writePipeline(d, GRID));
    const plan = planGrid(p);
    await runGrid(p, { workers: 1, shard: { index: 1, count: 2 } });
    copyFileSync(shardStoreFile(plan, { index: 1, count: 2 }), shardStoreFile(plan, { index: 2, count: 2 }));
    const s = ModelStore.open(shardStoreFile(plan, { index: 2, count: 2 }), { readonly: true });
    expect(s.meta()?.shard).toBe('1/2');
    s.close();
    await expect(runGrid(p, { workers: 1, shard: { index: 2, count: 2 } })).rejects.toThrow(/belongs to shard 1\/2, not 2\/2/);
  });

  it('refuses a bad network before starting any worker', async () => {
    const d = scratch();
    const bad = join(d, 'bad-network.yaml');
    writeFileSync(bad, 'format: hoarfrost-network 1\nname: broken\nreactions:\n  - { reactants: [CO], products: [CO], law: no-such-law }\n');
    writeFileSync(join(d, 'p.yaml'), `network: bad-network.yaml\ninitial: { CO: 1.0e-4 }\n`);
    await expect(runGrid(loadPipeline(join(d, 'p.yaml')))).rejects.toThrow(/bad-network\.yaml/);
  });
});
