/**
 * The --emit-system contract (issue 4): integrating the emitted terms with the
 * project's integrator, through a right-hand side written here from the JSON
 * alone, reproduces the model run with --mass-action-only.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { compile, type EmittedSystem } from '../../src/chem/system.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { initialState, loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import { integrate } from '../../src/solve/index.ts';
import { problemFromJson } from './fixtures.ts';

describe('emitted system round trip', () => {
  const network = loadNetwork(join(import.meta.dirname, 'data', 'mini-network.yaml'));
  const conditions = defaultConditions();
  const initial = loadInitialComposition({ H2: 0.5, He: 0.09, 'C+': 7.3e-5, O: 1.76e-4 }, '.', network);
  const timesYr = outputTimesYr(1e2, 1e7, 11);
  const solver = { rtol: 1e-8, atol: 1e-25, maxSteps: 50000 };
  const input = { network, conditions, grain: DEFAULT_GRAIN_OPTIONS, initial, timesYr, solver, massActionOnly: true };

  it('reproduces the mass-action-only model from the JSON terms', () => {
    const system = compile(network, conditions, DEFAULT_GRAIN_OPTIONS, { massActionOnly: true });
    const json = JSON.parse(JSON.stringify(system.emitSystem(initialState(input), timesYr.map((t) => t * YEAR_SECONDS)))) as EmittedSystem;
    expect(json.omitted).toHaveLength(2);
    expect(json.omitted.join(' ')).toMatch(/photodesorption/);
    const model = runModel(input);
    expect(model.status).toBe('ok');
    const out = integrate(problemFromJson(json), Float64Array.from(json.y0), Float64Array.from(json.times_s), { rtol: solver.rtol, atol: solver.atol, maxSteps: solver.maxSteps });
    expect(out.status).toBe('ok');
    const n = json.species.length;
    let worst = 0;
    out.y.forEach((y, k) => {
      for (let i = 0; i < n; i++) {
        const a = model.abundances[k * n + i];
        if (Math.max(a, y[i]) > 1e-15) worst = Math.max(worst, Math.abs(y[i] - a) / Math.max(a, y[i]));
      }
    });
    expect(worst).toBeLessThan(1e-4);
  });

  it('differs from the full model, which photodesorbs, only where photodesorption matters', () => {
    const full = runModel({ ...input, massActionOnly: false });
    const only = runModel(input);
    const iCO = network.speciesIndex.get('CO')!;
    const n = network.species.length;
    const last = timesYr.length - 1;
    // At A_V = 10 the cosmic-ray induced UV still photodesorbs: gas CO is higher with it.
    expect(full.abundances[last * n + iCO]).toBeGreaterThan(only.abundances[last * n + iCO]);
  });
});
