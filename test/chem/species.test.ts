import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { iceName, isIceName, mantleName, parseSpecies, tryParseSpecies } from '../../src/chem/species.ts';

/**
 * Standard atomic weights, typed here independently of src/chem/elements.ts:
 * IUPAC CIAAW, "Standard atomic weights of the elements 2021", Pure Appl.
 * Chem. 94 (2022) 573, abridged (conventional) values.
 */
const IUPAC_2021: Record<string, number> = {
  H: 1.008,
  He: 4.0026,
  C: 12.011,
  N: 14.007,
  O: 15.999,
  Na: 22.99,
  Mg: 24.305,
  Si: 28.085,
  S: 32.06,
  Fe: 55.845,
};

/** Electron mass in u, CODATA 2018 recommended value. */
const ELECTRON_U = 5.48579909e-4;

/**
 * name, element counts, charge, phase. The expected mass is summed from the
 * IUPAC table above; a few molar masses are also the handbook values
 * (CRC Handbook of Chemistry and Physics: H2O 18.015, CO2 44.009, CH4 16.043,
 * NH3 17.031, CH3OH 32.042, C2H5OH 46.069 g/mol), checked separately below.
 */
const CASES: [string, Record<string, number>, number, 'gas' | 'ice' | 'mantle'][] = [
  ['H2', { H: 2 }, 0, 'gas'],
  ['He+', { He: 1 }, 1, 'gas'],
  ['H3+', { H: 3 }, 1, 'gas'],
  ['CO', { C: 1, O: 1 }, 0, 'gas'],
  ['HCO+', { H: 1, C: 1, O: 1 }, 1, 'gas'],
  ['N2H+', { N: 2, H: 1 }, 1, 'gas'],
  ['H2O', { H: 2, O: 1 }, 0, 'gas'],
  ['H3O+', { H: 3, O: 1 }, 1, 'gas'],
  ['CH3OH', { C: 1, H: 4, O: 1 }, 0, 'gas'],
  ['C2H5OH', { C: 2, H: 6, O: 1 }, 0, 'gas'],
  ['NH4+', { N: 1, H: 4 }, 1, 'gas'],
  ['HCS+', { H: 1, C: 1, S: 1 }, 1, 'gas'],
  ['SiOH+', { Si: 1, O: 1, H: 1 }, 1, 'gas'],
  ['Fe+', { Fe: 1 }, 1, 'gas'],
  ['Mg', { Mg: 1 }, 0, 'gas'],
  ['Na+', { Na: 1 }, 1, 'gas'],
  ['H2O(s)', { H: 2, O: 1 }, 0, 'ice'],
  ['CO2(s)', { C: 1, O: 2 }, 0, 'ice'],
  ['CH3OH(s)', { C: 1, H: 4, O: 1 }, 0, 'ice'],
  ['NH3(s)', { N: 1, H: 3 }, 0, 'ice'],
  ['H2S(s)', { H: 2, S: 1 }, 0, 'ice'],
  ['H2O(mantle)', { H: 2, O: 1 }, 0, 'mantle'],
  ['CH3OH(mantle)', { C: 1, H: 4, O: 1 }, 0, 'mantle'],
  ['OCS', { O: 1, C: 1, S: 1 }, 0, 'gas'],
  ['S--', { S: 1 }, -2, 'gas'],
];

function iupacMass(elements: Record<string, number>, charge: number): number {
  let m = 0;
  for (const [el, n] of Object.entries(elements)) m += IUPAC_2021[el] * n;
  return m - charge * ELECTRON_U;
}

describe('parseSpecies against IUPAC 2021 standard atomic weights', () => {
  it.each(CASES)('%s', (name, elements, charge, phase) => {
    const s = parseSpecies(name);
    expect(s.elements).toEqual(elements);
    expect(s.charge).toBe(charge);
    expect(s.phase).toBe(phase);
    expect(s.isElectron).toBe(false);
    // Abridged weights carry 4-5 significant figures: agree to 1e-3 u.
    expect(s.mass).toBeCloseTo(iupacMass(elements, charge), 3);
  });

  it('molar masses agree with the handbook values (CRC Handbook, from IUPAC weights)', () => {
    const handbook: [string, number][] = [
      ['H2O', 18.015],
      ['CO2', 44.009],
      ['CH4', 16.043],
      ['NH3', 17.031],
      ['CH3OH', 32.042],
      ['C2H5OH', 46.069],
    ];
    for (const [name, molar] of handbook) expect(Math.abs(parseSpecies(name).mass - molar)).toBeLessThan(1.5e-3);
  });

  it('an ion is lighter than its neutral by the electron mass (CODATA 2018)', () => {
    expect(parseSpecies('CO').mass - parseSpecies('CO+').mass).toBeCloseTo(ELECTRON_U, 9);
    expect(parseSpecies('S--').mass - parseSpecies('S').mass).toBeCloseTo(2 * ELECTRON_U, 9);
  });

  it('the electron', () => {
    const e = parseSpecies('e-');
    expect(e.isElectron).toBe(true);
    expect(e.charge).toBe(-1);
    expect(e.elements).toEqual({});
    expect(e.mass).toBeCloseTo(ELECTRON_U, 12);
  });

  it('ice names keep the gas name and the IUPAC state symbol (s)', () => {
    const s = parseSpecies('CO(s)');
    expect(s.gasName).toBe('CO');
    expect(s.name).toBe('CO(s)');
    expect(iceName('H2O')).toBe('H2O(s)');
    expect(isIceName('H2O(s)')).toBe(true);
    expect(isIceName('H2O')).toBe(false);
  });

  it('mantle names keep the gas name and our state suffix (mantle) (docs/ice-mantle.md)', () => {
    const s = parseSpecies('c-C3H2(mantle)');
    expect(s.gasName).toBe('c-C3H2');
    expect(s.phase).toBe('mantle');
    expect(mantleName('H2O')).toBe('H2O(mantle)');
    expect(isIceName('H2O(mantle)')).toBe(false);
  });

  it('isomer prefixes do not change the formula', () => {
    expect(parseSpecies('c-C3H2').elements).toEqual({ C: 3, H: 2 });
    expect(parseSpecies('l-C3H').elements).toEqual({ C: 3, H: 1 });
  });
});

describe('malformed species names are rejected with a reason', () => {
  const bad: [string, RegExp][] = [
    ['', /empty/],
    ['H2 O', /white space/],
    ['Xy', /unknown element 'Xy'/],
    ['h2o', /unexpected character 'h'/],
    ['H02', /starts with 0/],
    ['CO+-', /mixed charge signs/],
    ['HCO+(s)', /ions are not kept in the ice/],
    ['e-(s)', /electrons have no ice form/],
    ['HCO+(mantle)', /ions are not kept in the mantle/],
    ['e-(mantle)', /electrons have no mantle form/],
    ['H2O(Mantle)', /unexpected character '\('/],
    ['+', /no elements/],
    ['H2O(S)', /unexpected character '\('/],
  ];
  it.each(bad)('%j', (name, why) => {
    expect(() => parseSpecies(name)).toThrow(UserError);
    expect(() => parseSpecies(name)).toThrow(why);
    const r = tryParseSpecies(name);
    expect(typeof r).toBe('string');
    expect(r as string).toContain('is not a species name');
  });
});
