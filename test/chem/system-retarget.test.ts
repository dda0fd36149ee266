/** CompiledSystem.retarget: new conditions in the same system give what a fresh compile at them gives. */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import { compile } from '../../src/chem/system.ts';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { ROOT } from '../support/cli.ts';

const network = loadNetwork(join(ROOT, 'config/networks/dark-cloud.yaml'));

describe('retarget', () => {
  const cases = [
    ['the default grain options', DEFAULT_GRAIN_OPTIONS],
    ['the three-phase ice and the non-diffusive switches', { ...DEFAULT_GRAIN_OPTIONS, mantle: true, threeBody: true, eleyRideal: true, photodissociationInduced: true, icePhotolysis: true }],
  ] as const;
  for (const [what, grain] of cases) {
    it(`matches a fresh compile, right-hand side and Jacobian, with ${what}`, () => {
      const from = { ...defaultConditions(), density: 1e3, visual_extinction: 2, gas_temperature: 10, dust_temperature: 10 };
      const to = { ...from, density: 3.7e4, visual_extinction: 7.5, gas_temperature: 14, dust_temperature: 12 };
      const moved = compile(network, from, grain);
      // A state with every species present, so that every term contributes.
      const y = Float64Array.from({ length: moved.n }, (_, i) => 1e-8 * (1 + ((i * 7919) % 13)));
      // Evaluated at y before the move too: what the system keeps of the last state must not outlive the old rates.
      moved.rhs(0, y, new Float64Array(moved.n));
      moved.retarget(to);
      const fresh = compile(network, to, grain);
      expect(moved.n).toBe(fresh.n);
      expect(Array.from(moved.pattern.colIdx)).toEqual(Array.from(fresh.pattern.colIdx));
      const a = new Float64Array(moved.n);
      const b = new Float64Array(moved.n);
      moved.rhs(0, y, a);
      fresh.rhs(0, y, b);
      a.forEach((v, i) => expect(v, moved.species[i]).toBe(b[i]));
      const ja = new Float64Array(moved.pattern.rowPtr[moved.n]);
      const jb = new Float64Array(ja.length);
      moved.jacobian(0, y, ja);
      fresh.jacobian(0, y, jb);
      ja.forEach((v, i) => expect(v).toBe(jb[i]));
      // And the rates did change with the conditions.
      const before = new Float64Array(moved.n);
      compile(network, from, grain).rhs(0, y, before);
      expect(before.some((v, i) => v !== b[i])).toBe(true);
    });
  }
});
