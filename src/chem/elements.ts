/**
 * Elements a network may use, with standard atomic weights in unified atomic
 * mass units: IUPAC Commission on Isotopic Abundances and Atomic Weights,
 * "Standard atomic weights of the elements 2021" (Pure Appl. Chem. 2022),
 * abridged/conventional values. Deuterium is the isotope mass (AME 2020).
 */
export const ATOMIC_WEIGHTS: Readonly<Record<string, number>> = {
  H: 1.008,
  D: 2.014101778,
  He: 4.002602,
  C: 12.011,
  N: 14.007,
  O: 15.999,
  F: 18.998403162,
  Na: 22.98976928,
  Mg: 24.305,
  Si: 28.085,
  P: 30.973761998,
  S: 32.06,
  Cl: 35.45,
  Fe: 55.845,
};

/** Electron mass in u (CODATA 2018). */
export const ELECTRON_MASS_AMU = 5.48579909065e-4;

/** Atomic mass constant m_u in g (CODATA 2018). */
export const AMU_GRAMS = 1.66053906660e-24;

export const ELEMENT_SYMBOLS: readonly string[] = Object.keys(ATOMIC_WEIGHTS);
