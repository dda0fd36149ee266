/**
 * Desorption from grains: thermal, cosmic-ray induced and UV photodesorption
 * (docs/physics.md section 3; HHL92; Hasegawa & Herbst 1993).
 */
import {
  ATOMIC_MASS_UNIT,
  BOLTZMANN,
  CR_HEATING_DUTY_CYCLE,
  CR_PEAK_DUST_TEMPERATURE,
  CR_REFERENCE_RATE,
  CR_UV_PHOTON_FLUX,
  HABING_PHOTON_FLUX,
  PHOTODESORPTION_ATTENUATION,
} from './constants.ts';

/**
 * Characteristic vibration frequency of a bound particle,
 * nu_0 = sqrt(2 N_s k_B E_D / (pi^2 m)), s^-1 (HHL92 eq. 3); about 1e12 s^-1.
 * @param bindingEnergy E_D / k_B, K
 * @param massAmu particle mass, u
 */
export function vibrationFrequency(siteDensity: number, bindingEnergy: number, massAmu: number): number {
  return Math.sqrt((2 * siteDensity * BOLTZMANN * bindingEnergy) / (Math.PI * Math.PI * massAmu * ATOMIC_MASS_UNIT));
}

/** Thermal desorption rate k_evap = nu_0 exp(-E_D / T_dust), s^-1 (HHL92). */
export function thermalDesorptionRate(nu0: number, bindingEnergy: number, dustTemperature: number): number {
  return nu0 * Math.exp(-bindingEnergy / dustTemperature);
}

/**
 * Cosmic-ray induced desorption, k_crd = f k_evap(70 K) zeta / zeta_0 with
 * f = 3.16e-19 (Hasegawa & Herbst 1993): whole-grain heating to 70 K by iron nuclei.
 */
export function crDesorptionRate(nu0: number, bindingEnergy: number, crIonisationRate: number): number {
  return CR_HEATING_DUTY_CYCLE * thermalDesorptionRate(nu0, bindingEnergy, CR_PEAK_DUST_TEMPERATURE) * (crIonisationRate / CR_REFERENCE_RATE);
}

/**
 * UV photon flux at the grain, photons cm^-2 s^-1: G0 1e8 exp(-2 A_V) from the
 * external field plus 1e4 zeta/zeta_0 from cosmic-ray induced UV (docs/physics.md section 3).
 */
export function photodesorptionFlux(uvField: number, visualExtinction: number, crIonisationRate: number): number {
  return uvField * HABING_PHOTON_FLUX * Math.exp(-PHOTODESORPTION_ATTENUATION * visualExtinction) + CR_UV_PHOTON_FLUX * (crIonisationRate / CR_REFERENCE_RATE);
}

/**
 * First-order photodesorption rate below one monolayer, s^-1: each grain loses
 * Y F pi a^2 times the fraction of its sites holding the species, so per ice
 * particle k = Y F pi a^2 / N_sites (docs/physics.md section 3). Above one monolayer
 * the per-grain rate saturates (see the system's monolayer term).
 */
export function photodesorptionRate(yieldPerPhoton: number, flux: number, crossSection: number, sitesPerGrain: number): number {
  return (yieldPerPhoton * flux * crossSection) / sitesPerGrain;
}
