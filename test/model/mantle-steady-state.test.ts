/**
 * The default network with every recommended ice switch on (three-phase ice,
 * three-body, Eley-Rideal, photodissociation-induced reactions and ice
 * photolysis: docs/ice-mantle.md, docs/ice-nondiffusive.md), 10 K from the
 * low-metal start, rtol 1e-6, atol 1e-25, 41 output times over 1e3-1e7 yr,
 * through the end of ice growth. Each case stopped before its fix.
 *
 * Once the ice stops growing, the net surface growth F of the surface-mantle
 * transfer (src/chem/mantle.ts) sits at round-off around 0 (about 1e-28 per H
 * per s against a gross surface flux of about 1e-12), and the transfer's
 * growth and erosion forms of Garrod & Pauly (2011) have slopes in F that
 * differ by up to 1e15 for trace species (O3(s): 2.8e-18 on its 9.9e-24
 * surface, 5.0e-3 from its 9.3e-7 mantle), so Newton iterates that straddle
 * the switch stop contracting.
 * - n_H 32300, A_V 9.15 stopped at 9.58e6 yr ("repeated Newton failure at
 *   t = 3.02330e+14") until a non-contracting iteration whose increment is
 *   already below the Newton tolerance counted as converged (src/solve/bdf.ts,
 *   as CVODE's test does).
 * - n_H 1000, A_V 1.5 (one of the 7 of 42 models of the scan in
 *   docs/ice-mantle.md) stopped at 9.665e6 yr until the transfer held the
 *   branch chosen at each step's prediction through that step's iteration
 *   (OdeProblem.beginStep).
 * - n_H 31600, A_V 2.5 (the cheapest of the 3 of 42 scan models that still
 *   stopped with the branch held) stopped at 6.904e6 yr ("repeated error
 *   test failure at t = 2.17884e+14", 1,445 steps, 94 failed) while the sign
 *   of F below its own round-off still chose the transfer's form at every step.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { modelNetwork } from '../../src/chem/mantle.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import { RECOMMENDED_GRAIN } from '../../scripts/ice-targets.ts';

const NETWORK = join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml');

describe('default network with every recommended ice switch on, through the end of ice growth', () => {
  const network = loadNetwork(NETWORK);
  const initial = loadInitialComposition('low-metal', '.', modelNetwork(network, RECOMMENDED_GRAIN));
  for (const [density, av] of [
    [32300, 9.15],
    [1000, 1.5],
    [31600, 2.5],
  ]) {
    it(`runs to 1e7 yr at n_H = ${density}, A_V = ${av} and conserves every element and the charge`, () => {
      const result = runModel({
        network,
        conditions: { ...defaultConditions(), density, gas_temperature: 10, dust_temperature: 10, visual_extinction: av },
        grain: RECOMMENDED_GRAIN,
        initial,
        timesYr: outputTimesYr(1e3, 1e7, 41),
        solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
      });
      expect(result.failure).toBeUndefined();
      expect(result.status).toBe('ok');
      // docs/physics.md section 7: the rate equations conserve elements and charge exactly, so only round-off may drift.
      expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-12);
    });
  }

  // Known defect, open (docs/ice-mantle.md, "The band"): at 12 K dust (gas 10 K), n_H 31622.78, A_V 2
  // (a model of the invented Frostmere survey grid, pipelines/examples/frostmere-survey.yaml; 2 of its 216
  // models stop, the other at 14 K dust) the run stops at 3.987e6 yr, "repeated error test failure at
  // t = 1.25826e+14", 1,286 steps. F leaves the band (-5.7e-26 against 1.27e-26) and the form turns from
  // growth to erosion; the erosion form then feeds a trace surface species (4.2e-21 on the surface) from
  // its mantle, its quasi-steady abundance jumps by about 60 times its error weight, and the order-1
  // error estimate stays at 1.3 as the step falls from 5.9e12 s to 4.2e9 s. Clamping each held form to
  // 0 on the wrong side of F (erosion at F + band) let this model and its 14 K twin through but stopped
  // n_H 1e5 and 3.16e5 at A_V 2.5, 10 K with repeated Newton failure: not taken. Restarting the solver
  // at order 1 from a fresh f(t_n, y_n) after 3 error-test failures (CVODE's MXNEF1 rule) let this
  // model, its 14 K twin and the A_V 2.5 cases through, but 2 of the 42 models of the 10 K scan with
  // tunnelling then stopped (n_H 1e3 and 1e5, A_V 1.5, repeated Newton failure): not taken either.
  // Restarting the BDF history at order 1 at each change of form (keeping the step) stopped this model
  // earlier (repeated Newton failure at 2.92e6 yr) and 7 of the 42 scan models (19 of 42 with
  // tunnelling); with the first-step estimate instead it let this model through but stopped scan models
  // with step-size underflow (docs/ice-mantle.md, "Still open"): not taken.
  it.skip('runs to 1e7 yr at n_H = 31622.78, A_V = 2, 12 K dust', () => {
    const result = runModel({
      network,
      conditions: { ...defaultConditions(), density: 31622.7766017, gas_temperature: 10, dust_temperature: 12, visual_extinction: 2 },
      grain: RECOMMENDED_GRAIN,
      initial,
      timesYr: outputTimesYr(1e3, 1e7, 41),
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
    expect(result.failure).toBeUndefined();
    expect(result.status).toBe('ok');
  });
});
