/**
 * A grid with the three-phase ice (docs/ice-mantle.md): the workers and the
 * plan agree on the output columns, and the store holds X(s) as the sum of
 * X(surface) and X(mantle), the column an observed ice is fitted against.
 */
import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { loadCandidates } from '../../src/grid/candidates.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { runGrid } from '../../src/grid/run.ts';
import { caught, scratch, TINY_NETWORK, writePipeline } from './helpers.ts';

describe('grid with grain.mantle on', () => {
  it('stores the whole ice X(s) beside its surface and mantle parts', async () => {
    const dir = scratch();
    const pipeline = loadPipeline(writePipeline(dir, 'conditions:\n  density: [1.0e4, 1.0e5]\ngrain: { mantle: true, surface_layers: 2 }\n'));
    const plan = planGrid(pipeline);
    expect(plan.species).toEqual(expect.arrayContaining(['CO(s)', 'CO(surface)', 'CO(mantle)', 'CO']));
    const r = await runGrid(pipeline, { workers: 1 });
    expect(r).toMatchObject({ gridPoints: 2, ok: 2, failed: 0 });
    const t = loadCandidates(r.storeFile, ['CO(s)', 'CO(surface)', 'CO(mantle)']);
    expect(t.nModels * t.nTimes).toBeGreaterThan(0);
    let buried = 0;
    for (let c = 0; c < t.nModels * t.nTimes; c++) {
      const [whole, surface, mantle] = [0, 1, 2].map((i) => t.abundances[c * t.nSpecies + t.species.indexOf(['CO(s)', 'CO(surface)', 'CO(mantle)'][i])]);
      expect(whole).toBeCloseTo(surface + mantle, 20);
      if (mantle > surface) buried++;
    }
    // 1e-4 CO per H is about 28 monolayers: at late times most of it is below the two surface layers.
    expect(buried).toBeGreaterThan(0);
    rmSync(dir, { recursive: true, force: true });
  });

  it('takes mantle abundances in the initial composition when the mantle is on, and names the fix when it is off', () => {
    const dir = scratch();
    const write = (mantle: boolean) => {
      const file = join(dir, `${mantle}.yaml`);
      writeFileSync(file, `name: t\nnetwork: ${TINY_NETWORK}\ninitial: { H2: 0.5, CO: 1.0e-4, CO(mantle): 1.0e-5 }\ngrain: { mantle: ${mantle} }\n`);
      return loadPipeline(file);
    };
    expect(planGrid(write(true)).shared.options.initial['CO(mantle)']).toBe(1e-5);
    expect(caught(() => planGrid(write(false))).message).toMatch(/needs species 'CO\(mantle\)'/);
    rmSync(dir, { recursive: true, force: true });
  });
});
