/**
 * H2 formation at a rate per H atom striking a grain (Hollenbach & McKee
 * 1979, formulas recalled: memory), checked against Jura's (1975) observed
 * rate coefficient and the grain collision rate of physics.md section 3.
 */
import { describe, expect, it } from 'vitest';
import { defaultConditions } from '../../src/config/conditions.ts';
import { ATOMIC_WEIGHTS } from '../../src/chem/elements.ts';
import { thermalSpeed } from '../../src/chem/grain-accretion.ts';
import {
  h2FormationCoefficientHM79,
  HM79_HALF_EFFICIENCY_DUST_TEMPERATURE,
  hydrogenStickingHM79,
  recombinationFractionHM79,
} from '../../src/chem/grain-h2.ts';
import { grainProperties } from '../../src/chem/grain-properties.ts';

const grain = grainProperties(defaultConditions());
const crossSectionPerH = grain.crossSection * grain.abundance;
const H = ATOMIC_WEIGHTS.H;

describe('H sticking law of Hollenbach & McKee 1979 (memory: their eq. 3.8)', () => {
  it('sticks every atom in the limit of cold gas and dust (the law at T = T_d = 0)', () => {
    expect(hydrogenStickingHM79(0, 0)).toBe(1);
  });
  it('gives S = 1 / (1 + 0.4 sqrt(1.15) + 0.2 + 0.08) = 0.585154 at T = 100 K, T_d = 15 K (the formula evaluated by hand)', () => {
    expect(hydrogenStickingHM79(100, 15)).toBeCloseTo(0.585154, 6);
  });
  it('falls as the gas warms (HM79: fast atoms bounce off)', () => {
    expect(hydrogenStickingHM79(1000, 15)).toBeLessThan(hydrogenStickingHM79(100, 15));
  });
});

describe('recombination fraction f_a of Hollenbach & McKee 1979 (memory)', () => {
  it('is 1/2 at T_d = 600 K / ln(1e4), about 65 K (the formula solved for f_a = 1/2)', () => {
    expect(HM79_HALF_EFFICIENCY_DUST_TEMPERATURE).toBeCloseTo(65.14, 2);
    expect(recombinationFractionHM79(HM79_HALF_EFFICIENCY_DUST_TEMPERATURE)).toBeCloseTo(0.5, 12);
  });
  it('stays above 0.999999 at 20 K dust, where the physisorbed route has collapsed (1e4 exp(-30) = 9.4e-10)', () => {
    expect(1 - recombinationFractionHM79(20)).toBeCloseTo(1e4 * Math.exp(-30), 15);
  });
});

describe('R_f of Hollenbach & McKee 1979 for the model grain', () => {
  it('is (1/2) x grain collision rate per H nucleus x S x f_a; the collision rate is 8.5e-17 cm^3 s^-1 at 100 K (physics.md section 3, derived)', () => {
    const collision = thermalSpeed(100, H) * crossSectionPerH;
    expect(collision / 8.5e-17).toBeGreaterThan(0.97);
    expect(collision / 8.5e-17).toBeLessThan(1.03);
    const rf = h2FormationCoefficientHM79(100, 15, crossSectionPerH, H);
    expect(rf / (0.5 * collision * hydrogenStickingHM79(100, 15) * recombinationFractionHM79(15))).toBeCloseTo(1, 12);
  });
  it("reproduces Jura's (1975) observed R_f = 3e-17 cm^3 s^-1 within a factor of 3 for diffuse-cloud gas at 100 K and dust at 15 K (physics.md section 3)", () => {
    const rf = h2FormationCoefficientHM79(100, 15, crossSectionPerH, H);
    expect(rf).toBeGreaterThan(3e-17 / 3);
    expect(rf).toBeLessThan(3e-17 * 3);
  });
});
