/**
 * The ices of the default network against the sky (physics.md section 9):
 * 10 K gas and dust, A_V = 10, the low-metal start, n_H = 2e4 and 1e5 cm^-3,
 * 1e3 to 1e7 yr, evaluated by scripts/ice-targets.ts (ice = surface plus
 * mantle) with the recommended grain switches (RECOMMENDED_GRAIN: three-phase
 * ice, three-body, Eley-Rideal, photodissociation-induced reactions and ice
 * photolysis; docs/default-network.md gives the measured table and the other
 * combinations).
 *
 * The first block holds the targets the model reaches. The second holds those
 * it does not, as skipped checks with the figures measured on this network
 * and these switches: no constant of the network may be moved to pass them.
 *
 * The fit criterion is measured by a pipeline, not here (216 models
 * take minutes): pipelines/examples/frostmere-survey.yaml, invented stars
 * with CO2/H2O 0.26-0.36. At 10 K dust the recommended switches give p =
 * 0.17-0.85 on all 8 stars (two-phase: 5e-16 to 9e-13 on 7); with the dust
 * temperature a grid axis of 10-20 K the 68.3 % interval reaches 10 K on all
 * 8 (two-phase: excludes 10 K on 7, best fit 18 K on 6). docs/default-network.md.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import {
  CLOUD_CORE_MEDIANS,
  DEFAULT_NETWORK,
  evaluateIceTargets,
  MIN_WINDOW_DEX,
  OBSERVED_CARRIERS,
  RATIO_TARGETS,
  RECOMMENDED_GRAIN,
  RESERVOIR_ELEMENTS,
  RESERVOIR_LIMIT,
  WATER_RANGE,
  widestWindow,
  type DensityResult,
  type Row,
} from '../../scripts/ice-targets.ts';

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
/** H2 in the ice is a trace beside the water (Hincelin et al. 2015: encounter desorption keeps the H2 coverage low). */
const H2_ICE_LIMIT = 0.01;

const target = (species: string) => RATIO_TARGETS.find((t) => t.species === species)!;
const within = (row: Row, species: string): boolean => row.ratios[species] >= target(species).range[0] && row.ratios[species] <= target(species).range[1];
const waterOk = (row: Row): boolean => row.water >= WATER_RANGE[0] && row.water <= WATER_RANGE[1];
/** Widest window (dex) in which water ice and the given ratio targets hold at once. */
const windowDex = (r: DensityResult, species: string[]): number =>
  widestWindow(r.rows.map((row) => ({ ...row, missed: waterOk(row) && species.every((s) => within(row, s)) ? [] : ['missed'] })))?.dex ?? 0;

describe('default network ice targets, recommended grain switches (10 K, A_V = 10, low-metal start; n_H = 2e4 and 1e5 cm^-3)', () => {
  let results: DensityResult[];
  let dense: DensityResult;
  beforeAll(() => {
    results = evaluateIceTargets(loadNetwork(DEFAULT_NETWORK), { grain: RECOMMENDED_GRAIN, perDecade: 5 });
    dense = results.find((r) => r.density === 1e5)!;
  });
  const times = (r: DensityResult): number[] => r.rows.map((row) => row.timeYr);

  it('runs to 1e7 yr at both densities', () => {
    expect(results.map((r) => r.density)).toEqual([2e4, 1e5]);
    for (const r of results) {
      expect(r.status, r.failure).toBe('ok');
      expect(r.rows.at(-1)?.timeYr).toBeCloseTo(1e7, -3);
    }
  });

  it(`keeps H2 ice below ${H2_ICE_LIMIT} of the water ice once there is a monolayer (Hincelin et al. 2015 encounter desorption; without it the mantle buried H2 up to 3 times the water)`, () => {
    for (const r of results) {
      r.ice.H2.forEach((x, k) => {
        if (r.ice.H2O[k] >= MONOLAYER_PER_H) expect(x / r.ice.H2O[k], `n_H = ${r.density}, ${times(r)[k]} yr`).toBeLessThan(H2_ICE_LIMIT);
      });
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
      r.rows.forEach((row) => {
        if (row.timeYr < LATE_YR * (1 - 1e-9)) return;
        expect(row.water, `n_H = ${r.density}, ${row.timeYr} yr`).toBeGreaterThanOrEqual(WATER_RANGE[0]);
        expect(row.water, `n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThanOrEqual(WATER_RANGE[1]);
      });
    }
  });

  it(`NH3 ice stays below 0.15 of the water ice from ${LATE_YR.toExponential()} yr on (Oberg et al. 2011, ApJ 740, 109: protostellar median 0.05)`, () => {
    for (const r of results) for (const row of r.rows.filter((x) => x.timeYr >= LATE_YR * (1 - 1e-9))) expect(row.ratios.NH3, `n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThan(0.15);
  });

  describe('n_H = 1e5 cm^-3', () => {
    it(`CO and CO2 ice are within a factor of 2 of ${CLOUD_CORE_MEDIANS.CO} and ${CLOUD_CORE_MEDIANS.CO2} of the water ice, CH3OH within a factor of 3 of ${CLOUD_CORE_MEDIANS.CH3OH}, and NH3 below 0.15, all at once over at least ${MIN_WINDOW_DEX} dex while the water ice meets its target (Oberg et al. 2011 cloud-core medians)`, () => {
      expect(windowDex(dense, ['CO', 'CO2', 'CH3OH', 'NH3'])).toBeGreaterThanOrEqual(MIN_WINDOW_DEX);
    });

    it(`CH3OH ice stays within a factor of 3 of ${CLOUD_CORE_MEDIANS.CH3OH} of the water ice from 1e6 to 1e7 yr (Oberg et al. 2011; the two-phase ice turned all CO into CH3OH, 0.40 at 1e7 yr)`, () => {
      for (const row of dense.rows.filter((x) => x.timeYr >= 1e6 * (1 - 1e-9))) expect(within(row, 'CH3OH'), `${row.timeYr} yr: ${row.ratios.CH3OH}`).toBe(true);
    });
  });

  describe('targets the model does not reach (measured with these switches; the published physics here does not get there)', () => {
    // Measured: no output age meets every target at either density (CH4 and the NH2OH reservoir at n_H = 1e5; CO, CO2,
    // CH3OH, CH4 and the H2CO reservoir at n_H = 2e4). Without the CH4 and reservoir targets, n_H = 1e5 meets the rest
    // from 2.5e4 to 1e7 yr.
    it.skip(`a window of at least ${MIN_WINDOW_DEX} dex meets every target at once (issue text)`, () => {
      for (const r of results) expect(r.window?.dex ?? 0, `n_H = ${r.density}`).toBeGreaterThanOrEqual(MIN_WINDOW_DEX);
    });

    // Measured at n_H = 2e4: CO(s)/H2O(s) 0.077-0.155 (at most 0.155 at 6.3e5 yr, the edge of the 0.155-0.62 band);
    // CO2(s)/H2O(s) at most 0.113 (band 0.19-0.76); CH3OH(s)/H2O(s) 0.12-0.17 from 6.3e5 yr on (band 0.013-0.12).
    it.skip('n_H = 2e4: CO, CO2 and CH3OH ice meet their Oberg et al. 2011 bands at once over 0.3 dex', () => {
      expect(windowDex(results[0], ['CO', 'CO2', 'CH3OH'])).toBeGreaterThanOrEqual(MIN_WINDOW_DEX);
    });

    // Measured: CH4(s)/H2O(s) 0.149-0.26 from 1e5 yr on at n_H = 2e4 (below 0.15 only at 1.0-1.6e6 yr) and 0.18-0.21 at
    // n_H = 1e5. Atomic carbon from the C+ start lands and is hydrogenated on the grain (H + C, CH, CH2, CH3, all
    // barrierless) before it is locked in CO; ice photolysis of CH4 is undone by H addition at 10 K.
    it.skip('CH4 ice stays below 0.15 of the water ice from 1e5 yr on (Oberg et al. 2011 protostellar median 0.05)', () => {
      for (const r of results) for (const row of r.rows.filter((x) => x.timeYr >= LATE_YR * (1 - 1e-9))) expect(row.ratios.CH4, `n_H = ${r.density}, ${row.timeYr} yr`).toBeLessThan(0.15);
    });

    // Measured: NH2OH(s) holds 23 % of the nitrogen from 1e5 yr on at n_H = 1e5 (NO hydrogenation, Congiu et al. 2012;
    // Fedoseev et al. 2012, barrierless; no surface reaction destroys NH2OH at 10 K, and ice photolysis reaches the
    // surface layer only, in about 2e6 yr with the cosmic-ray induced UV); at n_H = 2e4 H2CO(s) holds 12.4 % of the
    // carbon from 1e6 yr on.
    it.skip(`no ice species outside ${OBSERVED_CARRIERS.join(', ')} holds more than 10 % of ${RESERVOIR_ELEMENTS.join(', ')} (issue text)`, () => {
      for (const r of results) expect(r.worstReservoir.share, `${r.worstReservoir.species} at n_H = ${r.density}`).toBeLessThanOrEqual(RESERVOIR_LIMIT);
    });
  });
});
