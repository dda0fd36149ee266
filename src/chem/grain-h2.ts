/**
 * H2 formation on grains at a rate per H atom striking a grain, for dust too
 * warm for the physisorbed H(s) + H(s) route (physics.md section 10):
 * Hollenbach & McKee 1979 (ApJS 41, 555), R(H2) = R_f n_H n(H) with
 *
 *   R_f = (1/2) v_H (n_gr sigma_gr / n_H) S(T, T_d) f_a(T_d)   [cm^3 s^-1]
 *
 * where each H2 uses two striking atoms (the 1/2), S is the sticking
 * probability of H and f_a the fraction of stuck atoms that recombine before
 * they evaporate. The formulas below are recalled, not re-checked against the
 * paper (memory); the tests check them against Jura's (1975) observed R_f.
 */
import { thermalSpeed } from './grain-accretion.ts';
import type { Network } from './network-types.ts';
import type { MassActionTerms } from './system.ts';

/**
 * Sticking probability of H on a grain, HM79 (memory: their eq. 3.8):
 * S = [1 + 0.4 sqrt((T + T_d)/100) + 0.2 T/100 + 0.08 (T/100)^2]^-1, T the gas
 * and T_d the dust temperature in K.
 */
export function hydrogenStickingHM79(gasTemperature: number, dustTemperature: number): number {
  const t2 = gasTemperature / 100;
  return 1 / (1 + 0.4 * Math.sqrt((gasTemperature + dustTemperature) / 100) + 0.2 * t2 + 0.08 * t2 * t2);
}

/** Binding energy of the sites that hold H until it recombines in HM79's f_a, K (memory). */
export const HM79_SITE_ENERGY = 600;
/** Ratio of evaporation to recombination attempts in HM79's f_a at infinite dust temperature (memory). */
export const HM79_EVAPORATION_RATIO = 1e4;

/** Fraction of stuck H atoms that recombine, f_a = [1 + 1e4 exp(-600 K / T_d)]^-1 (HM79; memory). */
export function recombinationFractionHM79(dustTemperature: number): number {
  return 1 / (1 + HM79_EVAPORATION_RATIO * Math.exp(-HM79_SITE_ENERGY / dustTemperature));
}

/** Dust temperature at which f_a falls to one half: 600 K / ln(1e4), about 65 K (derived from the formula above). */
export const HM79_HALF_EFFICIENCY_DUST_TEMPERATURE = HM79_SITE_ENERGY / Math.log(HM79_EVAPORATION_RATIO);

/**
 * R_f of HM79 for the model's grains, cm^3 s^-1.
 * @param grainCrossSectionPerH n_gr sigma_gr / n_H, cm^2 (x_gr pi a^2 for one grain size)
 * @param hydrogenMassAmu mass of the H atom in u
 */
export function h2FormationCoefficientHM79(gasTemperature: number, dustTemperature: number, grainCrossSectionPerH: number, hydrogenMassAmu: number): number {
  const v = thermalSpeed(gasTemperature, hydrogenMassAmu);
  return 0.5 * v * grainCrossSectionPerH * hydrogenStickingHM79(gasTemperature, dustTemperature) * recombinationFractionHM79(dustTemperature);
}

/**
 * The physisorbed H(s) + H(s) route holds while most H atoms that stick
 * meet a partner before they evaporate; above about 15 K dust (physics.md
 * section 10) evaporation wins and H2 formation collapses. A run is warned
 * when more than this share of the H atoms striking grains evaporates again
 * (our choice: the point where evaporation, not reaction, is the fate of a
 * stuck atom).
 */
export const PHYSISORBED_H2_MAX_EVAPORATED_SHARE = 0.5;

/** The terms of a compiled system that feed and drain H(s) thermally: H accretion and H(s) thermal desorption. */
export interface HydrogenGrainTerms {
  accretion: number[];
  evaporation: number[];
}

/** Finds the accretion terms of H and the thermal desorption terms of H(s) among the mass-action terms (by their network reaction). */
export function hydrogenGrainTerms(network: Network, terms: MassActionTerms): HydrogenGrainTerms {
  const found: HydrogenGrainTerms = { accretion: [], evaporation: [] };
  for (let t = 0; t < terms.k.length; t++) {
    const r = network.reactions[terms.reaction[t]];
    const s = network.species[terms.reactants[terms.reactantStart[t]]];
    if (s.gasName !== 'H') continue;
    if (r.law === 'accretion') found.accretion.push(t);
    else if (r.law === 'thermal-desorption') found.evaporation.push(t);
  }
  return found;
}

/**
 * Share of the H atoms striking grains that evaporate again at state y:
 * (H(s) thermal desorption rate) / (H accretion rate); undefined when no H
 * accretes.
 */
export function evaporatedHydrogenShare(found: HydrogenGrainTerms, terms: MassActionTerms, y: ArrayLike<number>): number | undefined {
  const rate = (t: number): number => terms.k[t] * y[terms.reactants[terms.reactantStart[t]]];
  const landing = found.accretion.reduce((sum, t) => sum + rate(t), 0);
  if (!(landing > 0)) return undefined;
  return found.evaporation.reduce((sum, t) => sum + rate(t), 0) / landing;
}
