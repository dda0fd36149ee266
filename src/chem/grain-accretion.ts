/** Freeze-out of gas particles onto grains (docs/physics.md section 3; HHL92). */
import { ATOMIC_MASS_UNIT, BOLTZMANN } from './constants.ts';

/** Mean thermal speed v = sqrt(8 k_B T / (pi m)), cm s^-1 (kinetic theory); mass in u. */
export function thermalSpeed(temperature: number, massAmu: number): number {
  return Math.sqrt((8 * BOLTZMANN * temperature) / (Math.PI * massAmu * ATOMIC_MASS_UNIT));
}

/**
 * Accretion rate per gas particle, k_acc = S pi a^2 v n_gr, s^-1 (HHL92).
 * @param grainDensity n_gr, grains cm^-3
 */
export function accretionRate(sticking: number, crossSection: number, temperature: number, massAmu: number, grainDensity: number): number {
  return sticking * crossSection * thermalSpeed(temperature, massAmu) * grainDensity;
}
