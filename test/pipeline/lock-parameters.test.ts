/**
 * The lock file covers every fitted parameter (issue 13: a moved dust
 * temperature or cosmic-ray rate passed --check), and its default tolerance
 * is 1.5 grid steps of each parameter, so a one-step move passes and a
 * two-step one fails (the demo's 0.1 dex time step used to fail a one-step
 * move against a 0.1 dex tolerance).
 */
import { describe, expect, it } from 'vitest';
import type { FitStageResult } from '../../src/fit/types.ts';
import { lockTolerance } from '../../src/pipeline/fit-lock.ts';
import { buildLock, compareWithLock, type LockedFit } from '../../src/pipeline/lock.ts';

const AGE_STEP = 0.1;
const ZETA_STEP = Math.log10(2);

function fit(ageYr: number, zeta: number, dust = 12): LockedFit {
  return {
    sightline: 'star-1',
    density: 1e4,
    densityLo: 5e3,
    densityHi: 2e4,
    ageYr,
    ageLoYr: ageYr / 2,
    ageHiYr: ageYr * 2,
    chi2: 3,
    parameters: {
      density: { best: 1e4, lo: 5e3, hi: 2e4 },
      age_yr: { best: ageYr, lo: ageYr / 2, hi: ageYr * 2 },
      cr_ionisation_rate: { best: zeta, lo: zeta / 2, hi: zeta * 2 },
      dust_temperature: { best: dust, lo: dust - 2, hi: dust + 2 },
    },
  };
}

const result = {
  fittedParameters: ['density', 'cr_ionisation_rate', 'dust_temperature', 'age_yr'],
  gridStepsDex: { density: 0.5, age_yr: AGE_STEP, cr_ionisation_rate: ZETA_STEP, dust_temperature: Math.log10(14 / 12) },
} as unknown as FitStageResult;

describe('lock files of every fitted parameter', () => {
  const tol = lockTolerance(result, {});
  const lock = buildLock('demo', [fit(1e5, 1.3e-17)], {}, tol);

  it('defaults to 1.5 grid steps per parameter and states the rule', () => {
    expect(tol.densityDex).toBe(0.75);
    expect(tol.ageDex).toBe(0.15);
    expect(tol.parametersDex!.cr_ionisation_rate).toBeCloseTo(1.5 * ZETA_STEP, 2);
    expect(tol.rule).toMatch(/1\.5 grid steps/);
  });

  it('a one-step move in age passes; two steps fail', () => {
    expect(compareWithLock(lock, [fit(1e5 * 10 ** AGE_STEP, 1.3e-17)], {}).passed).toBe(true);
    const two = compareWithLock(lock, [fit(1e5 * 10 ** (2 * AGE_STEP), 1.3e-17)], {});
    expect(two.passed).toBe(false);
    expect(two.moved[0].changes[0]).toMatch(/^best age moved 0\.200 dex \(> 0\.15 dex\)/);
  });

  it('a cosmic-ray rate or dust temperature that moved fails the check, naming the parameter', () => {
    const zeta = compareWithLock(lock, [fit(1e5, 5.2e-17)], {});
    expect(zeta.passed).toBe(false);
    expect(zeta.moved[0].changes.join('\n')).toMatch(/best cr_ionisation_rate moved 0\.602 dex/);
    const dust = compareWithLock(lock, [fit(1e5, 1.3e-17, 20)], {});
    expect(dust.passed).toBe(false);
    expect(dust.moved[0].changes.join('\n')).toMatch(/best dust_temperature moved/);
  });
});
