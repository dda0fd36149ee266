/**
 * Track parameters as grid axes (issue 12, item 4): a list or a range in the
 * physical_track section multiplies the grid's points, each point runs its
 * own track, and its id and model hash tell the values apart.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CONDITION_NAMES, CONDITIONS } from '../../src/config/conditions.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import type { CandidateTable } from '../../src/fit/types.ts';
import { layeredCandidates } from '../../src/grid/layered-candidates.ts';
import { cellAv } from '../../src/grid/layers.ts';
import { expandGrid, gridSpecFromPipeline } from '../../src/grid/expand.ts';
import { planGrid } from '../../src/grid/plan.ts';
import { expectNoStack, runCli } from '../support/cli.ts';
import { caught, scratch, writePipeline } from './helpers.ts';

const pipeline = (body: string) => loadPipeline(writePipeline(scratch(), body));

describe('physical-track parameters on grid axes', () => {
  it('a retardation axis of 2 values gives twice the models, each with its own track, id and hash', () => {
    const fixed = planGrid(pipeline('conditions:\n  density: [1.0e3, 1.0e4]\nphysical_track: { kind: free-fall, final_density: 1.0e6, retardation: 0.5 }\n'));
    const axis = planGrid(pipeline('conditions:\n  density: [1.0e3, 1.0e4]\nphysical_track: { kind: free-fall, final_density: 1.0e6, retardation: [0.5, 1] }\n'));
    expect(fixed.points).toHaveLength(2);
    expect(axis.points).toHaveLength(4);
    expect(axis.grid.trackAxes).toEqual([{ name: 'retardation', values: [0.5, 1] }]);
    // Conditions outermost, the track axis fastest.
    expect(axis.points.map((p) => [p.conditions.density, p.trackParameters?.retardation])).toEqual([[1e3, 0.5], [1e3, 1], [1e4, 0.5], [1e4, 1]]);
    expect(axis.points.map((p) => (p.track?.kind === 'free-fall' ? p.track.retardation : undefined))).toEqual([0.5, 1, 0.5, 1]);
    expect(new Set(axis.points.map((p) => p.id)).size).toBe(4);
    expect(new Set(axis.points.map((p) => p.hash)).size).toBe(4);
    // A point with retardation 0.5 on the axis is the same model as the pipeline with 0.5 fixed: same hash, so a store reuses it.
    expect(axis.points[0].hash).toBe(fixed.points[0].hash);
    expect(axis.points[2].hash).toBe(fixed.points[1].hash);
    // Without track axes, points carry no track of their own and keep their ids.
    expect(fixed.points.every((p) => p.track === undefined && p.trackParameters === undefined)).toBe(true);
  });

  it('takes a range for the final density and checks each value', () => {
    const g = expandGrid(gridSpecFromPipeline(pipeline('conditions:\n  density: 1.0e4\nphysical_track: { kind: free-fall, final_density: { from: 1.0e5, to: 1.0e7, count: 3 } }\n')));
    expect(g.points.map((p) => p.trackParameters?.final_density)).toEqual([1e5, 1e6, 1e7]);
    const e = caught(() => expandGrid(gridSpecFromPipeline(pipeline('conditions:\n  density: 1.0e4\nphysical_track: { kind: free-fall, final_density: 1.0e6, retardation: [0.5, 2] }\n'))));
    expect(e.message).toMatch(/retardation must be at most 1, found 2/);
    expect(e.message).toMatch(/physical_track\.retardation/);
  });

  it('refuses a point whose collapse would start at or above its own final density, naming both', () => {
    const e = caught(() => planGrid(pipeline('conditions:\n  density: [1.0e4, 1.0e5]\nphysical_track: { kind: free-fall, final_density: [1.0e5, 1.0e6] }\n')));
    expect(e.message).toMatch(/final_density 100000 cm\^-3, but the grid starts a model at density 100000/);
  });
});

describe('layered columns over a track axis', () => {
  it("gives the columns of each retardation factor their own id (they shared one: the column's id ignored the track)", () => {
    const step = 0.5;
    const cells = [0, 1, 2, 3].map((k) => cellAv(k, step));
    const names = [...CONDITION_NAMES, 'retardation'];
    const parameters: number[] = [];
    const modelIds: string[] = [];
    for (const b of [0.3, 1]) {
      for (const av of cells) {
        for (const name of CONDITION_NAMES) parameters.push(name === 'visual_extinction' ? av : CONDITIONS[name].default);
        parameters.push(b);
        modelIds.push(`p${modelIds.length}`);
      }
    }
    const table: CandidateTable = {
      parameterNames: names,
      nModels: 8,
      nTimes: 1,
      nSpecies: 1,
      parameters: Float64Array.from(parameters),
      modelIds,
      timesYr: Float64Array.of(1e5),
      species: ['CO'],
      abundances: Float64Array.from({ length: 8 }, (_, m) => (m < 4 ? 1e-5 : 2e-5)),
    };
    const { table: t } = layeredCandidates(table, { geometry: { kind: 'slab' }, step }, [4]);
    expect(t.nModels).toBe(2);
    expect(new Set(t.modelIds).size).toBe(2);
    // Each column sums its own retardation's layers (constant x: the column-averaged abundance is x).
    expect(Array.from(t.abundances)).toEqual([1e-5, 2e-5]);
  });
});

describe('a single model of a pipeline whose track has axes', () => {
  it('`hoarfrost model` says which value of the axis it takes', () => {
    const dir = scratch();
    const file = writePipeline(dir, 'output: out\nconditions:\n  density: 1.0e4\nphysical_track: { kind: free-fall, final_density: 1.0e6, retardation: [0.3, 1] }\n');
    const r = runCli(['model', file], dir);
    expectNoStack(r.stderr);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/physical_track\.retardation is a grid axis \(0\.3, 1\); this single model takes its first value, 0\.3/);
    const json = JSON.parse(readFileSync(join(dir, 'out/model/abundances.json'), 'utf8')) as { notes: string[] };
    expect(json.notes.join('\n')).toMatch(/retardation is a grid axis/);
  });
});

describe('a warm-up with its duration on a grid axis', () => {
  it('gives each point a ramp of its own duration and final temperature fixed', () => {
    const plan = planGrid(pipeline('conditions:\n  gas_temperature: 10\nphysical_track: { kind: warm-up, final_temperature: 200, duration_yr: [1.0e4, 1.0e5, 1.0e6] }\n'));
    expect(plan.points.map((p) => p.track)).toEqual([1e4, 1e5, 1e6].map((durationYr) => ({ kind: 'warm-up', finalTemperature: 200, durationYr, exponent: 1 })));
    expect(new Set(plan.points.map((p) => p.hash)).size).toBe(3);
  });
});
