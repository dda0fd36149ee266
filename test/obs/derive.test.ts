/**
 * Abundances, ratios and their errors against examples worked by hand (the
 * arithmetic is written out beside each check). Formulas: physics.md
 * section 5; first-order error propagation of relative errors (Bevington &
 * Robinson, Data Reduction and Error Analysis for the Physical Sciences,
 * ch. 3), turned into dex exactly and asymmetrically (physics.md section 12):
 * sigma_hi = log10(1 + s), sigma_lo = -log10(1 - s).
 */
import { describe, expect, it } from 'vitest';
import { deriveQuantities, modelAv, ratioKind, hydrogenColumn } from '../../src/obs/derive.ts';
import type { Measurement, ObservationSet, Sightline } from '../../src/obs/types.ts';
import { section } from './helpers.ts';


function sightline(id: string, av: number | undefined, avErr: number | undefined, columns: Record<string, Measurement>): Sightline {
  const s: Sightline = { id, columns, source: { file: 'hand.csv', line: 2 } };
  if (av !== undefined) s.av = av;
  if (avErr !== undefined) s.avErr = avErr;
  return s;
}
function set(...sightlines: Sightline[]): ObservationSet {
  return { file: 'hand.csv', kind: 'table', sightlines, warnings: [] };
}
const det = (value: number, errLo: number, errHi = errLo): Measurement => ({ kind: 'detection', value, errLo, errHi });

describe('abundances X = N / N_H', () => {
  it('N_H/A_V = 1.87e21 (Bohlin, Savage & Drake 1978): A_V = 10 +- 1, N = 1.87e18 +- 10 % gives X = 1e-4', () => {
    // N_H = 1.87e21 * 10 = 1.87e22; X = 1.87e18 / 1.87e22 = 1e-4, log10 X = -4.
    // sigma_X / X = s = sqrt(0.1^2 + 0.1^2) = 0.141421356; in dex (physics.md section 12, exact, asymmetric):
    // lower -log10(1 - s) = 0.0662199183, upper log10(1 + s) = 0.0574459940 (first order, s / ln 10, would give 0.0614185146 for both).
    const s = section({ file: 'x.csv' });
    expect(hydrogenColumn(10, s)).toBe(1.87e22);
    const { quantities, warnings } = deriveQuantities(set(sightline('a', 10, 1, { 'H2O(s)': det(1.87e18, 1.87e17) })), s, [{ species: 'H2O(s)', as: 'abundance' }]);
    expect(warnings).toEqual([]);
    expect(quantities).toHaveLength(1);
    const q = quantities[0];
    expect(q.label).toBe('X(H2O(s))');
    expect(q.denominator).toBeUndefined();
    expect(q.log10).toBeCloseTo(-4, 12);
    expect(q.sigmaLoDex).toBeCloseTo(0.0662199183, 9);
    expect(q.sigmaHiDex).toBeCloseTo(0.0574459940, 9);
  });

  it('N_H/A_V = 2.21e21 (Guver & Ozel 2009) lowers X by log10(2.21/1.87) = 0.0725 dex', () => {
    const one = set(sightline('a', 10, 1, { CO: det(1.87e18, 1.87e17) }));
    const a = deriveQuantities(one, section({ file: 'x.csv' }), [{ species: 'CO', as: 'abundance' }]).quantities[0];
    const b = deriveQuantities(one, section({ file: 'x.csv', nh_per_av: 2.21e21 }), [{ species: 'CO', as: 'abundance' }]).quantities[0];
    // log10(2.21 / 1.87) = log10(1.181818...) = 0.072550667
    expect(a.log10 - b.log10).toBeCloseTo(0.072550667, 8);
  });

  it('an ice threshold of 3 mag is taken off A_V for ice species only', () => {
    // A_V - 3 = 7 mag: N_H = 1.309e22, X = 1.87e18 / 1.309e22 = 1.4285714e-4, log10 = -3.845098040.
    // s = sqrt(0.1^2 + (1/7)^2) = 0.174379; lower error -log10(1 - s) = 0.0832194616.
    const s = section({ file: 'x.csv', ice_threshold_av: 3 });
    const obs = set(sightline('a', 10, 1, { 'H2O(s)': det(1.87e18, 1.87e17), CO: det(1.87e18, 1.87e17) }));
    const { quantities } = deriveQuantities(obs, s, [{ species: 'H2O(s)', as: 'abundance' }, { species: 'CO', as: 'abundance' }]);
    expect(quantities[0].log10).toBeCloseTo(-3.845098040, 9);
    expect(quantities[0].sigmaLoDex).toBeCloseTo(0.0832194616, 9);
    expect(quantities[1].log10).toBeCloseTo(-4, 12); // gas CO: the whole A_V
  });

  it('below the ice threshold no ice abundance is derived, with a warning naming the sightline', () => {
    const s = section({ file: 'x.csv', ice_threshold_av: 3 });
    const { quantities, warnings } = deriveQuantities(set(sightline('thin', 2.5, 0.2, { 'H2O(s)': det(1e17, 1e16) })), s, [{ species: 'H2O(s)', as: 'abundance' }]);
    expect(quantities).toEqual([]);
    expect(warnings.join('\n')).toMatch(/thin.*H2O\(s\)|H2O\(s\).*thin/);
  });

  it('asymmetric errors stay asymmetric: -10 % / +20 % with A_V exact', () => {
    // lo: -log10(1 - 0.1) = 0.0457574906; hi: log10(1 + 0.2) = 0.0791812460 (physics.md section 12)
    const { quantities } = deriveQuantities(set(sightline('a', 10, undefined, { CO: det(1.87e18, 1.87e17, 3.74e17) })), section({ file: 'x.csv' }), [{ species: 'CO', as: 'abundance' }]);
    expect(quantities[0].sigmaLoDex).toBeCloseTo(0.0457574906, 9);
    expect(quantities[0].sigmaHiDex).toBeCloseTo(0.0791812460, 9);
  });

  it('an upper limit on N is an upper limit on X, with no error and its confidence kept', () => {
    const { quantities } = deriveQuantities(set(sightline('a', 10, 1, { NH3: { kind: 'upper', value: 1.87e16, confidence: 0.997 } })), section({ file: 'x.csv' }), [{ species: 'NH3', as: 'abundance' }]);
    expect(quantities[0]).toMatchObject({ kind: 'upper', sigmaLoDex: 0, sigmaHiDex: 0, confidence: 0.997 });
    expect(quantities[0].log10).toBeCloseTo(-6, 12); // 1.87e16 / 1.87e22
  });
});

describe('ratios to the reference species', () => {
  it('CO(s)/H2O(s) = 0.3 with errors combined side by side', () => {
    // R = 3e17 / 1e18 = 0.3, log10 = -0.522878745.
    // lower side: N1 low (0.3e17 / 3e17 = 0.1) with N2 high (1e17 / 1e18 = 0.1): s = sqrt(0.02), -log10(1 - s) = 0.0662199183
    // upper side: N1 high (0.6e17 / 3e17 = 0.2) with N2 low (0.1): s = sqrt(0.05), log10(1 + s) = 0.0876418810
    const obs = set(sightline('a', undefined, undefined, { 'CO(s)': det(3e17, 0.3e17, 0.6e17), 'H2O(s)': det(1e18, 1e17) }));
    const { quantities } = deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'CO(s)', as: 'ratio' }]);
    expect(quantities[0]).toMatchObject({ label: 'CO(s)/H2O(s)', numerator: 'CO(s)', denominator: 'H2O(s)', kind: 'detection' });
    expect(quantities[0].log10).toBeCloseTo(-0.522878745, 9);
    expect(quantities[0].sigmaLoDex).toBeCloseTo(0.0662199183, 9);
    expect(quantities[0].sigmaHiDex).toBeCloseTo(0.0876418810, 9);
  });

  it('ratios need no A_V; the reference can be changed', () => {
    const obs = set(sightline('a', undefined, undefined, { 'CO(s)': det(3e17, 3e16), 'CO2(s)': det(6e17, 6e16) }));
    const { quantities } = deriveQuantities(obs, section({ file: 'x.csv', reference: 'CO2(s)' }), [{ species: 'CO(s)', as: 'ratio' }]);
    expect(quantities[0].label).toBe('CO(s)/CO2(s)');
    expect(quantities[0].log10).toBeCloseTo(Math.log10(0.5), 12);
  });

  it('limits carry through by kind', () => {
    expect(ratioKind('upper', 'detection')).toBe('upper');
    expect(ratioKind('lower', 'detection')).toBe('lower');
    expect(ratioKind('detection', 'upper')).toBe('lower');
    expect(ratioKind('detection', 'lower')).toBe('upper');
    expect(ratioKind('upper', 'lower')).toBe('upper');
    expect(ratioKind('lower', 'upper')).toBe('lower');
    expect(ratioKind('upper', 'upper')).toBeUndefined();
    expect(ratioKind('lower', 'lower')).toBeUndefined();
  });

  it('a limit over a detection is a limit at limit/value; two upper limits are unusable and said so', () => {
    const obs = set(
      sightline('a', undefined, undefined, { 'NH3(s)': { kind: 'upper', value: 5e16, confidence: 0.997 }, 'H2O(s)': det(1e18, 1e17) }),
      sightline('b', undefined, undefined, { 'NH3(s)': det(4e16, 1e16), 'H2O(s)': { kind: 'upper', value: 1e17 } }),
      sightline('c', undefined, undefined, { 'NH3(s)': { kind: 'upper', value: 5e16 }, 'H2O(s)': { kind: 'upper', value: 1e17 } }),
    );
    const { quantities, warnings } = deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'NH3(s)', as: 'ratio' }]);
    expect(quantities.map((q) => [q.sightline, q.kind])).toEqual([['a', 'upper'], ['b', 'lower']]);
    expect(quantities[0].log10).toBeCloseTo(Math.log10(0.05), 12);
    expect(quantities[0].confidence).toBe(0.997);
    expect(quantities[0].sigmaLoDex).toBe(0);
    expect(quantities[1].log10).toBeCloseTo(Math.log10(0.4), 12);
    expect(warnings.join('\n')).toMatch(/unusable toward c/);
  });

  it('a sightline without the reference gets a warning, not a silent gap', () => {
    const obs = set(sightline('lonely', undefined, undefined, { 'CO(s)': det(3e17, 3e16) }), sightline('ok', undefined, undefined, { 'CO(s)': det(3e17, 3e16), 'H2O(s)': det(1e18, 1e17) }));
    const { quantities, warnings } = deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'CO(s)', as: 'ratio' }]);
    expect(quantities.map((q) => q.sightline)).toEqual(['ok']);
    expect(warnings.join('\n')).toMatch(/H2O\(s\)' is not observed toward lonely/);
  });
});

describe('a reference of its own per quantity', () => {
  it('CH3OH(s)/CO(s) and N2H+/CO beside ratios to the global reference, errors combined as for any ratio', () => {
    // CH3OH(s)/CO(s) = 3e16 / 3e17 = 0.1, log10 = -1; lower side: -log10(1 - sqrt(0.1^2 + 0.1^2)) = 0.0662199183 (both errors 10 %).
    // N2H+/CO = 2e12 / 1e18 = 2e-6, log10 = -5.698970004; upper side: log10(1 + sqrt(0.2^2 + 0.05^2)) = 0.0814032228.
    const obs = set(sightline('a', undefined, undefined, { 'CH3OH(s)': det(3e16, 3e15), 'CO(s)': det(3e17, 3e16), 'H2O(s)': det(1e18, 1e17), 'N2H+': det(2e12, 4e11), CO: det(1e18, 5e16) }));
    const { quantities, warnings } = deriveQuantities(obs, section({ file: 'x.csv' }), [
      { species: 'CH3OH(s)', as: 'ratio', reference: 'CO(s)' },
      { species: 'CH3OH(s)', as: 'ratio' },
      { species: 'N2H+', as: 'ratio', reference: 'CO' },
    ]);
    expect(warnings).toEqual([]);
    expect(quantities.map((q) => [q.label, q.numerator, q.denominator])).toEqual([
      ['CH3OH(s)/CO(s)', 'CH3OH(s)', 'CO(s)'],
      ['CH3OH(s)/H2O(s)', 'CH3OH(s)', 'H2O(s)'],
      ['N2H+/CO', 'N2H+', 'CO'],
    ]);
    expect(quantities[0].log10).toBeCloseTo(-1, 12);
    expect(quantities[0].sigmaLoDex).toBeCloseTo(0.0662199183, 9);
    expect(quantities[1].log10).toBeCloseTo(Math.log10(0.03), 12);
    expect(quantities[2].log10).toBeCloseTo(-5.698970004, 9);
    expect(quantities[2].sigmaHiDex).toBeCloseTo(0.0814032228, 9);
  });

  it("a reference the observations lack names the quantity's reference, not observations.reference", () => {
    const obs = set(sightline('a', undefined, undefined, { 'CH3OH(s)': det(3e16, 3e15), 'H2O(s)': det(1e18, 1e17) }));
    expect(() => deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'CH3OH(s)', as: 'ratio', reference: 'CO(s)' }])).toThrow(
      /hand\.csv, field 'fit\.quantities': the ratio CH3OH\(s\)\/CO\(s\) is asked for, but the observations have no column for its reference 'CO\(s\)' \(they have CH3OH\(s\), H2O\(s\)\)/,
    );
  });

  it('a quantity whose species or reference the network lacks cannot be fitted; columns outside the network are otherwise carried', () => {
    const obs = { ...set(sightline('a', 5, 0.5, { 'HCOOH(s)': det(5e16, 5e15), 'H2O(s)': det(1e18, 1e17), 'CO(s)': det(3e17, 3e16) })), outsideNetwork: ['HCOOH(s)'] };
    expect(deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'CO(s)', as: 'ratio' }]).quantities).toHaveLength(1);
    expect(() => deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'HCOOH(s)', as: 'ratio' }])).toThrow(/the ratio HCOOH\(s\)\/H2O\(s\) is asked for, but the network has no species 'HCOOH\(s\)', so no model gives it/);
    expect(() => deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'CO(s)', as: 'ratio', reference: 'HCOOH(s)' }])).toThrow(/the ratio CO\(s\)\/HCOOH\(s\) is asked for, but the network has no species 'HCOOH\(s\)'/);
    expect(() => deriveQuantities(obs, section({ file: 'x.csv' }), [{ species: 'HCOOH(s)', as: 'abundance' }])).toThrow(/the abundance X\(HCOOH\(s\)\) is asked for, but the network has no species 'HCOOH\(s\)'/);
  });
});

describe('model-cloud A_V', () => {
  it('is half the observed line-of-sight A_V by default (common practice) and follows the fraction', () => {
    const s = sightline('a', 12, 1, {});
    expect(modelAv(s, section({ file: 'x.csv' }))).toBe(6);
    expect(modelAv(s, section({ file: 'x.csv', model_av_fraction: 1 }))).toBe(12);
  });
  it('without an A_V it is a clear error naming the sightline', () => {
    expect(() => modelAv(sightline('noav', undefined, undefined, {}), section({ file: 'x.csv' }))).toThrow(/hand\.csv:2.*noav.*no A_V/);
  });
});
