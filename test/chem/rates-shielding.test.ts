/** H2 self-shielding (Draine & Bertoldi 1996) and its place in the rates and the compiled system. */
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { computeRates } from '../../src/chem/rates.ts';
import { h2ShieldingDerivative, h2ShieldingFactor } from '../../src/chem/shielding.ts';
import { compile } from '../../src/chem/system.ts';
import { makeNetwork } from '../model/fixtures.ts';

describe('h2ShieldingFactor (Draine & Bertoldi 1996 eq. 37)', () => {
  it('is 1 without a column (0.965 + 0.035)', () => {
    expect(h2ShieldingFactor(0)).toBeCloseTo(1, 3);
  });
  // Eq. 36 is their rough power law; eq. 37 wanders about it by up to about a factor 2 (memory of their Fig. 3).
  it('follows the power law (N/1e14)^-0.75 of their eq. 36 within a factor 2.5 from 1e15 to 1e21 cm^-2', () => {
    for (const n of [1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21]) {
      const ratio = h2ShieldingFactor(n) / (n / 1e14) ** -0.75;
      expect(ratio).toBeGreaterThan(1 / 2.5);
      expect(ratio).toBeLessThan(2.5);
    }
  });
  it('falls monotonically, with the derivative equal to central differences', () => {
    for (const n of [1e13, 1e15, 1e18, 1e21]) {
      const h = 1e-6 * n;
      const fd = (h2ShieldingFactor(n + h) - h2ShieldingFactor(n - h)) / (2 * h);
      expect(h2ShieldingDerivative(n) / fd).toBeCloseTo(1, 5);
      expect(h2ShieldingDerivative(n)).toBeLessThan(0);
    }
  });
  it('reads a negative column (a solver undershoot) as none: constant factor, zero derivative, as central differences give', () => {
    const n = -1e15;
    const h = 1e-6 * Math.abs(n);
    expect(h2ShieldingFactor(n)).toBe(h2ShieldingFactor(0));
    expect((h2ShieldingFactor(n + h) - h2ShieldingFactor(n - h)) / (2 * h)).toBe(0);
    expect(h2ShieldingDerivative(n)).toBe(0);
  });
});

describe('self-shielded H2 photodissociation', () => {
  const net = makeNetwork([
    { reactants: ['H2'], products: ['H', 'H'], law: 'interstellar-uv', params: { alpha: 3.4e-11, gamma: 2.5 } },
    { reactants: ['CO'], products: ['C', 'O'], law: 'interstellar-uv', params: { alpha: 2e-10, gamma: 3.5 } },
  ]);
  const c = { ...defaultConditions(), visual_extinction: 1 };
  it('applies to H2 -> H + H only, and can be switched off', () => {
    const on = computeRates(net, c, DEFAULT_GRAIN_OPTIONS);
    expect(on.rates.map((r) => r.form)).toEqual(['h2-self-shielding', 'mass-action']);
    expect(on.columnToEdge).toBeCloseTo(1.87e21, -15);
    expect(computeRates(net, c, DEFAULT_GRAIN_OPTIONS, { selfShielding: false }).rates[0].form).toBe('mass-action');
  });
  it('slows the rate by f(x_H2 N_H) with N_H = 1.87e21 A_V (Bohlin, Savage & Drake 1978) and has an exact Jacobian', () => {
    const sys = compile(net, c, DEFAULT_GRAIN_OPTIONS);
    const y = new Float64Array(sys.n);
    y[net.speciesIndex.get('H2')!] = 0.5;
    const f = new Float64Array(sys.n);
    sys.rhs(0, y, f);
    const k0 = 3.4e-11 * Math.exp(-2.5);
    const shield = h2ShieldingFactor(0.5 * 1.87e21);
    expect(shield).toBeLessThan(1e-4);
    expect(f[net.speciesIndex.get('H')!] / (2 * k0 * shield * 0.5)).toBeCloseTo(1, 12);
    const values = new Float64Array(sys.pattern.colIdx.length);
    sys.jacobian(0, y, values);
    const iH2 = net.speciesIndex.get('H2')!;
    const pos = Array.from(sys.pattern.colIdx.subarray(sys.pattern.rowPtr[iH2], sys.pattern.rowPtr[iH2 + 1])).indexOf(iH2) + sys.pattern.rowPtr[iH2];
    const h = 1e-7;
    const yp = Float64Array.from(y);
    const ym = Float64Array.from(y);
    yp[iH2] += h;
    ym[iH2] -= h;
    const fp = new Float64Array(sys.n);
    const fm = new Float64Array(sys.n);
    sys.rhs(0, yp, fp);
    sys.rhs(0, ym, fm);
    expect(values[pos] / ((fp[iH2] - fm[iH2]) / (2 * h))).toBeCloseTo(1, 5);
    // The product row too: two H per dissociation.
    const iH = net.speciesIndex.get('H')!;
    const posH = Array.from(sys.pattern.colIdx.subarray(sys.pattern.rowPtr[iH], sys.pattern.rowPtr[iH + 1])).indexOf(iH2) + sys.pattern.rowPtr[iH];
    expect(values[posH] / ((fp[iH] - fm[iH]) / (2 * h))).toBeCloseTo(1, 5);
    expect(values[posH] / values[pos]).toBeCloseTo(-2, 10);
    expect(sys.omitted).toEqual([expect.stringMatching(/h2-self-shielding .*H2 -> H \+ H/)]);
  });
});
