/**
 * Self-shielding of H2 against photodissociation (Draine & Bertoldi 1996,
 * eq. 37): f = 0.965/(1 + x/b5)^2 + 0.035/sqrt(1 + x) exp(-8.5e-4 sqrt(1 + x)),
 * x = N(H2)/5e14 cm^-2, b5 the Doppler parameter in km s^-1. In a one-point
 * model the H2 column to the cloud edge is x(H2) N_H, with N_H from A_V.
 */

/** Column scale of the fit, cm^-2 (Draine & Bertoldi 1996). */
const COLUMN_SCALE = 5e14;
const LINE_CORE_WEIGHT = 0.965;
const DAMPING_WEIGHT = 0.035;
const DAMPING_DECAY = 8.5e-4;

/** Doppler broadening parameter b of H2, km s^-1 (memory: 3 km s^-1 the value DB96 quote for their fits). */
export const H2_DOPPLER_KMS = 3;

/** N_H / A_V, cm^-2 mag^-1 (Bohlin, Savage & Drake 1978). */
export const NH_PER_AV = 1.87e21;

/** Shielding factor f(N(H2)) of Draine & Bertoldi (1996) eq. 37. */
export function h2ShieldingFactor(columnH2: number, dopplerKms = H2_DOPPLER_KMS): number {
  const x = Math.max(columnH2, 0) / COLUMN_SCALE;
  const s = Math.sqrt(1 + x);
  return LINE_CORE_WEIGHT / (1 + x / dopplerKms) ** 2 + (DAMPING_WEIGHT / s) * Math.exp(-DAMPING_DECAY * s);
}

/**
 * df/dN(H2), cm^2: the derivative of h2ShieldingFactor, for the Jacobian. A
 * negative column (a solver's undershoot of x(H2) below 0) is read as no column,
 * where the factor is constant: the derivative there is 0.
 */
export function h2ShieldingDerivative(columnH2: number, dopplerKms = H2_DOPPLER_KMS): number {
  if (columnH2 < 0) return 0;
  const x = columnH2 / COLUMN_SCALE;
  const s = Math.sqrt(1 + x);
  const core = (-2 * LINE_CORE_WEIGHT) / (dopplerKms * (1 + x / dopplerKms) ** 3);
  const damping = DAMPING_WEIGHT * Math.exp(-DAMPING_DECAY * s) * (-0.5 / (s * s * s) - DAMPING_DECAY / (2 * s * s));
  return (core + damping) / COLUMN_SCALE;
}
