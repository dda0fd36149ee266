/**
 * Rate coefficients of every reaction of a network for given physical
 * conditions (docs/physics.md sections 1-3). Coefficients are in number-density
 * units: s^-1 for one reactant, cm^3 s^-1 for two (the event rate per volume
 * is k n_i n_j); src/chem/system.ts folds them with n_H for fractional
 * abundances.
 */
import { encounterDesorptionProbability } from './encounter-desorption.ts';
import type { GrainOptions, PhysicalConditions } from '../config/conditions.ts';
import { UserError } from '../config/errors.ts';
import { CR_REFERENCE_RATE } from './constants.ts';
import { RATE_LAWS } from './laws.ts';
import { accretionRate } from './grain-accretion.ts';
import { h2FormationCoefficientHM79, HM79_HALF_EFFICIENCY_DUST_TEMPERATURE } from './grain-h2.ts';
import { crDesorptionRate, photodesorptionFlux, photodesorptionRate, thermalDesorptionRate, vibrationFrequency } from './grain-desorption.ts';
import { grainProperties, type GrainProperties } from './grain-properties.ts';
import {
  competingProbability,
  diffusionRate,
  hoppingRate,
  reactionProbability,
  reducedMass,
  surfaceReactionCoefficient,
} from './grain-surface.ts';
import { deriveReactions } from './derive.ts';
import type { Network, Reaction } from './network-types.ts';
import { NH_PER_AV } from './shielding.ts';
import type { Species } from './species.ts';
import { describeReaction, reactionLabel } from './reaction-text.ts';

/**
 * How a reaction enters the system. 'mass-action': event rate k times the
 * product of its reactants' densities. 'monolayer-photodesorption': the
 * first-order rate k below one monolayer, saturating to a fixed rate per grain
 * above it. 'parametric-h2': event rate k n_H n(H), using both listed H atoms.
 * 'h2-self-shielding': H2 photodissociation at k f(N(H2)) (Draine & Bertoldi 1996).
 * 'coverage': a non-diffusive reaction (src/chem/nondiffusive.ts), k times its
 * precursors times the partner's share of the surface; k is in s^-1 with one
 * precursor and cm^3 s^-1 with two.
 */
export type RateForm = 'mass-action' | 'monolayer-photodesorption' | 'parametric-h2' | 'h2-self-shielding' | 'coverage';

export interface ReactionRate {
  reaction: Reaction;
  /** s^-1 (one reactant, and photodesorption below a monolayer) or cm^3 s^-1 (two reactants, and the parametric H2 R_f). */
  k: number;
  form: RateForm;
  /** 'coverage' only: k = appear x follow, the parent's appearance coefficient (times the fresh species' multiplicity) and the follow-on probability. */
  parts?: { appear: number; follow: number };
}

export interface SkippedReaction {
  reaction: Reaction;
  reason: string;
}

export interface RateSet {
  rates: ReactionRate[];
  /** Reactions left out for these options (the other H2 route, helium accretion), each with why. */
  skipped: SkippedReaction[];
  /**
   * One note per value evaluated outside its valid range: a reaction whose gas
   * temperature was clamped, or an H2 formation treatment used at a dust
   * temperature where it no longer holds.
   */
  clampNotes: string[];
  grain: GrainProperties;
  /** Reactions the grain options derived from the network's own (ice photolysis, non-diffusive), indexed after them. */
  derived: Reaction[];
  /** What a derivation left out and why. */
  notes: string[];
  /** Column of H nuclei to the cloud edge, N_H = (N_H/A_V) A_V, cm^-2: N(H2) = x(H2) N_H for self-shielding. */
  columnToEdge: number;
}

export interface RateOptions {
  /** Shield the external-UV photodissociation of H2 by its own column (default true; Draine & Bertoldi 1996). */
  selfShielding?: boolean;
  /**
   * One Monte Carlo realization of the coefficients (src/chem/uncertainty.ts):
   * k of network reaction i is multiplied by multipliers[i]. Ice photolysis
   * takes its gas-phase parent's multiplier; the non-diffusive reactions take
   * their parent's multiplied coefficient; other derived reactions keep k.
   */
  multipliers?: Float64Array;
}

/** Gas species that do not stay on a grain: helium binds at about 100 K (docs/physics.md section 3). */
const NON_STICKING = new Set(['He']);

/**
 * The law's default yield. The condition `photodesorption_yield` is the yield
 * of a reaction that gives none; a reaction giving its own yield keeps its
 * ratio to the default, so the condition scales all photodesorption alike.
 */
const DEFAULT_PHOTODESORPTION_YIELD = RATE_LAWS.photodesorption.params.find((q) => q.name === 'yield')!.default!;

/** Species whose surface hopping may tunnel (HHL92: H and H2). */
const TUNNELLING_SPECIES = new Set(['H', 'H2']);

function where(r: Reaction): { file: string; line?: number; row?: number } {
  return { file: r.source.file, line: r.source.line, row: r.source.row };
}

/** The multiplier of a reaction in a realization: its own by index, its parent's for ice photolysis, 1 for what derives its rate otherwise. */
function drawnMultiplier(r: Reaction, multipliers: Float64Array): number {
  const owner = r.derived ? (r.derived.mechanism === 'ice-photolysis' ? r.derived.parents[0] : undefined) : r;
  if (!owner || owner.derived || owner.index >= multipliers.length) return 1;
  return multipliers[owner.index];
}

/** Modified Arrhenius (Kooij) k = alpha (T/300)^beta exp(-gamma/T); computeRates passes T already clamped to the reaction's [tmin, tmax] (common practice). */
export function arrheniusRate(alpha: number, beta: number, gamma: number, temperature: number): number {
  return alpha * Math.pow(temperature / 300, beta) * Math.exp(-gamma / temperature);
}

/** Direct cosmic-ray process and cosmic-ray induced UV (Prasad & Tarafdar 1983): k = alpha zeta / zeta_0. */
export function cosmicRayRate(alpha: number, crIonisationRate: number): number {
  return alpha * (crIonisationRate / CR_REFERENCE_RATE);
}

/** External UV photoreaction k = alpha G0 exp(-gamma A_V) (common practice). */
export function interstellarUvRate(alpha: number, gamma: number, uvField: number, visualExtinction: number): number {
  return alpha * uvField * Math.exp(-gamma * visualExtinction);
}

/** Per-species grain quantities, computed once per species on demand. */
class SurfaceData {
  private readonly nu0 = new Map<string, number>();
  constructor(
    private readonly network: Network,
    private readonly c: PhysicalConditions,
  ) {}

  species(name: string): Species {
    const i = this.network.speciesIndex.get(name);
    if (i === undefined) throw new Error(`species ${name} is not in network ${this.network.name}`);
    return this.network.species[i];
  }

  mass(name: string): number {
    const s = this.species(name);
    return this.network.speciesData.get(s.gasName)?.mass ?? s.mass;
  }

  bindingEnergy(name: string, r: Reaction): number {
    const s = this.species(name);
    const e = this.network.speciesData.get(s.gasName)?.bindingEnergy;
    if (e === undefined) {
      throw new UserError(
        `reaction ${describeReaction(r)} (${r.law}) needs the binding energy of ${s.gasName}, which the network does not give. Add binding_energy for ${s.gasName} to the species data of ${this.network.file}.`,
        where(r),
      );
    }
    return e;
  }

  vibrationFrequency(name: string, r: Reaction): number {
    let v = this.nu0.get(name);
    if (v === undefined) {
      v = vibrationFrequency(this.c.site_density, this.bindingEnergy(name, r), this.mass(name));
      this.nu0.set(name, v);
    }
    return v;
  }

  hop(name: string, r: Reaction, tunnelling: boolean): number {
    const s = this.species(name);
    const barrier = this.c.diffusion_ratio * this.bindingEnergy(name, r);
    const tunnelMass = tunnelling && TUNNELLING_SPECIES.has(s.gasName) ? this.mass(name) : undefined;
    return hoppingRate(this.vibrationFrequency(name, r), barrier, this.c.dust_temperature, tunnelMass);
  }
}

function gasNameKey(names: readonly string[], data: SurfaceData): string {
  return names
    .map((n) => data.species(n).gasName)
    .sort()
    .join(' ');
}

function isHPlusH(r: Reaction, data: SurfaceData): boolean {
  return r.reactants.length === 2 && r.reactants.every((n) => data.species(n).gasName === 'H');
}

/** H2 -> H + H by the external field: the reaction H2 shields itself from. */
function isH2Photodissociation(r: Reaction, data: SurfaceData): boolean {
  return r.reactants.length === 1 && r.reactants[0] === 'H2' && r.products.length === 2 && r.products.every((n) => data.species(n).name === 'H');
}

/**
 * Warning for the Hollenbach & McKee treatment used where its recombination
 * fraction has fallen below one half (docs/ice-h2-tunnelling.md). The surface
 * route's warning depends on the state and is given by the model run.
 */
function h2RangeNotes(grain: GrainOptions, dustTemperature: number): string[] {
  if (grain.h2Formation === 'hollenbach-mckee' && dustTemperature > HM79_HALF_EFFICIENCY_DUST_TEMPERATURE) {
    return [
      `H2 forms at the rate of Hollenbach & McKee 1979 (grain.h2_formation: hollenbach-mckee), whose recombination fraction is below one half above ${HM79_HALF_EFFICIENCY_DUST_TEMPERATURE.toFixed(0)} K dust: at ${dustTemperature} K the rate rests on the single site binding energy (600 K) of that treatment, not on measured surfaces.`,
    ];
  }
  return [];
}

/** Evaluate every reaction's coefficient (docs/physics.md sections 1-3). */
export function computeRates(network: Network, c: PhysicalConditions, grain: GrainOptions, options: RateOptions = {}): RateSet {
  const selfShielding = options.selfShielding ?? true;
  const props = grainProperties(c);
  const grainDensity = props.abundance * c.density;
  const data = new SurfaceData(network, c);
  const rates: ReactionRate[] = [];
  const skipped: SkippedReaction[] = [];
  const clampNotes: string[] = [];
  const flux = photodesorptionFlux(c.uv_field, c.visual_extinction, c.cr_ionisation_rate);
  const f = c.reactive_desorption;

  // Surface channels that have a reactive-desorption partner give up the share f to the gas.
  const desorbingChannels = new Set<string>();
  for (const r of network.reactions) {
    if (r.law === 'reactive-desorption') desorbingChannels.add(`${[...r.reactants].sort().join(' ')} > ${gasNameKey(r.products, data)}`);
  }

  /** Share of a surface channel's events: f for reactive desorption, 1 - f for a surface channel that has a desorbing partner. */
  const surfaceShare = (r: Reaction): number => {
    if (r.law === 'reactive-desorption') return f;
    return desorbingChannels.has(`${[...r.reactants].sort().join(' ')} > ${gasNameKey(r.products, data)}`) ? 1 - f : 1;
  };

  /**
   * Probability that a fresh species and its neighbour react by surface
   * reaction r before either hops away: the reaction-diffusion competition
   * (Garrod & Pauly 2011; used for the non-diffusive processes by Jin & Garrod
   * 2020: memory), times r's branching ratio and share.
   */
  const followOnProbability = (r: Reaction): number => {
    const [a, b] = r.reactants;
    const kappa = reactionProbability(r.params.activation_energy, c.dust_temperature, reducedMass(data.mass(a), data.mass(b)));
    const nu = Math.max(data.vibrationFrequency(a, r), data.vibrationFrequency(b, r));
    const p = competingProbability(kappa, nu, data.hop(a, r, grain.tunnelling), data.hop(b, r, grain.tunnelling));
    return p * r.params.branching * surfaceShare(r);
  };

  const surfaceCoefficient = (r: Reaction): number => {
    const [a, b] = r.reactants;
    const same = a === b;
    const hopA = data.hop(a, r, grain.tunnelling);
    const hopB = same ? hopA : data.hop(b, r, grain.tunnelling);
    let kappa = reactionProbability(r.params.activation_energy, c.dust_temperature, reducedMass(data.mass(a), data.mass(b)));
    if (grain.diffusionCompetition) {
      const nu = Math.max(data.vibrationFrequency(a, r), data.vibrationFrequency(b, r));
      kappa = competingProbability(kappa, nu, hopA, hopB);
    }
    const k = surfaceReactionCoefficient(kappa, diffusionRate(hopA, props.sitesPerGrain), diffusionRate(hopB, props.sitesPerGrain), same, grainDensity);
    return k * r.params.branching;
  };

  const { reactions: derived, notes } = deriveReactions(network, grain);

  /** The coefficient each evaluated reaction got, for the non-diffusive reactions derived from it. */
  const coefficient = new Map<Reaction, number>();
  for (const r of [...network.reactions, ...derived]) {
    const before = rates.length;
    const p = r.params;
    switch (r.law) {
      case 'arrhenius': {
        let t = c.gas_temperature;
        if (t < r.tmin || t > r.tmax) {
          const clamped = Math.min(Math.max(t, r.tmin), r.tmax);
          clampNotes.push(
            `reaction ${r.index + 1} (${describeReaction(r)}): gas temperature ${t} K is outside its valid range ${r.tmin}-${r.tmax} K; evaluated at ${clamped} K`,
          );
          t = clamped;
        }
        rates.push({ reaction: r, k: arrheniusRate(p.alpha, p.beta, p.gamma, t), form: 'mass-action' });
        break;
      }
      case 'cosmic-ray':
      case 'cosmic-ray-uv':
        rates.push({ reaction: r, k: cosmicRayRate(p.alpha, c.cr_ionisation_rate), form: 'mass-action' });
        break;
      case 'interstellar-uv': {
        const shielded = selfShielding && isH2Photodissociation(r, data);
        rates.push({ reaction: r, k: interstellarUvRate(p.alpha, p.gamma, c.uv_field, c.visual_extinction), form: shielded ? 'h2-self-shielding' : 'mass-action' });
        break;
      }
      case 'accretion': {
        const s = data.species(r.reactants[0]);
        if (NON_STICKING.has(s.gasName)) {
          skipped.push({ reaction: r, reason: `${s.gasName} does not stay on grains (binding about 100 K, docs/physics.md section 3): accretion left out` });
          break;
        }
        rates.push({ reaction: r, k: accretionRate(p.sticking, props.crossSection, c.gas_temperature, data.mass(r.reactants[0]), grainDensity), form: 'mass-action' });
        break;
      }
      case 'thermal-desorption': {
        const name = r.reactants[0];
        rates.push({ reaction: r, k: thermalDesorptionRate(data.vibrationFrequency(name, r), data.bindingEnergy(name, r), c.dust_temperature), form: 'mass-action' });
        break;
      }
      case 'cr-desorption': {
        const name = r.reactants[0];
        rates.push({ reaction: r, k: crDesorptionRate(data.vibrationFrequency(name, r), data.bindingEnergy(name, r), c.cr_ionisation_rate), form: 'mass-action' });
        break;
      }
      case 'photodesorption': {
        const y = p.yield * (c.photodesorption_yield / DEFAULT_PHOTODESORPTION_YIELD);
        rates.push({ reaction: r, k: photodesorptionRate(y, flux, props.crossSection, props.sitesPerGrain), form: 'monolayer-photodesorption' });
        break;
      }
      case 'surface':
      case 'reactive-desorption': {
        if (grain.h2Formation !== 'surface' && isHPlusH(r, data)) {
          skipped.push({ reaction: r, reason: `H2 forms at a rate per striking H atom (grain.h2_formation: ${grain.h2Formation}): the surface H + H route is left out` });
          break;
        }
        rates.push({ reaction: r, k: surfaceCoefficient(r) * surfaceShare(r), form: 'mass-action' });
        break;
      }
      case 'ice-cosmic-ray-uv':
        rates.push({ reaction: r, k: cosmicRayRate(p.alpha, c.cr_ionisation_rate), form: 'mass-action' });
        break;
      case 'ice-interstellar-uv':
        rates.push({ reaction: r, k: interstellarUvRate(p.alpha, p.gamma, c.uv_field, c.visual_extinction), form: 'mass-action' });
        break;
      case 'three-body':
      case 'eley-rideal':
      case 'photodissociation-induced': {
        const [parent, follow] = r.derived!.parents;
        const parentRate = coefficient.get(parent);
        if (parentRate === undefined || !coefficient.has(follow)) {
          skipped.push({ reaction: r, reason: 'its parent or follow-on reaction is left out for these options' });
          break;
        }
        const appear = parentRate * r.derived!.multiplicity!;
        const probability = followOnProbability(follow);
        rates.push({ reaction: r, k: appear * probability, form: 'coverage', parts: { appear, follow: probability } });
        break;
      }
      case 'encounter-desorption': {
        // Encounters of identical partners (HHL92 pair convention) times the desorption probability on H2 (Hincelin et al. 2015).
        const name = r.reactants[0];
        const hop = data.hop(name, r, grain.tunnelling);
        const p = encounterDesorptionProbability(c.dust_temperature, c.diffusion_ratio);
        rates.push({ reaction: r, k: surfaceReactionCoefficient(p, diffusionRate(hop, props.sitesPerGrain), 0, true, grainDensity), form: 'mass-action' });
        break;
      }
      case 'parametric-h2':
        if (grain.h2Formation === 'surface') {
          skipped.push({ reaction: r, reason: 'H2 forms on the surface (grain.h2_formation: surface): the parametric rate is left out' });
          break;
        }
        rates.push({
          reaction: r,
          k:
            grain.h2Formation === 'parametric'
              ? p.alpha
              : h2FormationCoefficientHM79(c.gas_temperature, c.dust_temperature, props.crossSection * props.abundance, data.mass(r.reactants[0])),
          form: 'parametric-h2',
        });
        break;
      default: {
        const never: never = r.law;
        throw new Error(`no rate for law ${String(never)}`);
      }
    }
    if (rates.length > before) {
      if (options.multipliers) rates[before].k *= drawnMultiplier(r, options.multipliers);
      coefficient.set(r, rates[before].k);
    }
  }
  clampNotes.push(...h2RangeNotes(grain, c.dust_temperature));
  // A coefficient that overflows at these conditions would stop the solver at t = 0 without a name.
  for (const { reaction: r, k } of rates) {
    if (!Number.isFinite(k)) {
      throw new UserError(
        `${r.derived ? reactionLabel(r) : `reaction ${r.index + 1} (${describeReaction(r)}, ${r.law})`}: the rate coefficient is ${k} at these conditions (gas temperature ${c.gas_temperature} K, dust temperature ${c.dust_temperature} K, zeta ${c.cr_ionisation_rate} s^-1, G0 ${c.uv_field}, A_V ${c.visual_extinction} mag). Check its parameters; 'hoarfrost network check' evaluates every coefficient over its temperature range.`,
        where(r),
      );
    }
  }
  return { rates, skipped, clampNotes, derived, notes, grain: props, columnToEdge: NH_PER_AV * c.visual_extinction };
}
