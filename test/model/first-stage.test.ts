import { existsSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { buildModelSetup, modelInput, runModel } from '../../src/model/run.ts';
import { ROOT } from '../support/cli.ts';
import { scratch } from '../support/scratch.ts';

const TINY = join(ROOT, 'test/grid/fixtures/tiny-network.yaml');
const START = '{ H2: 0.5, CO: 1.0e-4, "HCO+": 1.0e-8 }';
const FIRST = { density: 1e3, gas_temperature: 15, dust_temperature: 15 };

function pipelineFile(dir: string, name: string, initial: string): string {
  const file = join(dir, `${name}.yaml`);
  writeFileSync(
    file,
    `name: ${name}
output: out
network: ${TINY}
conditions: { density: 1.0e4, gas_temperature: 10, dust_temperature: 10 }
initial: ${initial}
times: { start_yr: 1.0e3, end_yr: 1.0e6, count: 7 }
solver: { rtol: 1.0e-8, atol: 1.0e-25 }
`,
  );
  return file;
}

const firstStage = (age: number) => `{ first_stage: { from: ${START}, age_yr: ${age}, conditions: { density: 1.0e3, gas_temperature: 15, dust_temperature: 15 } } }`;
const dense = { ...defaultConditions(), density: 1e4, gas_temperature: 10, dust_temperature: 10 };

describe('a first stage', () => {
  it('a two-stage model equals the chained single-stage runs: the first run to its age, its final state starting the second', () => {
    const dir = scratch();
    const two = buildModelSetup(loadPipeline(pipelineFile(dir, 'two', firstStage(3e5))));
    const twoStage = runModel(modelInput(two, dense));

    // Chained by hand: stage one from the start composition to 3e5 yr at its own conditions ...
    const one = buildModelSetup(loadPipeline(pipelineFile(dir, 'one', START)));
    const stageOne = runModel({ ...modelInput(one, { ...defaultConditions(), ...FIRST }), timesYr: Float64Array.of(3e5) });
    expect(stageOne.status).toBe('ok');
    const state = stageOne.finalState!;
    // ... its final state (round-off negatives dropped) as the initial mapping of a single-stage pipeline.
    const mapping = Object.fromEntries(state.species.flatMap((s, i) => (state.values[i] > 0 ? [[s, state.values[i]]] : [])));
    const chainedSetup = buildModelSetup(loadPipeline(pipelineFile(dir, 'chained', JSON.stringify(mapping))));
    const chained = runModel(modelInput(chainedSetup, dense));

    expect(twoStage.status).toBe('ok');
    expect(twoStage.species).toEqual(chained.species);
    for (let i = 0; i < chained.abundances.length; i++) {
      const a = twoStage.abundances[i];
      const b = chained.abundances[i];
      expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-12 * Math.abs(b) + 1e-30);
    }
    // The first stage matters: from the start composition directly, CO(s) at the first output differs.
    const direct = runModel(modelInput(one, dense));
    const co = twoStage.species.indexOf('CO(s)');
    expect(Math.abs(Math.log10(twoStage.abundances[co] / direct.abundances[co]))).toBeGreaterThan(0.1);
  });

  it('is computed once per distinct first stage and kept under OUT/first-stage; the model hash covers its result', () => {
    const dir = scratch();
    const file = pipelineFile(dir, 'two', firstStage(3e5));
    const a = buildModelSetup(loadPipeline(file));
    expect(a.firstStage!.cached).toBe(false);
    const b = buildModelSetup(loadPipeline(file));
    expect(b.firstStage!.cached).toBe(true);
    expect(b.options.initial).toEqual(a.options.initial);
    expect(readdirSync(join(dir, 'out/first-stage'))).toHaveLength(1);
    const c = buildModelSetup(loadPipeline(pipelineFile(dir, 'two', firstStage(1e5))));
    expect(c.firstStage!.cached).toBe(false);
    expect(c.firstStage!.hash).not.toBe(a.firstStage!.hash);
    expect(c.options.initial).not.toEqual(a.options.initial);
    expect(existsSync(c.firstStage!.file)).toBe(true);
    expect(readdirSync(join(dir, 'out/first-stage'))).toHaveLength(2);
  });

  it('names a bad condition of the first stage with its field', () => {
    const dir = scratch();
    const file = pipelineFile(dir, 'bad', `{ first_stage: { from: ${START}, age_yr: 1.0e5, conditions: { densty: 1.0e3 } } }`);
    expect(() => buildModelSetup(loadPipeline(file))).toThrow(/unknown condition 'densty' of the first stage/);
  });
});
