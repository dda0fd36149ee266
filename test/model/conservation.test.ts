/** The conservation check finds a drift when there is one (common practice: element totals are invariants of a closed network). */
import { describe, expect, it } from 'vitest';
import { ConservationCheck } from '../../src/model/conservation.ts';
import { makeNetwork } from './fixtures.ts';

const net = makeNetwork([
  { reactants: ['C+', 'e-'], products: ['C'], law: 'arrhenius', params: { alpha: 1e-11 } },
  { reactants: ['C', 'O'], products: ['CO'], law: 'arrhenius', params: { alpha: 1e-11 } },
]);
const idx = (s: string) => net.speciesIndex.get(s)!;

function state(values: Record<string, number>): Float64Array {
  const y = new Float64Array(net.species.length);
  for (const [s, v] of Object.entries(values)) y[idx(s)] = v;
  return y;
}

describe('ConservationCheck', () => {
  const y0 = state({ 'C+': 1e-4, 'e-': 1e-4, O: 2e-4 });
  it('reports no drift for a state the reactions can reach', () => {
    const check = new ConservationCheck(net, y0);
    check.observe(state({ 'C+': 4e-5, 'e-': 4e-5, C: 2e-5, CO: 4e-5, O: 1.6e-4 }));
    const r = check.report();
    expect(r.maxRelativeDrift).toBeLessThan(1e-15);
  });
  it('reports the largest relative drift and what drifted', () => {
    const check = new ConservationCheck(net, y0);
    check.observe(state({ 'C+': 1e-4, 'e-': 1e-4, O: 2.02e-4 }));
    check.observe(state({ 'C+': 1.001e-4, 'e-': 1e-4, O: 2e-4 }));
    const r = check.report();
    expect(r.worst).toBe('O');
    expect(r.perElement.O).toBeCloseTo(0.01, 12);
    expect(r.perElement.C).toBeCloseTo(0.001, 12);
    expect(r.chargeDrift).toBeCloseTo(1e-7 / 1.001e-4, 12);
    expect(r.maxRelativeDrift).toBeCloseTo(0.01, 12);
  });
  it('keeps a NaN total (a failed state) as the worst drift through later good states', () => {
    const check = new ConservationCheck(net, y0);
    check.observe(state({ 'C+': 1e-4, 'e-': 1e-4, O: 1e-4, CO: Number.NaN }));
    check.observe(state({ 'C+': 1e-4, 'e-': 1e-4, O: 2e-4 }));
    const r = check.report();
    expect(Number.isNaN(r.maxRelativeDrift)).toBe(true);
    expect(Number.isNaN(r.perElement.C)).toBe(true);
    expect(Number.isNaN(r.perElement.O)).toBe(true);
  });
});
