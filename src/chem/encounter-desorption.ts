/**
 * Encounter desorption of H2 (Hincelin et al. 2015, A&A 574, A24): an H2(s)
 * that hops onto a site already holding an H2 molecule is bound there by
 * E_D(H2 on H2), about 23 K instead of 430 K on water, and desorbs before it
 * hops on with probability
 *
 *   P = k_evap(H2 on H2) / (k_evap(H2 on H2) + k_hop(H2 on H2)),
 *
 * both with the same vibration frequency. The encounter rate is that of a
 * Langmuir-Hinshelwood pair of identical partners, k_hop(H2 on water) n(H2(s))^2
 * / (N_sites n_gr), so the process is the mass-action reaction
 * H2(s) + H2(s) -> H2(s) + H2 with that coefficient times P. The mechanism
 * is that of the paper's abstract ("A new and simple approach to determine
 * the abundance of hydrogen molecules on interstellar ice mantles", read
 * here); the formula for P and the 23 K (which they take from Cuppen &
 * Herbst 2007, ApJ 668, 294) are from memory, not re-checked.
 *
 * Why it comes with the three-phase ice (docs/ice-mantle.md): the transfer of
 * Garrod & Pauly 2011 buries each surface species in proportion to its share
 * of the surface. At 10 K H2 sticks on water ice for months only, yet without
 * this process it covers a large share of the surface and is buried layer by
 * layer, until the mantle holds more H2 than water. The three-phase models
 * after Hincelin et al. (2015) use encounter desorption to keep the H2
 * coverage physical (memory).
 */
import type { Network, Reaction } from './network-types.ts';
import { iceName } from './species.ts';

/** Binding energy of H2 on a surface of H2, K (Cuppen & Herbst 2007, as used by Hincelin et al. 2015; memory). */
export const H2_ON_H2_BINDING_ENERGY = 23;

/** Probability that an H2 which meets another H2 on the surface desorbs before it hops on (Hincelin et al. 2015; memory). */
export function encounterDesorptionProbability(dustTemperature: number, diffusionRatio: number): number {
  const evap = Math.exp(-H2_ON_H2_BINDING_ENERGY / dustTemperature);
  const hop = Math.exp((-diffusionRatio * H2_ON_H2_BINDING_ENERGY) / dustTemperature);
  return evap / (evap + hop);
}

/** The encounter desorption of H2 as a derived reaction, when the network has H2(s) (none otherwise). */
export function deriveEncounterDesorption(network: Network, firstIndex: number): Reaction[] {
  const ice = iceName('H2');
  if (!network.speciesIndex.has(ice) || !network.speciesIndex.has('H2')) return [];
  const label = `H2 encounter desorption ${ice} + ${ice} -> ${ice} + H2 (Hincelin et al. 2015)`;
  return [
    {
      index: firstIndex,
      reactants: [ice, ice],
      products: [ice, 'H2'],
      law: 'encounter-desorption',
      params: {},
      tmin: 0,
      tmax: Number.POSITIVE_INFINITY,
      origin: 'derived: encounter desorption of H2 (Hincelin et al. 2015, A&A 574, A24; memory), with the three-phase ice',
      source: { file: network.file },
      derived: { mechanism: 'encounter-desorption', parents: [], label },
    },
  ];
}
