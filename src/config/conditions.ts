/**
 * Physical condition names: the same in pipeline files, `--set` and outputs
 * (snake_case, fixed units). Defaults carry their origin.
 */
export interface ConditionInfo {
  unit: string;
  description: string;
  default: number;
  /** Smallest allowed value and whether it is allowed itself. */
  min: number;
  minInclusive: boolean;
  max?: number;
  origin: string;
}

export const CONDITIONS = {
  density: { unit: 'cm^-3', description: 'density of hydrogen nuclei n_H', default: 2e4, min: 0, minInclusive: false, origin: 'dark-cloud core value, common practice' },
  gas_temperature: { unit: 'K', description: 'gas kinetic temperature', default: 10, min: 0, minInclusive: false, origin: 'common practice' },
  dust_temperature: { unit: 'K', description: 'dust grain temperature', default: 10, min: 0, minInclusive: false, origin: 'common practice' },
  visual_extinction: { unit: 'mag', description: 'visual extinction A_V to the cloud edge', default: 10, min: 0, minInclusive: true, origin: 'common practice' },
  cr_ionisation_rate: { unit: 's^-1', description: 'cosmic-ray ionisation rate of H2, zeta', default: 1.3e-17, min: 0, minInclusive: true, origin: 'common practice (zeta_0)' },
  uv_field: { unit: 'G0', description: 'external UV field in Habing units', default: 1, min: 0, minInclusive: true, origin: 'common practice' },
  diffusion_ratio: { unit: '', description: 'diffusion-to-desorption energy ratio chi = E_b/E_D', default: 0.5, min: 0, minInclusive: false, max: 1, origin: 'memory: 0.3-0.8 in the literature, 0.5 a common default' },
  grain_radius: { unit: 'um', description: 'grain radius a', default: 0.1, min: 0, minInclusive: false, origin: 'common practice' },
  dust_to_gas: { unit: '', description: 'dust-to-gas mass ratio', default: 0.01, min: 0, minInclusive: false, origin: 'common practice' },
  reactive_desorption: { unit: '', description: 'fraction of surface-reaction products released to the gas', default: 0.01, min: 0, minInclusive: true, max: 1, origin: 'memory: order used by Garrod, Wakelam & Herbst 2007' },
  grain_density: { unit: 'g cm^-3', description: 'grain material density rho_gr', default: 3, min: 0, minInclusive: false, origin: 'common practice' },
  site_density: { unit: 'cm^-2', description: 'surface site density N_s', default: 1.5e15, min: 0, minInclusive: false, origin: 'Hasegawa, Herbst & Leung 1992' },
  photodesorption_yield: { unit: 'molecules/photon', description: 'default UV photodesorption yield Y', default: 1e-3, min: 0, minInclusive: true, origin: 'memory: order of Oberg et al. 2009' },
} as const satisfies Record<string, ConditionInfo>;

export type ConditionName = keyof typeof CONDITIONS;
export const CONDITION_NAMES = Object.keys(CONDITIONS) as ConditionName[];

export type PhysicalConditions = Record<ConditionName, number>;

/** Switches of the grain model that are not numbers on a grid axis. */
export interface GrainOptions {
  /** Quantum tunnelling of H and H2 for surface hopping (HHL92). */
  tunnelling: boolean;
  /** Reaction-diffusion competition for barriers (Chang, Cuppen & Herbst 2007). */
  diffusionCompetition: boolean;
  /**
   * 'surface': physisorbed H(s) + H(s) (up to about 15 K dust); 'parametric':
   * R_f n_H n(H) with Jura's (1975) constant R_f; 'hollenbach-mckee': the same
   * form with R_f from the H sticking law and recombination fraction of
   * Hollenbach & McKee 1979 (warmer dust).
   */
  h2Formation: 'surface' | 'parametric' | 'hollenbach-mckee';
  /** Three-body mechanism: a product of a surface reaction reacts at once with a neighbour (Jin & Garrod 2020). */
  threeBody: boolean;
  /** Eley-Rideal: a landing gas particle reacts at once with the ice species it lands on (Jin & Garrod 2020; Garrod et al. 2022). */
  eleyRideal: boolean;
  /** Photodissociation-induced reactions: an ice photolysis fragment reacts at once with a neighbour (Jin & Garrod 2020). */
  photodissociationInduced: boolean;
  /** Ice photolysis by external and cosmic-ray induced UV, derived from the network's gas-phase photoreactions. */
  icePhotolysis: boolean;
  /** Ice photolysis rate over its gas-phase counterpart (model choice; default 1, memory: see ICE_PHOTOLYSIS_FACTOR). */
  icePhotolysisFactor: number;
  /**
   * Three-phase ice: a reactive surface over an inert bulk mantle, with
   * surface-to-mantle transfer as the ice grows and back as it erodes
   * (Hasegawa & Herbst 1993; Garrod & Pauly 2011; docs/ice-mantle.md).
   */
  mantle: boolean;
  /** Monolayers that make the reactive surface when the mantle is on. */
  surfaceLayers: number;
}

/**
 * Ice photodissociation rate as a multiple of the gas-phase rate: a model
 * choice. 1 (memory: Garrod, Widicus Weaver & Herbst 2008, ApJ 682, 283, and
 * the three-phase models after it take the gas-phase rates for the ice).
 */
export const ICE_PHOTOLYSIS_FACTOR = 1;

/**
 * Monolayers of the reactive surface: the outermost layer alone, as in
 * Hasegawa & Herbst (1993) and Garrod & Pauly (2011) (memory: the papers'
 * text was not at hand to re-check).
 */
export const DEFAULT_SURFACE_LAYERS = 1;

export const DEFAULT_GRAIN_OPTIONS: GrainOptions = {
  tunnelling: false,
  diffusionCompetition: false,
  h2Formation: 'surface',
  threeBody: false,
  eleyRideal: false,
  photodissociationInduced: false,
  icePhotolysis: false,
  icePhotolysisFactor: ICE_PHOTOLYSIS_FACTOR,
  mantle: false,
  surfaceLayers: DEFAULT_SURFACE_LAYERS,
};

/** Switches of the gas-phase photochemistry (the pipeline's `photochemistry:` section). */
export interface PhotochemistryOptions {
  /** H2 photodissociation shielded by the H2 column (Draine & Bertoldi 1996). */
  h2SelfShielding: boolean;
}

export function defaultConditions(): PhysicalConditions {
  const c = {} as PhysicalConditions;
  for (const name of CONDITION_NAMES) c[name] = CONDITIONS[name].default;
  return c;
}

export function isConditionName(s: string): s is ConditionName {
  return Object.prototype.hasOwnProperty.call(CONDITIONS, s);
}

/** Returns a sentence saying what is wrong with a value, or undefined when it is acceptable. */
export function checkConditionValue(name: ConditionName, value: number): string | undefined {
  const info: ConditionInfo = CONDITIONS[name];
  if (!Number.isFinite(value)) return `${name} must be a finite number, found ${value}`;
  if (info.minInclusive ? value < info.min : value <= info.min) {
    return `${name} must be ${info.minInclusive ? 'at least' : 'greater than'} ${info.min}${info.unit ? ' ' + info.unit : ''}, found ${value}`;
  }
  if (info.max !== undefined && value > info.max) return `${name} must be at most ${info.max}, found ${value}`;
  return undefined;
}
