/**
 * Cells and units as observers write them. Unit spellings: IVOA VOUnits 1.0
 * (`cm-2`, `cm**-2`, `10+17cm-2` from the CDS standard it builds on) and
 * everyday tables (`cm^-2`, `/cm2`, `1e17 cm-2`); 1 m^-2 = 1e-4 cm^-2.
 */
import { describe, expect, it } from 'vitest';
import { parseAngle, parseCell, parseFlag } from '../../src/obs/cells.ts';
import { parseUnit } from '../../src/obs/units.ts';

describe('cells', () => {
  it.each([
    ['1.2e17', { kind: 'detection', value: 1.2e17 }],
    ['1.2E+17', { kind: 'detection', value: 1.2e17 }],
    [' 1.2e17 ', { kind: 'detection', value: 1.2e17 }],
    ['<1.2e17', { kind: 'upper', value: 1.2e17 }],
    ['< 1.2e17', { kind: 'upper', value: 1.2e17 }],
    ['<=1.2e17', { kind: 'upper', value: 1.2e17 }],
    ['>3e16', { kind: 'lower', value: 3e16 }],
    ['1.25D+02', { kind: 'detection', value: 125 }],
    ['', { kind: 'blank' }],
    ['nan', { kind: 'blank' }],
    ['NaN', { kind: 'blank' }],
    ['--', { kind: 'blank' }],
    ['...', { kind: 'blank' }],
    [null, { kind: 'blank' }],
    [NaN, { kind: 'blank' }],
    [2.5, { kind: 'detection', value: 2.5 }],
    // An infinite number from a binary format (FITS, or YAML's .inf) is refused as the text '1e400' is.
    [Infinity, { kind: 'bad', text: 'Infinity' }],
    [-Infinity, { kind: 'bad', text: '-Infinity' }],
    ['1e400', { kind: 'bad', text: '1e400' }],
    ['1e17 cm-2', { kind: 'bad', text: '1e17 cm-2' }],
    ['0x10', { kind: 'bad', text: '0x10' }],
    ['<', { kind: 'bad', text: '<' }],
  ])('%j', (cell, expected) => {
    expect(parseCell(cell)).toEqual(expected);
  });

  it('limit flags', () => {
    expect(['<', 'U', 'upper', 'ul', 1].map(parseFlag)).toEqual(['upper', 'upper', 'upper', 'upper', 'upper']);
    expect(['>', 'L', 'lower', 2].map(parseFlag)).toEqual(['lower', 'lower', 'lower', 'lower']);
    expect(['', ' ', '=', 0, null, NaN].map(parseFlag)).toEqual(Array(6).fill('detection'));
    expect(parseFlag('maybe')).toBe('bad');
  });
});

describe('units', () => {
  it.each([
    ['cm-2', 'column', 1],
    ['cm^-2', 'column', 1],
    ['cm**-2', 'column', 1],
    ['cm^(-2)', 'column', 1],
    ['/cm2', 'column', 1],
    ['1/cm2', 'column', 1],
    ['molecules cm-2', 'column', 1],
    ['m-2', 'column', 1e-4],
    ['1e17 cm-2', 'column', 1e17],
    ['10+17cm-2', 'column', 1e17],
    ['10^17 cm^-2', 'column', 1e17],
    ['mag', 'extinction', 1],
    ['cm-1', 'tau', 1],
    ['m-1', 'tau', 1e-2],
  ])('%s', (unit, dim, factor) => {
    const u = parseUnit(unit);
    expect(u?.dim).toBe(dim);
    expect(u?.factor).toBeCloseTo(factor, 30);
  });
  it('refuses what is none of ours', () => {
    expect(parseUnit('Jy')).toBeUndefined();
    expect(parseUnit('km/s')).toBeUndefined();
    expect(parseUnit('g cm-2')).toBeUndefined();
  });
});

describe('angles', () => {
  it('degrees or sexagesimal (RA in hours: 1 h = 15 deg; Dec in degrees)', () => {
    // 04:40:24.0 = 4 + 40/60 + 24/3600 h = 4.673333 h = 70.1 deg
    expect(parseAngle('04:40:24.0', 'ra')).toBeCloseTo(70.1, 10);
    expect(parseAngle('04h40m24s', 'ra')).toBeCloseTo(70.1, 10);
    expect(parseAngle('04 40 24', 'ra')).toBeCloseTo(70.1, 10);
    // -25:48:54 = -(25 + 48/60 + 54/3600) = -25.815 deg
    expect(parseAngle('-25:48:54', 'dec')).toBeCloseTo(-25.815, 10);
    expect(parseAngle('+25d48m54s', 'dec')).toBeCloseTo(25.815, 10);
    expect(parseAngle('70.1021', 'ra')).toBe(70.1021);
    expect(parseAngle(12.5, 'dec')).toBe(12.5);
    expect(parseAngle('04:75:00', 'ra')).toBeUndefined();
    expect(parseAngle('north', 'dec')).toBeUndefined();
  });
});
