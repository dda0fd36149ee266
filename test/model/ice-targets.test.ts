/**
 * The ices of the default network against the sky (physics.md section 9):
 * 10 K gas and dust, A_V = 10, the low-metal start, n_H = 2e4 and 1e5 cm^-3,
 * 1e3 to 1e7 yr, evaluated by scripts/ice-targets.ts (ice = every ice form of
 * a species, summed).
 *
 * The first block holds what the network with today's two-phase engine (one
 * reactive ice, diffusive Langmuir-Hinshelwood chemistry only) reaches. The
 * second block holds the targets it does not reach, as skipped checks with the
 * figures measured on this network: they need the engine's three-phase
 * mantle, non-diffusive chemistry and ice photolysis (Jin & Garrod 2020;
 * Garrod et al. 2022: CO + OH needs a partner that moves, and at 10 K neither
 * does). Switch them on once that engine runs the default network; no
 * constant of the network may be moved to pass them.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import { CLOUD_CORE_MEDIANS, DEFAULT_NETWORK, evaluateIceTargets, MIN_WINDOW_DEX, OBSERVED_CARRIERS, RATIO_TARGETS, RESERVOIR_ELEMENTS, RESERVOIR_LIMIT, WATER_RANGE, widestWindow, type DensityResult } from '../../scripts/ice-targets.ts';

/**
 * One monolayer of ice per H nucleus: sites per grain (about 1.9e6) times
 * grains per H (about 1.9e-12), physics.md section 2 (derived). Ratios to
 * water ice mean something once the ice is at least this thick.
 */
const MONOLAYER_PER_H = 3.6e-6;
/** A minor ice constituent stays below this fraction of water ice (our bound; the old network's H2O2 reached 0.5). */
const MINOR_FRACTION = 0.2;
/** Water ice is "at late times" (physics.md section 4: about 1e-4 per H) from this age on, yr. */
const LATE_YR = 1e5;

describe('default network ice targets (10 K, A_V = 10, low-metal start; n_H = 2e4 and 1e5 cm^-3)', () => {
  let results: DensityResult[];
  beforeAll(() => {
    results = evaluateIceTargets(loadNetwork(DEFAULT_NETWORK));
  });
  const times = (r: DensityResult): number[] => r.rows.map((row) => row.timeYr);

  it('runs to 1e7 yr at both densities', () => {
    expect(results.map((r) => r.density)).toEqual([2e4, 1e5]);
    for (const r of results) {
      expect(r.status, r.failure).toBe('ok');
      expect(r.rows.at(-1)?.timeYr).toBeCloseTo(1e7, -3);
    }
  });

  it('HNO(s) stays below 10 % of the nitrogen at every age (issue target; the old network, with no H + HNO, put a third of it there)', () => {
    for (const r of results) expect(Math.max(...r.share('HNO', 'N')), `n_H = ${r.density}`).toBeLessThan(RESERVOIR_LIMIT);
  });

  it('H2O2(s) and O3(s) stay minor beside water ice once there is a monolayer of it (the old network: H2O2 about half of the water at 1e5 yr)', () => {
    for (const r of results) {
      const water = r.ice.H2O;
      for (const species of ['H2O2', 'O3']) {
        const worst = Math.max(...r.ice[species].map((x, k) => (water[k] >= MONOLAYER_PER_H ? x / water[k] : 0)));
        expect(worst, `${species}(s)/H2O(s) at n_H = ${r.density}`).toBeLessThan(MINOR_FRACTION);
      }
    }
  });

  it(`water ice holds ${WATER_RANGE[0].toExponential()} to ${WATER_RANGE[1].toExponential()} per H from ${LATE_YR.toExponential()} yr to 1e7 yr (physics.md section 4: about 1e-4 at late times, common practice)`, () => {
    for (const r of results) {
      r.ice.H2O.forEach((x, k) => {
        if (times(r)[k] < LATE_YR * (1 - 1e-9)) return;
        expect(x, `n_H = ${r.density}, ${times(r)[k]} yr`).toBeGreaterThanOrEqual(WATER_RANGE[0]);
        expect(x, `n_H = ${r.density}, ${times(r)[k]} yr`).toBeLessThanOrEqual(WATER_RANGE[1]);
      });
    }
  });

  it(`CO ice is within a factor of 2 of ${CLOUD_CORE_MEDIANS.CO} of the water ice (Oberg et al. 2011, ApJ 740, 109, cloud-core median) over at least ${MIN_WINDOW_DEX} dex of age while the water ice meets its own target`, () => {
    const co = RATIO_TARGETS.find((t) => t.species === 'CO')!;
    for (const r of results) {
      const rows = r.rows.map((row) => {
        const waterOk = row.water >= WATER_RANGE[0] && row.water <= WATER_RANGE[1];
        const coOk = row.ratios.CO >= co.range[0] && row.ratios.CO <= co.range[1];
        return { ...row, missed: waterOk && coOk ? [] : ['CO or H2O'] };
      });
      expect(widestWindow(rows)?.dex ?? 0, `n_H = ${r.density}`).toBeGreaterThanOrEqual(MIN_WINDOW_DEX);
    }
  });

  describe('targets the two-phase engine does not reach (measured on this network; they wait for the ice engine)', () => {
    // Measured (scripts/ice-targets.ts, this network, two-phase engine): no output age meets every target at either density.
    it.skip(`a window of at least ${MIN_WINDOW_DEX} dex meets every target at once (issue text)`, () => {
      for (const r of results) expect(r.window?.dex ?? 0, `n_H = ${r.density}`).toBeGreaterThanOrEqual(MIN_WINDOW_DEX);
    });

    // Measured: CO2(s)/H2O(s) at most 9.6e-4 (n_H = 2e4, at 3.2e6 yr) and 5.1e-4 (n_H = 1e5, at 3.2e6 yr):
    // CO + OH (176 K barrier, Cuppen et al. 2009) needs CO or OH to move, and at 10 K neither does.
    it.skip(`CO2 ice is within a factor of 2 of ${CLOUD_CORE_MEDIANS.CO2} of the water ice at some age (Oberg et al. 2011 cloud-core median)`, () => {
      const co2 = RATIO_TARGETS.find((t) => t.species === 'CO2')!;
      for (const r of results) expect(r.rows.some((row) => row.ratios.CO2 >= co2.range[0] && row.ratios.CO2 <= co2.range[1]), `n_H = ${r.density}`).toBe(true);
    });

    // Measured: CH3OH(s)/H2O(s) within 0.013-0.12 only from 4e5 to 1e6 yr (n_H = 2e4) and 4e5 to 7.9e5 yr (n_H = 1e5), then
    // rising to 0.42 and 0.40 at 1e7 yr while CO(s)/H2O(s) falls to 5.6e-4 and 3.2e-4: every CO on the one reactive
    // surface is hydrogenated in the end (H abstraction from CH3OH, barriers of 4400 and 6600 K, cannot hold it back).
    it.skip(`CH3OH ice stays within a factor of 3 of ${CLOUD_CORE_MEDIANS.CH3OH} of the water ice from 1e6 to 1e7 yr (Oberg et al. 2011 cloud-core median)`, () => {
      const m = RATIO_TARGETS.find((t) => t.species === 'CH3OH')!;
      for (const r of results) for (const row of r.rows.filter((x) => x.timeYr >= 1e6)) expect(row.ratios.CH3OH, `n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThanOrEqual(m.range[1]);
    });

    // Measured: NH3(s)/H2O(s) 0.10-0.15 (n_H = 2e4; 0.153 at 6.3e6 yr) and 0.07-0.14 (n_H = 1e5);
    // CH4(s)/H2O(s) 0.09-0.27 (n_H = 2e4) and 0.13-0.28 (n_H = 1e5), above 0.15 before about 4e5 yr.
    it.skip('NH3 and CH4 ice stay below 0.15 of the water ice from 1e5 yr on (Oberg et al. 2011 protostellar medians 0.05)', () => {
      for (const r of results) {
        for (const row of r.rows.filter((x) => x.timeYr >= LATE_YR)) {
          expect(row.ratios.NH3, `NH3 n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThan(0.15);
          expect(row.ratios.CH4, `CH4 n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThan(0.15);
        }
      }
    });

    // Measured: NH2OH(s) holds 22-25 % of the nitrogen from 1e5 yr on at n_H = 1e5 (NO hydrogenation, Congiu et al. 2012;
    // Fedoseev et al. 2012, is barrierless and nothing on the surface destroys NH2OH); at n_H = 2e4 H2CO(s) reaches
    // 10.5 % of the carbon at 1e6 yr and C2H2(s) 10.9 % at 1e7 yr.
    it.skip(`no ice species outside ${OBSERVED_CARRIERS.join(', ')} holds more than 10 % of ${RESERVOIR_ELEMENTS.join(', ')} (issue text)`, () => {
      for (const r of results) expect(r.worstReservoir.share, `${r.worstReservoir.species} at n_H = ${r.density}`).toBeLessThanOrEqual(RESERVOIR_LIMIT);
    });
  });
});
