/**
 * The default network with every recommended ice switch on (three-phase ice,
 * three-body, Eley-Rideal, photodissociation-induced reactions and ice
 * photolysis: docs/ice-mantle.md, docs/ice-nondiffusive.md) at n_H = 32300
 * cm^-3, 10 K, A_V = 9.15 from the low-metal start, rtol 1e-6 and atol 1e-25.
 *
 * Near 9.6e6 yr the ice stops growing: the net surface growth F of the
 * surface-mantle transfer (src/chem/mantle.ts) falls to about 1e-28 per H per
 * s against a gross surface flux of about 1e-12, and every Newton correction
 * flips its sign. The transfer then switches between its growth and erosion
 * forms of Garrod & Pauly (2011), whose slopes in F differ by a factor of 1e15
 * for O3(s) (2.8e-18 on its 9.9e-24 surface, 5.0e-3 from its 9.3e-7 mantle),
 * so the Newton iterates straddle the switch without contracting. The solver
 * stopped there ("repeated Newton failure at t = 3.02330e+14") until a
 * non-contracting iteration whose increment is already below the Newton
 * tolerance counted as converged (src/solve/bdf.ts, as CVODE's test does).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { modelNetwork } from '../../src/chem/mantle.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';

const NETWORK = join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml');

describe('default network with every recommended ice switch on, through the end of ice growth', () => {
  it('runs to 1e7 yr at rtol 1e-6 and conserves every element and the charge', () => {
    const network = loadNetwork(NETWORK);
    const grain = { ...DEFAULT_GRAIN_OPTIONS, mantle: true, threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true };
    const result = runModel({
      network,
      conditions: { ...defaultConditions(), density: 32300, gas_temperature: 10, dust_temperature: 10, visual_extinction: 9.15 },
      grain,
      initial: loadInitialComposition('low-metal', '.', modelNetwork(network, grain)),
      timesYr: outputTimesYr(1e3, 1e7, 41),
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
    expect(result.failure).toBeUndefined();
    expect(result.status).toBe('ok');
    // physics.md section 7: the rate equations conserve elements and charge exactly, so only round-off may drift.
    expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-12);
  });
});
