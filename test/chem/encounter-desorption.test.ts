/**
 * Encounter desorption of H2 (Hincelin et al. 2015, A&A 574, A24), which the
 * three-phase ice brings with it (docs/ice-mantle.md): an H2(s) that hops onto
 * a site already holding H2 is bound by about 23 K only and desorbs with
 * probability P = k_evap / (k_evap + k_hop) on that H2 substrate.
 *
 * The defect it fixes: with the mantle on, the default network buried H2(s)
 * in the mantle until the H2 ice was 1.7 times (n_H = 2e4) and 3 times
 * (n_H = 1e5) the water ice, though an H2 molecule on ice at 10 K leaves the
 * surface within months while a monolayer takes thousands of years to bury it.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../../src/config/conditions.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';
import { vibrationFrequency } from '../../src/chem/grain-desorption.ts';
import { deriveReactions } from '../../src/chem/derive.ts';
import { H2_ON_H2_BINDING_ENERGY } from '../../src/chem/encounter-desorption.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { makeNetwork } from '../model/fixtures.ts';
import { DEFAULT_NETWORK, evaluateIceTargets } from '../../scripts/ice-targets.ts';

const MANTLE: GrainOptions = { ...DEFAULT_GRAIN_OPTIONS, mantle: true };
// H2 binding energy on water ice, 430 K: physics.md section 4 (memory).
const net = makeNetwork(
  [
    { reactants: ['H2'], products: ['H2(s)'], law: 'accretion' },
    { reactants: ['H2(s)'], products: ['H2'], law: 'thermal-desorption' },
  ],
  { H2: { bindingEnergy: 430 } },
);

describe('H2 encounter desorption (Hincelin et al. 2015)', () => {
  it('is derived with the mantle on, and only then', () => {
    expect(deriveReactions(net, DEFAULT_GRAIN_OPTIONS).reactions).toHaveLength(0);
    const [r, ...rest] = deriveReactions(net, MANTLE).reactions;
    expect(rest).toHaveLength(0);
    expect(r.law).toBe('encounter-desorption');
    expect(r.reactants).toEqual(['H2(s)', 'H2(s)']);
    expect([...r.products].sort()).toEqual(['H2', 'H2(s)']);
  });

  it('has the rate coefficient P k_hop / (N_sites n_gr) with P from the 23 K binding of H2 on H2 (Hincelin et al. 2015; analytic)', () => {
    const c = { ...defaultConditions(), dust_temperature: 10, gas_temperature: 10, density: 1e4 };
    const set = computeRates(net, c, MANTLE);
    const rate = set.rates.find((x) => x.reaction.law === 'encounter-desorption');
    expect(rate?.form).toBe('mass-action');
    const g = grainProperties(c);
    // H2 mass 2.016 u; nu_0 from the binding on water (HHL92 eq. 3); hop over chi E_D.
    const nu = vibrationFrequency(c.site_density, 430, 2.016);
    const hopOnWater = nu * Math.exp((-c.diffusion_ratio * 430) / 10);
    const evapOnH2 = Math.exp(-H2_ON_H2_BINDING_ENERGY / 10);
    const hopOnH2 = Math.exp((-c.diffusion_ratio * H2_ON_H2_BINDING_ENERGY) / 10);
    const p = evapOnH2 / (evapOnH2 + hopOnH2);
    // At 10 K with chi = 0.5: P = e^-2.3 / (e^-2.3 + e^-1.15) = 0.240.
    expect(p).toBeCloseTo(0.24, 2);
    expect(rate!.k / ((p * hopOnWater) / g.sitesPerGrain / (g.abundance * c.density))).toBeCloseTo(1, 12);
  });

  it('keeps H2 out of the mantle: H2 ice stays below 1 % of the water ice at 10 K, n_H = 1e5 (it was 3 times the water ice without it)', () => {
    const [r] = evaluateIceTargets(loadNetwork(DEFAULT_NETWORK), { densities: [1e5], grain: MANTLE, perDecade: 1 });
    expect(r.status, r.failure).toBe('ok');
    r.ice.H2.forEach((x, k) => {
      if (r.ice.H2O[k] < 3.6e-6) return;
      expect(x / r.ice.H2O[k], `${r.rows[k].timeYr} yr`).toBeLessThan(0.01);
    });
  });
});
