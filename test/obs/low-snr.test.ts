/**
 * Low signal-to-noise detections (physics.md section 12; common practice):
 * below observations.min_snr (2) a detection is used as an upper limit at
 * value + 2 sigma, with a note naming the sightline; above it the log errors
 * are the exact asymmetric ones, never a symmetric first-order width.
 */
import { describe, expect, it } from 'vitest';
import { deriveQuantities } from '../../src/obs/derive.ts';
import type { Measurement, ObservationSet } from '../../src/obs/types.ts';
import { section } from './helpers.ts';

const det = (value: number, err: number): Measurement => ({ kind: 'detection', value, errLo: err, errHi: err });
function one(columns: Record<string, Measurement>): ObservationSet {
  return { file: 'weak.csv', kind: 'table', sightlines: [{ id: 'faint-1', av: 10, columns, source: { file: 'weak.csv', line: 2 } }], warnings: [] };
}

describe('low signal-to-noise detections', () => {
  it('0.2 +- 0.8 (x 1e17) is an upper limit at 1.8e17, with a note; never -6.24 +- 1.74 dex', () => {
    const { quantities, warnings } = deriveQuantities(one({ CO: det(0.2e17, 0.8e17) }), section({ file: 'weak.csv' }), [{ species: 'CO', as: 'abundance' }]);
    expect(quantities).toHaveLength(1);
    expect(quantities[0].kind).toBe('upper');
    // 1.8e17 / (1.87e21 * 10) = 9.6257e-6
    expect(quantities[0].log10).toBeCloseTo(Math.log10(1.8e17 / 1.87e22), 12);
    // Phi(2) = 0.97725 (NIST/SEMATECH e-Handbook normal table, 1.3.6.7.1).
    expect(quantities[0].confidence).toBeCloseTo(0.97725, 4);
    expect(warnings.join('\n')).toMatch(/line 2 \('faint-1'\): 'CO' = 2\.00e\+16 \+- 8\.00e\+16 has S\/N 0\.25 < 2 \(observations\.min_snr\): used as an upper limit at 1\.80e\+17/);
  });

  it('a weak reference makes its ratios lower limits; min_snr 0 keeps them as detections with asymmetric errors', () => {
    const obs = one({ 'CO(s)': det(3e17, 0.3e17), 'H2O(s)': det(1e17, 0.6e17) });
    const limited = deriveQuantities(obs, section({ file: 'weak.csv' }), [{ species: 'CO(s)', as: 'ratio' }]).quantities[0];
    expect(limited.kind).toBe('lower');
    const kept = deriveQuantities(obs, section({ file: 'weak.csv', min_snr: 0 }), [{ species: 'CO(s)', as: 'ratio' }]).quantities[0];
    expect(kept.kind).toBe('detection');
    // s = sqrt(0.1^2 + 0.6^2) = 0.608276: lower -log10(1 - s) = 0.40702, upper log10(1 + s) = 0.20636.
    expect(kept.sigmaLoDex).toBeCloseTo(-Math.log10(1 - Math.hypot(0.1, 0.6)), 12);
    expect(kept.sigmaHiDex).toBeCloseTo(Math.log10(1 + Math.hypot(0.1, 0.6)), 12);
    expect(kept.sigmaLoDex).toBeGreaterThan(kept.sigmaHiDex);
  });
});
