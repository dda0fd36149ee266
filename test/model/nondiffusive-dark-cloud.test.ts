/**
 * The default network with ice photolysis and every non-diffusive mechanism on
 * (docs/ice-nondiffusive.md) at n_H = 2e4 cm^-3, 10 K, A_V = 10 from the
 * low-metal composition: it runs to 1e7 yr and keeps every element and the
 * charge (physics.md section 7: the rate equations conserve them exactly,
 * so only round-off may drift).
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import type { ModelResult } from '../../src/model/types.ts';

const NETWORK = join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml');

describe('default network with ice photolysis, three-body, Eley-Rideal and photodissociation-induced reactions', () => {
  let result: ModelResult;
  beforeAll(() => {
    const network = loadNetwork(NETWORK);
    result = runModel({
      network,
      conditions: { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 },
      grain: { ...DEFAULT_GRAIN_OPTIONS, threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true },
      initial: loadInitialComposition('low-metal', '.', network),
      timesYr: outputTimesYr(1e3, 1e7, 13),
      solver: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    });
  });

  it('runs to 1e7 yr', () => {
    expect(result.status).toBe('ok');
    expect(result.timesYr[result.timesYr.length - 1]).toBe(1e7);
  });
  it('conserves every element and the charge to 1e-12 relative at every output', () => {
    expect(result.conservation.maxRelativeDrift).toBeLessThan(1e-12);
    expect(Object.keys(result.conservation.perElement)).toEqual(expect.arrayContaining(['H', 'He', 'C', 'N', 'O', 'S']));
  });
  it('says which gas photoreactions have no ice counterpart', () => {
    expect(result.skippedNotes?.some((n) => n.startsWith('ice photolysis:') && n.includes('C -> C+ + e- (C+, e-)'))).toBe(true);
  });
});
