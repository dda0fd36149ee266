/** Monte Carlo realizations on the worker pool: same seed, same realizations bit for bit on 1 and 2 workers and in shards; resumable. */
import { describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { mergeShards } from '../../src/grid/merge.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { planRealizations, readRealizations, realizationStoreFile, runRealizations } from '../../src/grid/realizations.ts';
import { storeContentHash } from '../../src/grid/store.ts';
import { caught, scratch, writePipeline } from './helpers.ts';

const POINT = `conditions:
  density: [1.0e4, 1.0e5]
`;
const settings = { count: 6, seed: 42 };

function setup() {
  const pipeline = loadPipeline(writePipeline(scratch(), POINT));
  const plan = planGrid(pipeline);
  const bases = plan.points.map((p) => ({ id: p.id, conditions: p.conditions }));
  return { pipeline, plan, bases };
}

describe('realizations of the real model on the tiny network', () => {
  it('are bit-identical on 1 worker, 2 workers and in 2 shards merged, and differ from each other', async () => {
    const one = setup();
    const r1 = await runRealizations(one.pipeline, one.plan, one.bases, settings, { workers: 1 });
    expect(r1).toMatchObject({ share: 12, computed: 12, ok: 12, failed: 0 });
    const two = setup();
    const r2 = await runRealizations(two.pipeline, two.plan, two.bases, settings, { workers: 2 });
    const sharded = setup();
    for (const index of [1, 2]) await runRealizations(sharded.pipeline, sharded.plan, sharded.bases, settings, { workers: 1, shard: { index, count: 2 } });
    const shardFiles = [1, 2].map((index) => realizationStoreFile(sharded.plan, { index, count: 2 }));
    const merged = mergeShards(planRealizations(sharded.plan, sharded.bases, settings), shardFiles, realizationStoreFile(sharded.plan));
    expect(merged).toMatchObject({ copied: 12, missing: 0, failed: 0 });
    expect(storeContentHash(r2.storeFile)).toBe(storeContentHash(r1.storeFile));
    expect(storeContentHash(merged.storeFile)).toBe(storeContentHash(r1.storeFile));

    const sets = readRealizations(r1.storeFile, one.plan, one.bases, settings);
    expect(sets).toHaveLength(2);
    expect(sets[0].missing).toEqual([]);
    expect(sets[0].abundances).toHaveLength(6);
    // The draws differ between realizations, so the abundances do.
    expect(Buffer.from(sets[0].abundances[0].buffer).equals(Buffer.from(sets[0].abundances[1].buffer))).toBe(false);
    // The same draw at both conditions: the realizations of base 2 are not those of base 1.
    expect(Buffer.from(sets[0].abundances[0].buffer).equals(Buffer.from(sets[1].abundances[0].buffer))).toBe(false);
  });

  it('resumes: a rerun computes nothing, more realizations compute only the new ones, another seed all', async () => {
    const s = setup();
    await runRealizations(s.pipeline, s.plan, s.bases, settings, { workers: 1 });
    const again = await runRealizations(s.pipeline, s.plan, s.bases, settings, { workers: 1 });
    expect(again).toMatchObject({ upToDate: 12, computed: 0 });
    const more = await runRealizations(s.pipeline, s.plan, s.bases, { ...settings, count: 8 }, { workers: 1 });
    expect(more).toMatchObject({ upToDate: 12, computed: 4 });
    const reseeded = await runRealizations(s.pipeline, s.plan, s.bases, { ...settings, seed: 43 }, { workers: 1 });
    expect(reseeded).toMatchObject({ computed: 12, staleRecomputed: 12 });
  });

  it('refuses fewer than 2 realizations and a negative seed', () => {
    const s = setup();
    expect(caught(() => planRealizations(s.plan, s.bases, { count: 1, seed: 1 })).message).toMatch(/at least 2/);
    expect(caught(() => planRealizations(s.plan, s.bases, { count: 4, seed: -1 })).message).toMatch(/non-negative whole number/);
  });
});
