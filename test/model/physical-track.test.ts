/**
 * Physical tracks: the solver sees rate coefficients that change with time
 * (a non-autonomous system), checked against exact solutions, and the
 * free-fall density against a direct numerical integration with SciPy.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { HYDROGEN_MASS, YEAR_SECONDS } from '../../src/chem/constants.ts';
import { collapseDuration, conditionsAt, freeFallDensity, freeFallRate, freeFallTime, type PhysicalTrack } from '../../src/model/physical-track.ts';
import { outputTimesYr, runModel } from '../../src/model/run.ts';
import { describeWithReference, PYTHON, SCIPY } from '../support/references.ts';
import { makeNetwork } from './fixtures.ts';

const solver = { rtol: 1e-9, atol: 1e-30, maxSteps: 20000 };
const n0 = 1e3;
const nFinal = 1e6;

/**
 * A first-order loss of HCN with He as an unchanged partner (HCN + He -> HNC + He):
 * with fractional abundances the two-body coefficient is k n_H(t), so
 * x(t) = x0 exp(-k x_He integral of n_H dt): the loss rate grows as the density does.
 */
const isomerisation = (alpha: number, beta: number) => makeNetwork([{ reactants: ['HCN', 'He'], products: ['HNC', 'He'], law: 'arrhenius', params: { alpha, beta, gamma: 0 } }]);
const xHe = 0.1;
const x0 = 1e-6;

describe('the retarded free-fall collapse (cycloid of a pressure-free sphere)', () => {
  // rho_0 = 1.4 m_H n_0 with the code's m_H (standard atomic weight 1.008 u): the checks below test the dynamics, not the constant.
  it('has the free-fall time sqrt(3 pi / (32 G rho_0)) (standard result)', () => {
    const rho0 = 1.4 * HYDROGEN_MASS * n0;
    expect(freeFallTime(n0)).toBeCloseTo(Math.sqrt((3 * Math.PI) / (32 * 6.6743e-8 * rho0)), -6);
    // 1.4 Myr at n_H = 1e3 cm^-3 (order of the free-fall time of a dark cloud: common practice).
    expect(freeFallTime(n0) / YEAR_SECONDS / 1e6).toBeCloseTo(1.4, 1);
  });

  it('satisfies the primer ODE dn/dt = B (n^4/n0)^(1/3) [24 pi G rho_0 ((n/n0)^(1/3) - 1)]^(1/2) along the way (centred difference)', () => {
    const B = 0.4;
    const rho0 = 1.4 * HYDROGEN_MASS * n0;
    const tEnd = collapseDuration(n0, nFinal, B);
    for (const f of [0.2, 0.6, 0.95, 0.999]) {
      const t = f * tEnd;
      const h = 1e-6 * tEnd;
      const slope = (freeFallDensity(n0, nFinal, B, t + h) - freeFallDensity(n0, nFinal, B, t - h)) / (2 * h);
      const n = freeFallDensity(n0, nFinal, B, t);
      const ode = B * Math.cbrt(n ** 4 / n0) * Math.sqrt(24 * Math.PI * 6.6743e-8 * rho0 * (Math.cbrt(n / n0) - 1));
      expect(slope / ode).toBeCloseTo(1, 5);
    }
    expect(freeFallDensity(n0, nFinal, B, 2 * tEnd)).toBe(nFinal);
    expect(freeFallDensity(n0, nFinal, B, 0)).toBe(n0);
  });

  it('a loss whose rate grows as the density does: x = x0 exp(-k x_He integral n dt), integral n dt = (2 n0 / (B w)) (tan th + tan^3 th / 3)', () => {
    const B = 0.5;
    const track: PhysicalTrack = { kind: 'free-fall', finalDensity: nFinal, retardation: B, avGrowth: true };
    const conditions = { ...defaultConditions(), density: n0, visual_extinction: 2, gas_temperature: 300 };
    const tEnd = collapseDuration(n0, nFinal, B);
    // Past the end of the collapse the loss runs at the final density: 2 % of tEnd more adds about as much as the whole collapse.
    const timesYr = outputTimesYr((0.05 * tEnd) / YEAR_SECONDS, (1.02 * tEnd) / YEAR_SECONDS, 25);
    const result = runModel({ network: isomerisation(1e-17, 0), conditions, grain: DEFAULT_GRAIN_OPTIONS, initial: { HCN: x0, He: xHe }, timesYr, solver, track });
    expect(result.status).toBe('ok');
    const w = freeFallRate(n0);
    const thetaFinal = Math.acos((n0 / nFinal) ** (1 / 6));
    const column = (t: number) => {
      const tt = Math.min(t, tEnd);
      const theta = thetaOf(B * tt * w);
      const during = ((2 * n0) / (B * w)) * (Math.tan(theta) + Math.tan(theta) ** 3 / 3);
      return t <= tEnd ? during : ((2 * n0) / (B * w)) * (Math.tan(thetaFinal) + Math.tan(thetaFinal) ** 3 / 3) + nFinal * (t - tEnd);
    };
    const iHCN = result.species.indexOf('HCN');
    let worst = 0;
    let decayed = 0;
    timesYr.forEach((tYr, k) => {
      const exact = x0 * Math.exp(-1e-17 * xHe * column(tYr * YEAR_SECONDS));
      worst = Math.max(worst, Math.abs(result.abundances[k * result.species.length + iHCN] / exact - 1));
      decayed = Math.max(decayed, 1 - exact / x0);
    });
    expect(decayed).toBeGreaterThan(0.5);
    expect(worst).toBeLessThan(1e-5);
    // At static density n0 the same loss takes away only a few per cent by then: the track is what the solver saw.
    const statical = runModel({ network: isomerisation(1e-17, 0), conditions, grain: DEFAULT_GRAIN_OPTIONS, initial: { HCN: x0, He: xHe }, timesYr, solver });
    expect(1 - statical.abundances[(timesYr.length - 1) * statical.species.length + statical.species.indexOf('HCN')] / x0).toBeLessThan(0.2 * decayed);
    // A_V grew as (n/n0)^(2/3): 100 times at 1e6 cm^-3.
    expect(result.trackConditions!.visual_extinction!.at(-1)).toBeCloseTo(2 * 100, 8);
  });

});

/** theta of the cycloid at tau = theta + sin(theta) cos(theta), by bisection (independent of the code's Newton). */
function thetaOf(tau: number): number {
  let lo = 0;
  let hi = Math.PI / 2;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (mid + Math.sin(mid) * Math.cos(mid) < tau) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('the warm-up ramp', () => {
  it('T = T0 + (T1 - T0) (t/t_h)^p, then T1; gas and dust each from their own start', () => {
    const start = { ...defaultConditions(), gas_temperature: 10, dust_temperature: 8 };
    const out = { ...start };
    const ramp: PhysicalTrack = { kind: 'warm-up', finalTemperature: 200, durationYr: 1e5, exponent: 2 };
    conditionsAt(ramp, start, 0.5e5 * YEAR_SECONDS, YEAR_SECONDS, out);
    expect(out.gas_temperature).toBeCloseTo(10 + 190 * 0.25, 12);
    expect(out.dust_temperature).toBeCloseTo(8 + 192 * 0.25, 12);
    conditionsAt(ramp, start, 3e5 * YEAR_SECONDS, YEAR_SECONDS, out);
    expect(out.gas_temperature).toBe(200);
  });

  it('a rate k = alpha T/300 on a linear ramp: x = x0 exp(-alpha n x_He / 300 integral T dt), exact', () => {
    const th = 1e5 * YEAR_SECONDS;
    const [t0, t1] = [10, 100];
    const n = 1e4;
    const track: PhysicalTrack = { kind: 'warm-up', finalTemperature: t1, durationYr: 1e5, exponent: 1 };
    const conditions = { ...defaultConditions(), density: n, gas_temperature: t0, dust_temperature: t0 };
    const timesYr = outputTimesYr(1e3, 3e5, 15);
    const result = runModel({ network: isomerisation(1e-15, 1), conditions, grain: DEFAULT_GRAIN_OPTIONS, initial: { HCN: x0, He: xHe }, timesYr, solver, track });
    expect(result.status).toBe('ok');
    const integralT = (t: number) => (t <= th ? t0 * t + ((t1 - t0) * t * t) / (2 * th) : t0 * th + ((t1 - t0) * th) / 2 + t1 * (t - th));
    const iHCN = result.species.indexOf('HCN');
    let worst = 0;
    timesYr.forEach((tYr, k) => {
      const exact = x0 * Math.exp(((-1e-15 * n * xHe) / 300) * integralT(tYr * YEAR_SECONDS));
      worst = Math.max(worst, Math.abs(result.abundances[k * result.species.length + iHCN] / exact - 1));
    });
    expect(worst).toBeLessThan(1e-5);
    expect(result.abundances[(timesYr.length - 1) * result.species.length + iHCN] / x0).toBeLessThan(0.5);
  });
});

describeWithReference(SCIPY, 'the collapse density against SciPy', () => {
  it("matches solve_ivp (Radau) on the shell's equation of motion r'' = -B^2 G M / r^2, n = n0 (r0/r)^3 (SciPy, independent integration)", () => {
    const B = 0.7;
    const tEnd = collapseDuration(n0, nFinal, B);
    const times = Array.from({ length: 12 }, (_, i) => ((i + 1) / 12) * 0.999 * tEnd);
    const rho0 = 1.4 * HYDROGEN_MASS * n0;
    const script = `
import json, math, sys
import numpy as np
from scipy.integrate import solve_ivp
B, rho0, times = ${B}, ${rho0}, json.loads(sys.argv[1])
G = 6.6743e-8
r0 = 1.0e18
M = 4.0 / 3.0 * math.pi * r0**3 * rho0
def f(t, y):
    return [y[1], -B * B * G * M / y[0] ** 2]
sol = solve_ivp(f, (0.0, times[-1]), [r0, 0.0], method='Radau', t_eval=times, rtol=1e-11, atol=[1e-3, 1e-14])
print(json.dumps([(r0 / r) ** 3 for r in sol.y[0]]))
`;
    const r = spawnSync(PYTHON, ['-c', script, JSON.stringify(times)], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const ratios = JSON.parse(r.stdout) as number[];
    times.forEach((t, i) => expect(freeFallDensity(n0, nFinal, B, t) / (n0 * ratios[i])).toBeCloseTo(1, 6));
  });
});
