/**
 * Bounds on two-body gas-phase rate coefficients, for `network check`.
 *
 * A two-body coefficient is at most the capture rate of the pair. Between
 * heavy particles that is the Langevin rate of an ion and a polarisable
 * neutral, about 1e-9 to 2e-9 cm^3 s^-1 independent of temperature
 * (Gioumousis & Stevenson 1958, J. Chem. Phys. 29, 294), raised for a polar
 * neutral at low temperature to a few 1e-8, about 1e-7 at most at 10 K
 * (Su & Chesnavich 1982, J. Chem. Phys. 76, 5183; memory for the figure).
 * Neutral-neutral reactions stay at or below gas-kinetic rates, about
 * 1e-10 cm^3 s^-1 (common practice). HEAVY_RATE_BOUND, 1e-6, is ten times
 * the largest of these; the default network's largest is 5e-8 (H3+ + NH3 at
 * 10 K). Electrons move about 200 times faster than heavy partners at one
 * temperature, and Coulomb focusing raises dissociative recombination to
 * about 1e-6 cm^3 s^-1 at 10 K (Florescu-Mitchell & Mitchell 2006, Phys.
 * Rep. 430, 277; memory for the figure): ELECTRON_RATE_BOUND, 1e-4, is a
 * hundred times that (the default network's largest is 6e-6, NH4+ + e- at
 * 10 K). A value past a bound is a slip of an exponent or a unit, not
 * chemistry.
 */
import { arrheniusRate } from './rates.ts';
import type { Reaction } from './network-types.ts';

export const HEAVY_RATE_BOUND = 1e-6;
export const ELECTRON_RATE_BOUND = 1e-4;

/** Temperatures sampled per reaction, evenly in log T over [tmin, tmax] (both ends included). */
const SAMPLES = 64;

export interface RateBoundProblem {
  kind: 'rate-not-finite' | 'rate-above-bound';
  message: string;
}

function label(r: Reaction): string {
  return `${r.reactants.join(' + ')} -> ${r.products.join(' + ')} (${r.law})`;
}

/**
 * The first temperature of a two-body gas reaction's own range where its
 * coefficient is not finite or passes the bound; undefined when none does.
 * One-body laws need no check here: their parameters are finite (the loader
 * refuses others) and the conditions only scale them.
 */
export function rateBoundProblem(r: Reaction): RateBoundProblem | undefined {
  if (r.law !== 'arrhenius' || !(r.tmin <= r.tmax) || r.tmin <= 0) return undefined;
  const electron = r.reactants.includes('e-');
  const bound = electron ? ELECTRON_RATE_BOUND : HEAVY_RATE_BOUND;
  const ratio = r.tmax / r.tmin;
  for (let i = 0; i <= SAMPLES; i++) {
    const t = i === SAMPLES ? r.tmax : r.tmin * Math.pow(ratio, i / SAMPLES);
    const k = arrheniusRate(r.params.alpha, r.params.beta, r.params.gamma, t);
    const at = `${Number(t.toPrecision(4))} K`;
    if (!Number.isFinite(k)) {
      return { kind: 'rate-not-finite', message: `${label(r)}: k is not finite (${k}) at ${at}, inside its range [${r.tmin}, ${r.tmax}] K; check alpha, beta and gamma (k = alpha (T/300)^beta exp(-gamma/T)).` };
    }
    if (k > bound) {
      const which = electron ? 'about a hundred times the dissociative recombination of ions at 10 K (Florescu-Mitchell & Mitchell 2006)' : 'ten times the largest capture rate of two heavy particles (Langevin, Gioumousis & Stevenson 1958; ion-dipole, Su & Chesnavich 1982)';
      return { kind: 'rate-above-bound', message: `${label(r)}: k = ${Number(k.toPrecision(3))} cm^3 s^-1 at ${at} exceeds ${bound.toExponential()} cm^3 s^-1, ${which}; check alpha (cm^3 s^-1 at 300 K), beta and gamma for a slipped exponent or unit.` };
    }
  }
  return undefined;
}
