/**
 * Langmuir-Hinshelwood chemistry on the grain surface in the rate-equation
 * method (HHL92): hopping, sweeping, reaction probability with barriers and
 * tunnelling, and the reaction-diffusion competition (Chang, Cuppen & Herbst
 * 2007; Garrod & Pauly 2011).
 */
import { ATOMIC_MASS_UNIT, BOLTZMANN, HBAR, TUNNELLING_BARRIER_WIDTH } from './constants.ts';

/**
 * Probability of passing a rectangular barrier of height E (K) and width b by
 * quantum tunnelling, exp(-(2 b / hbar) sqrt(2 m k_B E)) (HHL92 eq. 6).
 */
export function tunnellingProbability(barrier: number, massAmu: number, width = TUNNELLING_BARRIER_WIDTH): number {
  return Math.exp(-((2 * width) / HBAR) * Math.sqrt(2 * massAmu * ATOMIC_MASS_UNIT * BOLTZMANN * barrier));
}

/**
 * Hopping rate between adjacent sites, k_hop = nu_0 exp(-E_b / T_dust) with
 * E_b = chi E_D (HHL92). With tunnelling the faster of thermal hopping and
 * tunnelling through the diffusion barrier is taken (HHL92 allow tunnelling of H and H2).
 */
export function hoppingRate(nu0: number, diffusionBarrier: number, dustTemperature: number, tunnellingMassAmu?: number): number {
  const thermal = nu0 * Math.exp(-diffusionBarrier / dustTemperature);
  if (tunnellingMassAmu === undefined) return thermal;
  return Math.max(thermal, nu0 * tunnellingProbability(diffusionBarrier, tunnellingMassAmu));
}

/** Rate of sweeping over the whole grain, k_diff = k_hop / N_sites, s^-1 (HHL92). */
export function diffusionRate(hopRate: number, sitesPerGrain: number): number {
  return hopRate / sitesPerGrain;
}

/** Reduced mass mu = m_i m_j / (m_i + m_j). */
export function reducedMass(mi: number, mj: number): number {
  return (mi * mj) / (mi + mj);
}

/**
 * Reaction probability per encounter, kappa = max(exp(-E_A/T_dust), tunnelling
 * through a 1 angstrom barrier with the reduced mass) (HHL92); 1 without a barrier.
 */
export function reactionProbability(activationEnergy: number, dustTemperature: number, reducedMassAmu: number): number {
  if (activationEnergy <= 0) return 1;
  return Math.max(Math.exp(-activationEnergy / dustTemperature), tunnellingProbability(activationEnergy, reducedMassAmu));
}

/**
 * Reaction-diffusion competition: kappa' = nu kappa / (nu kappa + k_hop,i + k_hop,j)
 * (Chang, Cuppen & Herbst 2007; Garrod & Pauly 2011), nu the larger of the two
 * vibration frequencies (memory). A pair that can neither cross (kappa
 * underflowed to 0) nor hop (cold dust, both hops 0) never reacts: 0, not 0/0.
 */
export function competingProbability(kappa: number, nu: number, hopI: number, hopJ: number): number {
  const attempt = nu * kappa;
  if (attempt === 0) return 0;
  return attempt / (attempt + hopI + hopJ);
}

/**
 * Coefficient of a Langmuir-Hinshelwood reaction in number densities,
 * R = k n_i n_j with k = kappa (k_diff,i + k_diff,j) / n_gr, cm^3 s^-1 (HHL92).
 * For i = j pairs are counted once, k = kappa k_diff,i / n_gr, and each event
 * uses two i.
 */
export function surfaceReactionCoefficient(kappa: number, diffI: number, diffJ: number, sameSpecies: boolean, grainDensity: number): number {
  return (kappa * (sameSpecies ? diffI : diffI + diffJ)) / grainDensity;
}
