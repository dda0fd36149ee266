import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { loadCandidates } from '../../src/grid/candidates.ts';
import { decodeAbundances, encodeAbundances, ModelStore, type StoredModel } from '../../src/grid/store.ts';
import { failureReason, gridStatus } from '../../src/grid/status.ts';
import { caught, scratch } from './helpers.ts';

const SPECIES = ['H2', 'CO', 'CO(s)'];
const TIMES = Float64Array.of(1e3, 1e5, 1e7);

function model(id: string, density: number, status: 'ok' | 'failed' = 'ok'): StoredModel {
  const abundances = new Float64Array(TIMES.length * SPECIES.length);
  // Values that Float32 could not hold exactly, so a lossy round trip would show.
  for (let i = 0; i < abundances.length; i++) abundances[i] = (density * (i + 1)) / 3e11 + Math.PI * 1e-20;
  return {
    id,
    hash: `h-${id}`,
    conditions: { ...defaultConditions(), density },
    status,
    failure: status === 'failed' ? 'the solver stopped at t = 5.2e4 yr' : undefined,
    conservationDrift: 1e-13,
    conservationWorst: 'C',
    stats: { steps: 100, failedSteps: 2, rhsEvals: 300, jacobianEvals: 20, factorizations: 25, newtonFailures: 1 },
    wallMs: 3.5,
    clampNotes: [],
    abundances,
  };
}

function storeWith(models: StoredModel[], pointHashes?: Record<string, string>): string {
  const file = join(scratch(), 'models.sqlite');
  const store = ModelStore.open(file);
  store.setGrid({
    gridHash: 'grid-1',
    species: SPECIES,
    timesYr: TIMES,
    points: models.map((m, index) => ({ id: m.id, hash: pointHashes?.[m.id] ?? m.hash, index })),
    shard: '',
    toolVersion: '0.1.0',
    networkHash: 'net',
  });
  store.write(models, 'run-1');
  store.close();
  return file;
}

describe('model store', () => {
  it('round-trips abundances bit for bit as little-endian Float64', () => {
    const a = Float64Array.of(1e-30, Math.PI, -0, Number.MIN_VALUE, 0.1 + 0.2);
    const b = encodeAbundances(a);
    expect(b.byteLength).toBe(40);
    expect(b.readDoubleLE(8)).toBe(Math.PI);
    expect(Buffer.from(decodeAbundances(b).buffer).equals(Buffer.from(a.buffer))).toBe(true);
  });

  it('loads the chosen species of every finished current model into one typed array', () => {
    const ms = [model('pa', 1e3), model('pb', 1e4, 'failed'), model('pc', 1e5), model('pd', 1e6)];
    // pd is stale: the grid now wants another hash for it.
    const file = storeWith(ms, { pd: 'h-new' });
    const t = loadCandidates(file, ['CO(s)', 'H2']);
    expect(t.nModels).toBe(2);
    expect(t.modelIds).toEqual(['pa', 'pc']);
    expect(t.nTimes).toBe(3);
    expect(t.nSpecies).toBe(2);
    expect(Array.from(t.timesYr)).toEqual([1e3, 1e5, 1e7]);
    const densityColumn = t.parameterNames.indexOf('density');
    expect(t.parameters[densityColumn]).toBe(1e3);
    expect(t.parameters[t.parameterNames.length + densityColumn]).toBe(1e5);
    for (const [k, src] of [ms[0], ms[2]].entries()) {
      for (let time = 0; time < 3; time++) {
        expect(t.abundances[(k * 3 + time) * 2 + 0]).toBe(src.abundances![time * 3 + 2]);
        expect(t.abundances[(k * 3 + time) * 2 + 1]).toBe(src.abundances![time * 3 + 0]);
      }
    }
  });

  it('names the species a store does not have', () => {
    const file = storeWith([model('pa', 1e3)]);
    const e = caught(() => loadCandidates(file, ['CO', 'H2O(s)', 'CH3OH(s)']));
    expect(e.message).toContain(file);
    expect(e.message).toMatch(/has no species 'H2O\(s\)', 'CH3OH\(s\)'; the network of this grid has 3 species \(H2, CO, CO\(s\)\)/);
  });

  it('says clearly when there is no store', () => {
    const e = caught(() => loadCandidates(join(scratch(), 'nothing.sqlite'), ['CO']));
    expect(e.message).toMatch(/no model store here .*Run `hoarfrost grid`/);
  });

  it('counts done, failed by reason, missing and stale', () => {
    const file = storeWith([model('pa', 1e3), model('pb', 1e4, 'failed'), model('pc', 1e5, 'failed'), model('pd', 1e6)]);
    const points = [
      { id: 'pa', hash: 'h-pa' },
      { id: 'pb', hash: 'h-pb' },
      { id: 'pc', hash: 'h-pc' },
      { id: 'pd', hash: 'h-changed' },
      { id: 'pe', hash: 'h-pe' },
    ].map((p, index) => ({ ...p, index, conditions: defaultConditions() }));
    const s = gridStatus(file, points);
    expect(s).toMatchObject({ points: 5, done: 1, failed: 2, missing: 1, stale: 1, outsideGrid: 0 });
    expect(s.failedByReason).toEqual({ 'the solver stopped at t = # yr': 2 });
    expect(failureReason('x at 1.5e-3 and 42')).toBe('x at # and #');
  });

  it('passes the integrity check and keeps one row per model on rewrite', () => {
    const file = storeWith([model('pa', 1e3)]);
    const store = ModelStore.open(file);
    store.write([model('pa', 1e3), model('pb', 1e4)], 'run-2');
    expect(store.integrityCheck()).toBe('ok');
    expect((store.db.prepare('SELECT COUNT(*) AS n FROM models').get() as { n: number }).n).toBe(2);
    expect(store.db.pragma('journal_mode', { simple: true })).toBe('wal');
    store.close();
  });
});
