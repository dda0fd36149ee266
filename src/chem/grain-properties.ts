/**
 * The dust grain as one size: cross-section, number per H nucleus, surface
 * sites and the abundance of one monolayer (docs/physics.md section 2; HHL92).
 */
import type { PhysicalConditions } from '../config/conditions.ts';
import { HYDROGEN_MASS, MEAN_MASS_PER_H, MICROMETRE } from './constants.ts';

export interface GrainProperties {
  /** Grain radius a, cm. */
  radius: number;
  /** Geometric cross-section pi a^2, cm^2. */
  crossSection: number;
  /** Grains per H nucleus, x_gr = n_gr / n_H. */
  abundance: number;
  /** Surface site density N_s, cm^-2. */
  siteDensity: number;
  /** Sites per grain, N_sites = 4 pi a^2 N_s. */
  sitesPerGrain: number;
  /** Fractional abundance (per H nucleus) of ice species that fills one monolayer: x_gr N_sites. */
  monolayerAbundance: number;
}

/**
 * Grain number per H nucleus: n_gr / n_H = (dust-to-gas) 1.4 m_H / (4/3 pi a^3 rho_gr)
 * (docs/physics.md section 2; about 1.9e-12 with the defaults).
 */
export function grainAbundance(radiusCm: number, grainDensity: number, dustToGas: number): number {
  const grainMass = (4 / 3) * Math.PI * radiusCm ** 3 * grainDensity;
  return (dustToGas * MEAN_MASS_PER_H * HYDROGEN_MASS) / grainMass;
}

export function grainProperties(c: PhysicalConditions): GrainProperties {
  const radius = c.grain_radius * MICROMETRE;
  const abundance = grainAbundance(radius, c.grain_density, c.dust_to_gas);
  const sitesPerGrain = 4 * Math.PI * radius * radius * c.site_density;
  return {
    radius,
    crossSection: Math.PI * radius * radius,
    abundance,
    siteDensity: c.site_density,
    sitesPerGrain,
    monolayerAbundance: abundance * sitesPerGrain,
  };
}
