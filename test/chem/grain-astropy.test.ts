/**
 * Grain formulas against the same formulas evaluated with astropy's CODATA
 * constants (Debian python3-astropy, /usr/bin/python3): an independent check
 * of our constants and unit handling. Skipped with a notice where astropy is
 * missing, failed instead when HOARFROST_REQUIRE_ASTROPY=1 (CI).
 */
import { execFileSync } from 'node:child_process';
import { beforeAll, expect, it } from 'vitest';
import { thermalSpeed } from '../../src/chem/grain-accretion.ts';
import { vibrationFrequency } from '../../src/chem/grain-desorption.ts';
import { grainAbundance } from '../../src/chem/grain-properties.ts';
import { tunnellingProbability } from '../../src/chem/grain-surface.ts';
import { ASTROPY, describeWithReference, PYTHON } from '../support/references.ts';

const script = String.raw`
import json, math
from astropy import constants as c, units as u
kB = c.k_B.cgs.value; hbar = c.hbar.cgs.value; amu = c.u.cgs.value
v = math.sqrt(8 * kB * 10 / (math.pi * 28.010 * amu))
nu0 = math.sqrt(2 * 1.5e15 * kB * 450 / (math.pi**2 * 1.008 * amu))
a = (0.1 * u.um).to(u.cm).value
xgr = 0.01 * 1.4 * 1.008 * amu / (4/3 * math.pi * a**3 * 3.0)
b = (1 * u.AA).to(u.cm).value
tun = math.exp(-(2 * b / hbar) * math.sqrt(2 * 1.008 * amu * kB * 250))
print(json.dumps(dict(v=v, nu0=nu0, xgr=xgr, tun=tun)))
`;

describeWithReference(ASTROPY, 'grain formulas vs astropy constants', () => {
  let ref: Record<string, number> = {};
  beforeAll(() => {
    ref = JSON.parse(execFileSync(PYTHON, ['-c', script], { encoding: 'utf8' })) as Record<string, number>;
  });
  it('thermal speed of CO at 10 K', () => expect(thermalSpeed(10, 28.01) / ref.v).toBeCloseTo(1, 9));
  it('nu_0 of H with E_D = 450 K', () => expect(vibrationFrequency(1.5e15, 450, 1.008) / ref.nu0).toBeCloseTo(1, 9));
  it('grains per H nucleus for the default grain', () => expect(grainAbundance(1e-5, 3, 0.01) / ref.xgr).toBeCloseTo(1, 9));
  it('tunnelling probability of H through a 250 K, 1 angstrom barrier', () => expect(tunnellingProbability(250, 1.008) / ref.tun).toBeCloseTo(1, 8));
});
