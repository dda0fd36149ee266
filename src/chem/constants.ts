/**
 * Physical constants in cgs, and the reference values the rate laws are
 * scaled by. Fundamental constants: CODATA 2018 (the SI-defining ones exact).
 */
import { AMU_GRAMS, ATOMIC_WEIGHTS } from './elements.ts';

/** Boltzmann constant k_B, erg K^-1 (CODATA 2018, exact). */
export const BOLTZMANN = 1.380649e-16;

/** Planck constant h, erg s (CODATA 2018, exact). */
export const PLANCK = 6.62607015e-27;

/** Reduced Planck constant hbar = h / 2 pi, erg s (CODATA 2018). */
export const HBAR = PLANCK / (2 * Math.PI);

/** Atomic mass constant m_u, g (CODATA 2018). */
export const ATOMIC_MASS_UNIT = AMU_GRAMS;

/** Mass of a hydrogen atom, g (IUPAC 2021 standard atomic weight times m_u). */
export const HYDROGEN_MASS = ATOMIC_WEIGHTS.H * AMU_GRAMS;

/** One angstrom in cm (definition). */
export const ANGSTROM = 1e-8;

/** One micrometre in cm (definition). */
export const MICROMETRE = 1e-4;

/** Julian year, s (IAU: 365.25 days of 86400 s). */
export const YEAR_SECONDS = 3.15576e7;

/** Reference cosmic-ray ionisation rate of H2, zeta_0, s^-1 (common practice). */
export const CR_REFERENCE_RATE = 1.3e-17;

/** Mean mass per H nucleus in units of m_H, with helium (common practice). */
export const MEAN_MASS_PER_H = 1.4;

/** Photon flux of a G0 = 1 field in the photodesorbing band, photons cm^-2 s^-1 (docs/physics.md section 3; common practice). */
export const HABING_PHOTON_FLUX = 1e8;

/** Dust attenuation of the photodesorbing UV per mag of A_V: F ∝ exp(-2 A_V) (docs/physics.md section 3; common practice). */
export const PHOTODESORPTION_ATTENUATION = 2;

/** Cosmic-ray induced UV photon flux at zeta = zeta_0, photons cm^-2 s^-1 (docs/physics.md section 3: "about 1e4", the order of magnitude, memory; Prasad & Tarafdar 1983 mechanism). */
export const CR_UV_PHOTON_FLUX = 1e4;

/** Fraction of time a grain spends near the peak temperature after a cosmic-ray hit (Hasegawa & Herbst 1993). */
export const CR_HEATING_DUTY_CYCLE = 3.16e-19;

/** Peak temperature of a grain heated by an iron cosmic ray, K (Hasegawa & Herbst 1993). */
export const CR_PEAK_DUST_TEMPERATURE = 70;

/** Width of the rectangular barrier for quantum tunnelling on the surface, cm (1 angstrom; HHL92). */
export const TUNNELLING_BARRIER_WIDTH = 1 * ANGSTROM;

/** Newtonian constant of gravitation G, cm^3 g^-1 s^-2 (CODATA 2018). */
export const GRAVITATIONAL_CONSTANT = 6.6743e-8;
