/**
 * Rate-coefficient uncertainty factors and their Monte Carlo draws
 * (docs/physics.md section 13; docs/uncertainty.md).
 *
 * Each reaction's coefficient is uncertain by a factor F, taken as
 * log-normal: log10 k' = log10 k + eps log10 F, eps ~ N(0, 1), so F is the
 * one-standard-deviation factor (Wakelam et al. 2005, A&A 444, 883; Wakelam,
 * Herbst & Selsis 2006, A&A 451, 551). A reaction may give its own F
 * (`uncertainty_factor`); otherwise its law's default below applies.
 *
 * A realization draws every reaction once. The draw of reaction i in
 * realization r is a pure function of (seed, r, i): a counter-based
 * generator (sha256 of the three numbers), so it does not depend on which
 * worker or shard runs the model, nor on the order models are run in.
 */
import { createHash } from 'node:crypto';
import type { RateLawName } from './laws.ts';
import type { Network, Reaction } from './network-types.ts';

export interface DefaultFactor {
  factor: number;
  origin: string;
}

/**
 * The factor of a reaction that gives none, by rate law. Derived-only laws
 * (three-body, eley-rideal, photodissociation-induced, encounter-desorption)
 * draw nothing of their own: the non-diffusive ones take their parent's
 * drawn coefficient (src/chem/rates.ts), encounter desorption is left fixed.
 */
export const DEFAULT_UNCERTAINTY_FACTORS: Readonly<Record<RateLawName, DefaultFactor>> = {
  arrhenius: { factor: 2, origin: 'memory: physics.md section 13 gives 1.25 (measured ion-molecule) to 2-10 (estimated neutral-neutral); 2 for a reaction whose own F is not given' },
  'cosmic-ray': { factor: 2, origin: 'memory: direct cosmic-ray processes scale with an ionisation rate itself uncertain by a factor of a few' },
  'cosmic-ray-uv': { factor: 2, origin: 'memory: efficiencies of the cosmic-ray induced UV (Prasad & Tarafdar 1983 mechanism) are computed, not measured' },
  'interstellar-uv': { factor: 2, origin: 'memory: photorates in the interstellar field are computed from cross sections, a factor of about 2' },
  accretion: { factor: 1.5, origin: 'memory: kinetic-theory collision rate, uncertain through the grain size distribution and sticking' },
  'thermal-desorption': { factor: 3, origin: 'memory: exponential in a binding energy known to some 10-30 % (grain processes 2-10, physics.md section 13)' },
  'cr-desorption': { factor: 3, origin: 'memory: Hasegawa & Herbst 1993 estimate, grain processes 2-10 (physics.md section 13)' },
  photodesorption: { factor: 3, origin: 'memory: measured yields differ by factors of a few between species and experiments (Oberg et al. 2009 order)' },
  surface: { factor: 3, origin: 'memory: diffusion barriers and reaction barriers on ice, grain processes 2-10 (physics.md section 13)' },
  'reactive-desorption': { factor: 3, origin: 'memory: the desorbing share is known to an order of magnitude at best; 3 as for its surface partner' },
  'parametric-h2': { factor: 2, origin: 'memory: Jura 1975 rate derived from observed H2 columns, a factor of about 2' },
  'ice-interstellar-uv': { factor: 3, origin: 'memory: ice photorates are the gas-phase rates times a model choice (physics.md section 10)' },
  'ice-cosmic-ray-uv': { factor: 3, origin: 'memory: as ice-interstellar-uv' },
  'three-body': { factor: 1, origin: 'derived: takes its parent reaction\'s drawn coefficient, no draw of its own' },
  'eley-rideal': { factor: 1, origin: 'derived: takes its parent reaction\'s drawn coefficient, no draw of its own' },
  'photodissociation-induced': { factor: 1, origin: 'derived: takes its parent reaction\'s drawn coefficient, no draw of its own' },
  'encounter-desorption': { factor: 1, origin: 'derived: fixed by the H2-on-H2 binding (Hincelin et al. 2015); no draw' },
};

/** The factor F of a reaction: its own, or its law's default. */
export function uncertaintyFactor(r: Reaction): number {
  return r.uncertaintyFactor ?? DEFAULT_UNCERTAINTY_FACTORS[r.law].factor;
}

/** One realization of the network: which seed and which draw. */
export interface RateDraw {
  seed: number;
  /** 0-based realization number. */
  realization: number;
}

/** Uniform numbers in (0, 1) from a 64-bit slice of a digest: 52 bits, never 0 or 1. */
function uniformAt(digest: Buffer, offset: number): number {
  const hi = digest.readUInt32BE(offset) >>> 6; // 26 bits
  const lo = digest.readUInt32BE(offset + 4) >>> 6; // 26 bits
  return (hi * 67108864 + lo + 0.5) / 4503599627370496;
}

/**
 * The standard normal deviate eps of reaction `index` in a realization:
 * Box-Muller on two uniforms from sha256("hoarfrost-rate-draw", seed, r, index).
 */
export function standardNormalDraw(seed: number, realization: number, index: number): number {
  const digest = createHash('sha256').update(`hoarfrost-rate-draw-v1 ${seed} ${realization} ${index}`).digest();
  const u1 = uniformAt(digest, 0);
  const u2 = uniformAt(digest, 8);
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/**
 * The deviates eps of every reaction of the network file (by index) in one
 * realization, and the multiplicative factors F^eps they apply to k.
 */
export function drawRateFactors(network: Pick<Network, 'reactions'>, draw: RateDraw): { epsilon: Float64Array; multipliers: Float64Array } {
  const n = network.reactions.length;
  const epsilon = new Float64Array(n);
  const multipliers = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = network.reactions[i];
    const f = uncertaintyFactor(r);
    // F = 1 draws nothing: the coefficient stays exactly k (no rounding through pow).
    const eps = f === 1 ? 0 : standardNormalDraw(draw.seed, draw.realization, r.index);
    epsilon[i] = eps;
    multipliers[i] = f === 1 ? 1 : Math.pow(10, eps * Math.log10(f));
  }
  return { epsilon, multipliers };
}

/** The reactions of a network left at their law's default factor. */
export function reactionsAtDefaultFactor(network: Pick<Network, 'reactions'>): Reaction[] {
  return network.reactions.filter((r) => r.uncertaintyFactor === undefined && DEFAULT_UNCERTAINTY_FACTORS[r.law].factor !== 1);
}
