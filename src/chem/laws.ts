/**
 * The rate laws a network file may name, with their parameters. This table
 * is the single list: the network loader checks reactions against it and the
 * rate evaluator (src/chem/rates.ts) gives each law its coefficient.
 *
 * Phase rules say which phases the reactants and products may have, so the
 * loader can catch, say, an accretion whose product is not an ice.
 */
export type RateLawName =
  | 'arrhenius'
  | 'cosmic-ray'
  | 'cosmic-ray-uv'
  | 'interstellar-uv'
  | 'accretion'
  | 'thermal-desorption'
  | 'cr-desorption'
  | 'photodesorption'
  | 'surface'
  | 'reactive-desorption'
  | 'parametric-h2'
  | 'ice-interstellar-uv'
  | 'ice-cosmic-ray-uv'
  | 'three-body'
  | 'eley-rideal'
  | 'photodissociation-induced'
  | 'encounter-desorption';

export interface LawParameter {
  name: string;
  /** Default when the reaction does not give it; undefined means required. */
  default?: number;
  /** Lower bound (inclusive) of an acceptable value. */
  min?: number;
  description: string;
}

export interface RateLaw {
  name: RateLawName;
  description: string;
  reactantCount: number;
  reactantPhase: 'gas' | 'ice';
  productPhase: 'gas' | 'ice' | 'any';
  params: readonly LawParameter[];
  /** Made by the model from the network's reactions when a grain option asks (src/chem/nondiffusive.ts); a network file may not list it. */
  derivedOnly?: boolean;
}

const alpha = (description: string): LawParameter => ({ name: 'alpha', min: 0, description });

/** Parameters of a surface reaction, shared by its reactive-desorption partner (which repeats them). */
const SURFACE_PARAMS: readonly LawParameter[] = [
  { name: 'activation_energy', default: 0, min: 0, description: 'barrier E_A, K' },
  { name: 'branching', default: 1, min: 0, description: 'branching ratio among the channels of the same reactants' },
];

export const RATE_LAWS: Readonly<Record<RateLawName, RateLaw>> = {
  arrhenius: {
    name: 'arrhenius',
    description: 'two-body gas reaction, k = alpha (T/300)^beta exp(-gamma/T) cm^3 s^-1 (modified Arrhenius, Kooij form)',
    reactantCount: 2,
    reactantPhase: 'gas',
    productPhase: 'gas',
    params: [alpha('cm^3 s^-1 at 300 K'), { name: 'beta', default: 0, description: 'temperature exponent' }, { name: 'gamma', default: 0, description: 'activation temperature, K' }],
  },
  'cosmic-ray': {
    name: 'cosmic-ray',
    description: 'direct cosmic-ray ionisation or dissociation, k = alpha zeta/zeta_0 s^-1',
    reactantCount: 1,
    reactantPhase: 'gas',
    productPhase: 'gas',
    params: [alpha('rate at zeta = zeta_0 = 1.3e-17 s^-1, s^-1')],
  },
  'cosmic-ray-uv': {
    name: 'cosmic-ray-uv',
    description: 'photoreaction by cosmic-ray induced UV (Prasad & Tarafdar 1983), k = alpha zeta/zeta_0 s^-1',
    reactantCount: 1,
    reactantPhase: 'gas',
    productPhase: 'gas',
    params: [alpha('rate at zeta = zeta_0, s^-1')],
  },
  'interstellar-uv': {
    name: 'interstellar-uv',
    description: 'photoreaction by the external UV field, k = alpha G0 exp(-gamma A_V) s^-1',
    reactantCount: 1,
    reactantPhase: 'gas',
    productPhase: 'gas',
    params: [alpha('unshielded rate in a G0 = 1 (Habing) field, s^-1'), { name: 'gamma', default: 0, min: 0, description: 'dust attenuation factor per mag of A_V' }],
  },
  accretion: {
    name: 'accretion',
    description: 'freeze-out of a gas species onto grains, k = S pi a^2 v n_gr',
    reactantCount: 1,
    reactantPhase: 'gas',
    productPhase: 'ice',
    params: [{ name: 'sticking', default: 1, min: 0, description: 'sticking probability S' }],
  },
  'thermal-desorption': {
    name: 'thermal-desorption',
    description: 'thermal evaporation, k = nu_0 exp(-E_D/T_dust)',
    reactantCount: 1,
    reactantPhase: 'ice',
    productPhase: 'gas',
    params: [],
  },
  'cr-desorption': {
    name: 'cr-desorption',
    description: 'cosmic-ray induced desorption (Hasegawa & Herbst 1993), k = f k_evap(70 K) zeta/zeta_0',
    reactantCount: 1,
    reactantPhase: 'ice',
    productPhase: 'gas',
    params: [],
  },
  photodesorption: {
    name: 'photodesorption',
    description: 'UV photodesorption by the external and cosmic-ray induced fields, with the monolayer treatment',
    reactantCount: 1,
    reactantPhase: 'ice',
    productPhase: 'gas',
    params: [{ name: 'yield', default: 1e-3, min: 0, description: 'molecules per photon (memory: order of Oberg et al. 2009)' }],
  },
  surface: {
    name: 'surface',
    description: 'Langmuir-Hinshelwood reaction of two ice species by diffusion (HHL92); products in the ice unless written as gas',
    reactantCount: 2,
    reactantPhase: 'ice',
    productPhase: 'any',
    params: SURFACE_PARAMS,
  },
  'reactive-desorption': {
    name: 'reactive-desorption',
    description: 'the share of a surface reaction whose products leave to the gas on formation; pairs with the surface reaction of the same reactants',
    reactantCount: 2,
    reactantPhase: 'ice',
    productPhase: 'gas',
    params: SURFACE_PARAMS,
  },
  'parametric-h2': {
    name: 'parametric-h2',
    description: 'H2 formation on grains at the classical rate R_f n_H n(H) (Jura 1975), used instead of the surface route when chosen',
    reactantCount: 2,
    reactantPhase: 'gas',
    productPhase: 'gas',
    params: [{ name: 'alpha', default: 3e-17, min: 0, description: 'R_f, cm^3 s^-1 (Jura 1975)' }],
  },
  'ice-interstellar-uv': {
    name: 'ice-interstellar-uv',
    description: 'photodissociation of an ice species by the external UV field, k = alpha G0 exp(-gamma A_V) s^-1 (the gas-phase law applied in the ice); derived from the gas-phase channels with grain.ice_photolysis',
    reactantCount: 1,
    reactantPhase: 'ice',
    productPhase: 'ice',
    params: [alpha('unattenuated rate in a G0 = 1 (Habing) field, s^-1'), { name: 'gamma', default: 0, min: 0, description: 'dust attenuation factor per mag of A_V' }],
  },
  'ice-cosmic-ray-uv': {
    name: 'ice-cosmic-ray-uv',
    description: 'photodissociation of an ice species by cosmic-ray induced UV, k = alpha zeta/zeta_0 s^-1; derived from the gas-phase channels with grain.ice_photolysis',
    reactantCount: 1,
    reactantPhase: 'ice',
    productPhase: 'ice',
    params: [alpha('rate at zeta = zeta_0, s^-1')],
  },
  'three-body': {
    name: 'three-body',
    description: 'non-diffusive: a product of a surface reaction reacts at once with a neighbour (Jin & Garrod 2020); derived with grain.three_body',
    reactantCount: 3,
    reactantPhase: 'ice',
    productPhase: 'any',
    params: [],
    derivedOnly: true,
  },
  'eley-rideal': {
    name: 'eley-rideal',
    description: 'non-diffusive: a gas particle landing on an ice species reacts with it at once (Jin & Garrod 2020; Garrod et al. 2022); derived with grain.eley_rideal',
    reactantCount: 2,
    reactantPhase: 'ice',
    productPhase: 'any',
    params: [],
    derivedOnly: true,
  },
  'photodissociation-induced': {
    name: 'photodissociation-induced',
    description: 'non-diffusive: a fragment of an ice photodissociation reacts at once with a neighbour (Jin & Garrod 2020); derived with grain.photodissociation_induced',
    reactantCount: 2,
    reactantPhase: 'ice',
    productPhase: 'any',
    params: [],
    derivedOnly: true,
  },
  'encounter-desorption': {
    name: 'encounter-desorption',
    description: 'H2(s) meeting H2(s) on the surface desorbs with the probability set by the 23 K binding of H2 on H2 (Hincelin et al. 2015); derived with grain.mantle',
    reactantCount: 2,
    reactantPhase: 'ice',
    productPhase: 'any',
    params: [],
    derivedOnly: true,
  },
};

export const RATE_LAW_NAMES = Object.keys(RATE_LAWS) as RateLawName[];

export function isRateLawName(s: string): s is RateLawName {
  return Object.prototype.hasOwnProperty.call(RATE_LAWS, s);
}
