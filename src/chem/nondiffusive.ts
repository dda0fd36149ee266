/**
 * Non-diffusive surface chemistry (Jin & Garrod 2020, ApJS 249, 26; Garrod
 * et al. 2022, ApJS 259, 1; formulas recalled from the papers, "memory":
 * their full text was not at hand to re-check). A species that has just
 * appeared on the grain may react at once with a species in a neighbouring
 * site, without diffusing:
 *
 * - three-body (3-B): C made by a surface reaction A + B -> C reacts with a
 *   neighbour D by each surface reaction C + D -> E of the network;
 * - Eley-Rideal (ER): a gas particle X landing on a site held by D reacts by
 *   each surface reaction X(s) + D -> E;
 * - photodissociation-induced (PDI): a fragment F of an ice photodissociation
 *   Y(s) -> F + G reacts with a neighbour D by each F + D -> E.
 *
 * In every case the rate is (the rate at which the fresh species appears) x
 * (the fraction of surface sites around it held by D) x (the probability that
 * the pair reacts before either moves away):
 *
 *   R = R_appear(C) theta_D f_act,  theta_D = N(D) / N_sites.
 *
 * R_appear is the parent's rate (k_AB n_A n_B for 3-B, k_acc n_X for ER,
 * k_photo n_Y for PDI). f_act is the reaction-diffusion competition
 * nu kappa / (nu kappa + k_hop,C + k_hop,D) with kappa the barrier or
 * tunnelling probability of HHL92 (the form of Garrod & Pauly 2011 that Jin &
 * Garrod use for these processes: memory), times the follow-on reaction's
 * branching ratio and its surface/reactive-desorption share.
 *
 * Coverage: the papers divide by N_S, the sites of one monolayer, with a
 * surface of about one monolayer over an inert mantle (their three-phase
 * model). A two-phase ice holds every ice species "on the surface", many
 * monolayers thick, where N(D)/N_S would exceed 1 and the follow-on reactions
 * would use up more fresh species than appear. So theta_D is the share of the
 * outer layer held by D in a well-mixed ice, as for photodesorption:
 * N(D) / max(N_sites, N_ice), with N_ice the total of the reactive ice. With
 * a surface held at a fixed number of monolayers this is the papers'
 * N(D)/N_S; it makes the terms non-mass-action (they depend on the ice
 * total), so they are their own terms with an exact Jacobian and are named in
 * --emit-system's `omitted`.
 *
 * What is used up: the fresh species C and its partner D (C's own formation
 * is counted by the parent reaction, which keeps its full rate); the derived
 * reaction is written with the parent's reactants (A + B + D -> ...) so that
 * it reads as one event and balances, while the system applies -C -D +E.
 * Only the products of the network's own reactions react on this way (one
 * generation; products of derived reactions do not).
 */
import type { Network, Reaction } from './network-types.ts';
import type { NonMassActionTerm } from './system.ts';
import { describeReaction } from './reaction-text.ts';
import { iceName, parseSpecies } from './species.ts';

export interface NonDiffusiveSwitches {
  threeBody: boolean;
  eleyRideal: boolean;
  photodissociationInduced: boolean;
}

/** Surface reactions that can follow on, with each ice reactant as the fresh species. */
function followOns(network: Network): Map<string, { reaction: Reaction; partner: string }[]> {
  const byFresh = new Map<string, { reaction: Reaction; partner: string }[]>();
  for (const r of network.reactions) {
    if (r.law !== 'surface' && r.law !== 'reactive-desorption') continue;
    const [a, b] = r.reactants;
    const add = (fresh: string, partner: string): void => {
      const list = byFresh.get(fresh) ?? [];
      list.push({ reaction: r, partner });
      byFresh.set(fresh, list);
    };
    add(a, b);
    if (b !== a) add(b, a);
  }
  return byFresh;
}

/** Remove one occurrence of `name` from a list. */
function withoutOne(list: readonly string[], name: string): string[] {
  const out = [...list];
  out.splice(out.indexOf(name), 1);
  return out;
}

function multiplicity(list: readonly string[], name: string): number {
  return list.filter((n) => n === name).length;
}

/**
 * Derive the non-diffusive reactions the switches ask for.
 * @param photolysis ice photodissociation channels (the network's own and derived ones): the parents of PDI
 * @param firstIndex index of the first derived reaction
 */
export function deriveNonDiffusive(network: Network, switches: NonDiffusiveSwitches, photolysis: readonly Reaction[], firstIndex: number): Reaction[] {
  const follow = followOns(network);
  const out: Reaction[] = [];
  const make = (mechanism: 'three-body' | 'eley-rideal' | 'photodissociation-induced', parent: Reaction, precursors: string[], others: string[], fresh: string, f: { reaction: Reaction; partner: string }, m: number): void => {
    const reactants = [...precursors, f.partner];
    const products = [...others, ...f.reaction.products];
    const first = mechanism === 'eley-rideal' ? `${parent.reactants[0]} lands on ${f.partner}` : `${describeReaction(parent)}`;
    const label = `${mechanism} (${first}, then ${describeReaction(f.reaction)}${f.reaction.law === 'reactive-desorption' ? ' [reactive desorption]' : ''})`;
    out.push({
      index: firstIndex + out.length,
      reactants,
      products,
      law: mechanism,
      params: {},
      tmin: parent.tmin,
      tmax: parent.tmax,
      origin: `derived (${label}); rate after Jin & Garrod 2020 (memory)`,
      source: f.reaction.source,
      derived: { mechanism, parents: [parent, f.reaction], fresh, partner: f.partner, produces: f.reaction.products, multiplicity: m, label },
    });
  };
  const freshProducts = (parent: Reaction, mechanism: 'three-body' | 'photodissociation-induced'): void => {
    for (const fresh of new Set(parent.products)) {
      if (parseSpecies(fresh).phase !== 'ice') continue;
      for (const f of follow.get(fresh) ?? []) make(mechanism, parent, [...parent.reactants], withoutOne(parent.products, fresh), fresh, f, multiplicity(parent.products, fresh));
    }
  };
  for (const r of network.reactions) {
    if (switches.threeBody && r.law === 'surface') freshProducts(r, 'three-body');
    if (switches.eleyRideal && r.law === 'accretion') {
      const landed = iceName(r.reactants[0]);
      for (const f of follow.get(landed) ?? []) make('eley-rideal', r, [r.reactants[0]], [], landed, f, 1);
    }
  }
  if (switches.photodissociationInduced) for (const p of photolysis) freshProducts(p, 'photodissociation-induced');
  return out;
}

/**
 * The non-diffusive reactions of one fresh species, compiled. Every parent
 * that makes it (3-B, ER and PDI alike) combines with every follow-on
 * reaction, so the rates factorise: rate(s, j) = A_s x_partner(j) p_j /
 * max(x_ML, x_ice) with A_s the sum over parents of their appearance rates.
 * Evaluating the sum once per fresh species keeps the cost at parents +
 * follow-ons instead of their product.
 */
export interface FreshGroup {
  /** Per parent: the coefficient of its appearance rate (rate per H = k prod x_precursors) and its precursors. */
  sources: { k: number; precursors: Int32Array }[];
  /** Per follow-on reaction: partner, probability, and the species it changes by how much (-fresh -partner +products). */
  followers: { partner: number; p: number; rows: Int32Array; signs: Float64Array }[];
}

/**
 * Every non-diffusive reaction as one term: they share the ice total that sets
 * the coverage, so the derivatives with respect to every ice species are
 * summed per row once.
 */
export class CoverageTerms implements NonMassActionTerm {
  readonly entries: [number, number][] = [];
  /** Sources of group g: [sourceStart[g], sourceStart[g+1]); precursors of source s: [precStart[s], precStart[s+1]). */
  private readonly sourceStart: Int32Array;
  private readonly sourceK: Float64Array;
  private readonly precStart: Int32Array;
  private readonly prec: Int32Array;
  /** Followers of group g: [followStart[g], followStart[g+1]); rows of follower j: [rowStart[j], rowStart[j+1]). */
  private readonly followStart: Int32Array;
  private readonly partner: Int32Array;
  private readonly p: Float64Array;
  private readonly rowStart: Int32Array;
  private readonly rows: Int32Array;
  private readonly signs: Float64Array;
  private readonly rowSlot: Int32Array;
  private readonly distinctRows: Int32Array;
  private readonly cross: Float64Array;
  /** Appearance rate of each group, and d(appearance)/d(precursor slot). */
  private readonly appear: Float64Array;
  private readonly appearSlope: Float64Array;
  /** Value positions: per follower row, the partner then every precursor slot of its group; then distinct rows x ice species. */
  private rowPos: Int32Array = new Int32Array(0);
  private icePos: Int32Array = new Int32Array(0);

  constructor(
    readonly name: string,
    groups: readonly FreshGroup[],
    private readonly monolayer: number,
    private readonly iceSpecies: Int32Array,
  ) {
    const ng = groups.length;
    this.sourceStart = new Int32Array(ng + 1);
    this.followStart = new Int32Array(ng + 1);
    const sourceK: number[] = [];
    const precStart: number[] = [0];
    const prec: number[] = [];
    const partner: number[] = [];
    const p: number[] = [];
    const rowStart: number[] = [0];
    const rows: number[] = [];
    const signs: number[] = [];
    groups.forEach((g, q) => {
      for (const src of g.sources) {
        sourceK.push(src.k);
        prec.push(...src.precursors);
        precStart.push(prec.length);
      }
      this.sourceStart[q + 1] = sourceK.length;
      for (const f of g.followers) {
        partner.push(f.partner);
        p.push(f.p);
        rows.push(...f.rows);
        signs.push(...f.signs);
        rowStart.push(rows.length);
      }
      this.followStart[q + 1] = partner.length;
    });
    this.sourceK = Float64Array.from(sourceK);
    this.precStart = Int32Array.from(precStart);
    this.prec = Int32Array.from(prec);
    this.partner = Int32Array.from(partner);
    this.p = Float64Array.from(p);
    this.rowStart = Int32Array.from(rowStart);
    this.rows = Int32Array.from(rows);
    this.signs = Float64Array.from(signs);
    const distinct = [...new Set(rows)];
    const slotOf = new Map(distinct.map((r, i) => [r, i]));
    this.distinctRows = Int32Array.from(distinct);
    this.rowSlot = Int32Array.from(rows, (r) => slotOf.get(r)!);
    this.cross = new Float64Array(distinct.length);
    this.appear = new Float64Array(ng);
    this.appearSlope = new Float64Array(prec.length);
    for (let g = 0; g < ng; g++) {
      const firstPrec = this.precStart[this.sourceStart[g]];
      const lastPrec = this.precStart[this.sourceStart[g + 1]];
      for (let j = this.followStart[g]; j < this.followStart[g + 1]; j++) {
        for (let r = this.rowStart[j]; r < this.rowStart[j + 1]; r++) {
          this.entries.push([this.rows[r], this.partner[j]]);
          for (let a = firstPrec; a < lastPrec; a++) this.entries.push([this.rows[r], this.prec[a]]);
        }
      }
    }
    for (const row of distinct) for (const col of iceSpecies) this.entries.push([row, col]);
  }

  bind(positions: Int32Array): void {
    const split = positions.length - this.distinctRows.length * this.iceSpecies.length;
    this.rowPos = positions.subarray(0, split);
    this.icePos = positions.subarray(split);
  }

  private iceTotal(y: Float64Array): number {
    let s = 0;
    const idx = this.iceSpecies;
    for (let q = 0; q < idx.length; q++) s += y[idx[q]];
    return s;
  }

  /** Appearance rate of every group (and, with slopes, its derivative per precursor slot). */
  private appearance(y: Float64Array, slopes: boolean): void {
    for (let g = 0; g < this.appear.length; g++) {
      let sum = 0;
      for (let s = this.sourceStart[g]; s < this.sourceStart[g + 1]; s++) {
        const first = this.precStart[s];
        const last = this.precStart[s + 1];
        let rate = this.sourceK[s];
        for (let a = first; a < last; a++) rate *= y[this.prec[a]];
        sum += rate;
        if (!slopes) continue;
        for (let a = first; a < last; a++) {
          let d = this.sourceK[s];
          for (let b = first; b < last; b++) if (b !== a) d *= y[this.prec[b]];
          this.appearSlope[a] = d;
        }
      }
      this.appear[g] = sum;
    }
  }

  addRhs(y: Float64Array, dydt: Float64Array): void {
    const norm = 1 / Math.max(this.monolayer, this.iceTotal(y));
    this.appearance(y, false);
    for (let g = 0; g < this.appear.length; g++) {
      const a = this.appear[g] * norm;
      for (let j = this.followStart[g]; j < this.followStart[g + 1]; j++) {
        const rate = a * this.p[j] * y[this.partner[j]];
        for (let r = this.rowStart[j]; r < this.rowStart[j + 1]; r++) dydt[this.rows[r]] += this.signs[r] * rate;
      }
    }
  }

  addJacobian(y: Float64Array, values: Float64Array): void {
    const xIce = this.iceTotal(y);
    const above = xIce > this.monolayer;
    const norm = 1 / (above ? xIce : this.monolayer);
    this.appearance(y, true);
    this.cross.fill(0);
    let pos = 0;
    for (let g = 0; g < this.appear.length; g++) {
      const firstPrec = this.precStart[this.sourceStart[g]];
      const lastPrec = this.precStart[this.sourceStart[g + 1]];
      for (let j = this.followStart[g]; j < this.followStart[g + 1]; j++) {
        const pn = this.p[j] * norm;
        const dPartner = this.appear[g] * pn;
        const yD = y[this.partner[j]];
        // d(rate)/dx_ice = -rate / x_ice above a monolayer (the coverage's denominator).
        const dIce = above ? -(dPartner * yD) / xIce : 0;
        for (let r = this.rowStart[j]; r < this.rowStart[j + 1]; r++) {
          const sign = this.signs[r];
          values[this.rowPos[pos++]] += sign * dPartner;
          for (let a = firstPrec; a < lastPrec; a++) values[this.rowPos[pos++]] += sign * this.appearSlope[a] * yD * pn;
          this.cross[this.rowSlot[r]] += sign * dIce;
        }
      }
    }
    if (!above) return;
    const nIce = this.iceSpecies.length;
    for (let s = 0; s < this.distinctRows.length; s++) {
      const d = this.cross[s];
      const base = s * nIce;
      for (let c = 0; c < nIce; c++) values[this.icePos[base + c]] += d;
    }
  }
}
