/**
 * The band-strength table (config/band-strengths.yaml): the bands surveys of
 * background stars measure are there, each band's name agrees with its
 * wavelength, every value names the laboratory paper it is recalled from
 * and is flagged memory, and a species' default band stays its stretch.
 */
import { describe, expect, it } from 'vitest';
import { loadBandTable } from '../../src/obs/bands.ts';

const table = loadBandTable();

describe('band-strength table', () => {
  it.each([
    ['CO2(s)', 'CO2-15.2um', 15.2],
    ['H2O(s)', 'H2O-6.0um', 6.0],
    ['CH3OH(s)', 'CH3OH-9.7um', 9.7],
  ])('has the %s band %s at %s um', (species, name, wavelength) => {
    const band = table.find(species, name);
    expect(band, `${name} missing`).toBeDefined();
    expect(band?.wavelengthUm).toBe(wavelength);
    // Band strengths of ice modes lie between 1e-19 and 1e-15 cm per molecule (common practice).
    expect(band?.strengthCm).toBeGreaterThan(1e-19);
    expect(band?.strengthCm).toBeLessThan(1e-15);
  });

  it('names every band after its species and wavelength', () => {
    for (const b of table.bands) {
      const m = /^(.+)-([0-9.]+)um$/.exec(b.name);
      expect(m, b.name).not.toBeNull();
      expect(`${m?.[1]}(s)`).toBe(b.species);
      expect(Number(m?.[2])).toBe(b.wavelengthUm);
    }
  });

  it('flags every value as memory and names its laboratory source with a year', () => {
    for (const b of table.bands) {
      expect(b.origin, b.name).toMatch(/^memory: /);
      expect(b.origin, b.name).toMatch(/et al\. (19|20)\d\d|& \w+ (19|20)\d\d/);
    }
  });

  it('keeps the stretching mode as each species default', () => {
    expect(table.find('H2O(s)')?.name).toBe('H2O-3.0um');
    expect(table.find('CO2(s)')?.name).toBe('CO2-4.27um');
    expect(table.find('CH3OH(s)')?.name).toBe('CH3OH-3.53um');
  });
});
