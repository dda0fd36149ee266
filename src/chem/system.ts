/**
 * A network compiled for fixed physical conditions into one system of rate
 * equations over fractional abundances x_i = n_i / n_H:
 *
 *   dx_s/dt = sum over terms of (products - reactants)_s * k_eff prod_r x_r
 *
 * with k_eff = k for one reactant and k n_H for two (so the event rate per H
 * nucleus is k_eff times the product of the reactants' abundances; for a
 * surface reaction k n_H = kappa (k_diff,i + k_diff,j) / x_gr, HHL92 with
 * n_gr = x_gr n_H). Reactant and product indices sit in compressed Int32Arrays;
 * rhs and Jacobian run over typed arrays with no allocation per call. The
 * Jacobian's CSR pattern (sorted columns, diagonal included) is fixed at compile
 * time together with the position of every contribution in it.
 *
 * Processes that are not mass-action are terms of their own (NonMassActionTerm):
 * photodesorption above one monolayer, H2 self-shielding, the parametric H2
 * formation rate, the non-diffusive reactions (src/chem/nondiffusive.ts) and,
 * with the three-phase ice, the surface-mantle transfer (src/chem/mantle.ts),
 * which reads the others' surface rows and so comes last.
 */
import type { GrainOptions, PhysicalConditions } from '../config/conditions.ts';
import type { Network, Reaction } from './network-types.ts';
import { IceTransfer, mantlePairs, modelNetwork } from './mantle.ts';
import { CoverageTerms, type FreshGroup } from './nondiffusive.ts';
import { describeReaction } from './reaction-text.ts';
import { computeRates, type RateForm, type RateSet, type ReactionRate, type SkippedReaction } from './rates.ts';
import { h2ShieldingDerivative, h2ShieldingFactor } from './shielding.ts';

export interface CsrPattern {
  rowPtr: Int32Array;
  colIdx: Int32Array;
}

/** A term the mass-action arrays cannot express; evaluated by its own code. */
export interface NonMassActionTerm {
  readonly name: string;
  /** (row, column) pairs of the Jacobian it touches. */
  readonly entries: ReadonlyArray<readonly [number, number]>;
  /** Called once after the pattern is fixed: the value positions of `entries`, in order. */
  bind(positions: Int32Array): void;
  addRhs(y: Float64Array, dydt: Float64Array): void;
  addJacobian(y: Float64Array, values: Float64Array): void;
  /**
   * For a term whose form switches on the state: pick the form at the step's
   * predicted state and keep it until the next call (OdeProblem.beginStep).
   * Returns true when the form changed.
   */
  beginStep?(y: Float64Array): boolean;
}

export interface MassActionTerms {
  /** Term t's reactants are reactants[reactantStart[t] .. reactantStart[t+1]). */
  reactantStart: Int32Array;
  reactants: Int32Array;
  productStart: Int32Array;
  products: Int32Array;
  /** Effective coefficient: event rate per H nucleus = k prod x_reactants, s^-1. */
  k: Float64Array;
  /** Network reaction index of each term. */
  reaction: Int32Array;
}

export interface EmittedSystem {
  species: string[];
  y0: number[];
  times_s: number[];
  terms: { reactants: number[]; products: number[]; k: number }[];
  /** Every term of the model left out of `terms`: its rate form, reaction and why it is not mass action. */
  omitted: string[];
}

export interface CompileOptions {
  /** Leave out every non-mass-action term (they are still named in `omitted`). */
  massActionOnly?: boolean;
  /** H2 self-shielding (default true; Draine & Bertoldi 1996). */
  selfShielding?: boolean;
  /** Multipliers of one Monte Carlo realization of the coefficients, by network reaction index (src/chem/uncertainty.ts). */
  rateMultipliers?: Float64Array;
}

export interface CompiledSystem {
  n: number;
  species: string[];
  terms: MassActionTerms;
  nonMassAction: NonMassActionTerm[];
  /** Names of the non-mass-action terms of this model: left out of emitted JSON, and of the run with massActionOnly. */
  omitted: string[];
  skipped: SkippedReaction[];
  clampNotes: string[];
  /** What the grain options' derivations left out (rateSet.notes). */
  notes: string[];
  rateSet: RateSet;
  pattern: CsrPattern;
  /**
   * With the three-phase ice, the Jacobian's dense rank-one part u w^T (the
   * surface-mantle transfer, src/chem/mantle.ts): J = J(pattern) + u w^T,
   * u and w rewritten by every `jacobian` call; the solver applies it by
   * Sherman-Morrison. Absent otherwise.
   */
  rankOne?: { u: Float64Array; w: Float64Array };
  rhs(t: number, y: Float64Array, dydt: Float64Array): void;
  jacobian(t: number, y: Float64Array, values: Float64Array): void;
  /** Forwarded to every non-mass-action term with a switched form (OdeProblem.beginStep); true when any changed form. */
  beginStep(t: number, y: Float64Array): boolean;
  /** The mass-action part as JSON (the --emit-system contract of issue 4). */
  emitSystem(y0: Float64Array, timesS: Float64Array): EmittedSystem;
  /**
   * Re-evaluate every rate coefficient for new conditions, keeping the
   * species, terms and Jacobian pattern: conditions that change with time
   * (a physical track, src/model/physical-track.ts). The grain options and
   * the network are those of the compile; the first clamp note of each kind
   * met along the way is added to clampNotes.
   */
  retarget(conditions: PhysicalConditions): void;
}

/** Why each rate form is not mass action: the reason --emit-system gives beside every term it leaves out. */
const NOT_MASS_ACTION: Readonly<Record<Exclude<RateForm, 'mass-action'>, string>> = {
  'monolayer-photodesorption': 'above one monolayer the rate per grain saturates, k x_i x_ML / x_ice, a ratio of abundances rather than a product',
  'parametric-h2': 'the event rate R_f n_H x_H is first order in H while each event uses two H atoms, so its order differs from its stoichiometry',
  'h2-self-shielding': 'the rate k f(x_H2 N_H) x_H2 carries the shielding factor of the H2 column (Draine & Bertoldi 1996), not a power of x_H2',
  coverage: 'a non-diffusive reaction: the appearance rate of the parent times the fractional coverage of the partner, x_D / max(x_ML, x_ice), a ratio of abundances (docs/ice-nondiffusive.md)',
};

/** How a term names its reaction: the file's reaction number, or the derivation. */
function reactionName(r: Reaction): string {
  return r.derived ? `derived ${r.derived.label}` : `reaction ${r.index + 1}: ${describeReaction(r)}`;
}

/**
 * Photodesorption with the monolayer treatment (docs/physics.md section 3): a grain
 * loses Y F pi a^2 times the share of its outer layer held by species i. Below
 * one monolayer of ice that share is N_i / N_sites (first order, rate k x_i);
 * above it, for a well-mixed ice, x_i / x_ice of a full layer, so the rate is
 * k x_i x_ML / x_ice: the total per grain no longer grows with the ice.
 * All photodesorbing species share the ice total, so they form one term.
 */
class MonolayerPhotodesorption implements NonMassActionTerm {
  readonly entries: [number, number][] = [];
  /** Rows of channel q: rows[rowStart[q] .. rowStart[q+1]), the ice species first. */
  private readonly rowStart: Int32Array;
  private readonly rows: Int32Array;
  private readonly rowSign: Float64Array;
  private readonly ice: Int32Array;
  private readonly k: Float64Array;
  private positions: Int32Array = new Int32Array(0);

  constructor(
    readonly name: string,
    channels: { ice: number; products: Int32Array; k: number }[],
    private readonly monolayer: number,
    private readonly iceSpecies: Int32Array,
  ) {
    this.ice = Int32Array.from(channels, (ch) => ch.ice);
    this.k = Float64Array.from(channels, (ch) => ch.k);
    this.rowStart = new Int32Array(channels.length + 1);
    const rows: number[] = [];
    const signs: number[] = [];
    channels.forEach((ch, q) => {
      rows.push(ch.ice, ...ch.products);
      signs.push(-1, ...Array.from(ch.products, () => 1));
      this.rowStart[q + 1] = rows.length;
    });
    this.rows = Int32Array.from(rows);
    this.rowSign = Float64Array.from(signs);
    for (const row of this.rows) for (const col of iceSpecies) this.entries.push([row, col]);
  }

  bind(positions: Int32Array): void {
    this.positions = positions;
  }

  private iceTotal(y: Float64Array): number {
    let s = 0;
    const idx = this.iceSpecies;
    for (let q = 0; q < idx.length; q++) s += y[idx[q]];
    return s;
  }

  addRhs(y: Float64Array, dydt: Float64Array): void {
    const xIce = this.iceTotal(y);
    const share = xIce <= this.monolayer ? 1 : this.monolayer / xIce;
    for (let q = 0; q < this.k.length; q++) {
      const rate = this.k[q] * share * y[this.ice[q]];
      for (let r = this.rowStart[q]; r < this.rowStart[q + 1]; r++) dydt[this.rows[r]] += this.rowSign[r] * rate;
    }
  }

  addJacobian(y: Float64Array, values: Float64Array): void {
    const xIce = this.iceTotal(y);
    const nIce = this.iceSpecies.length;
    const below = xIce <= this.monolayer;
    const share = below ? 1 : this.monolayer / xIce;
    for (let q = 0; q < this.k.length; q++) {
      const self = this.k[q] * share;
      // d(k x_i x_ML / x_ice)/dx_j = -k x_i x_ML / x_ice^2 for every ice j (zero below a monolayer).
      const cross = below ? 0 : -(self * y[this.ice[q]]) / xIce;
      for (let r = this.rowStart[q]; r < this.rowStart[q + 1]; r++) {
        const sign = this.rowSign[r];
        const base = r * nIce;
        for (let c = 0; c < nIce; c++) {
          const d = this.iceSpecies[c] === this.ice[q] ? self + cross : cross;
          values[this.positions[base + c]] += sign * d;
        }
      }
    }
  }
}

/**
 * A term whose rate depends on one species' abundance alone, applied to its
 * rows with stoichiometric signs: the Jacobian has one column, d rate/dx.
 */
abstract class OneSpeciesTerm implements NonMassActionTerm {
  readonly entries: [number, number][] = [];
  private readonly rows: Int32Array;
  private readonly rowSign: Float64Array;
  private positions: Int32Array = new Int32Array(0);

  constructor(
    readonly name: string,
    private readonly driver: number,
    consumed: ArrayLike<number>,
    produced: ArrayLike<number>,
  ) {
    this.rows = Int32Array.from([...Array.from(consumed), ...Array.from(produced)]);
    this.rowSign = Float64Array.from([...Array.from(consumed, () => -1), ...Array.from(produced, () => 1)]);
    for (const row of this.rows) this.entries.push([row, driver]);
  }

  /** Event rate per H nucleus at abundance x of the driving species. */
  protected abstract rate(x: number): number;
  /** Its derivative with respect to x. */
  protected abstract slope(x: number): number;

  bind(positions: Int32Array): void {
    this.positions = positions;
  }

  addRhs(y: Float64Array, dydt: Float64Array): void {
    const rate = this.rate(y[this.driver]);
    for (let q = 0; q < this.rows.length; q++) dydt[this.rows[q]] += this.rowSign[q] * rate;
  }

  addJacobian(y: Float64Array, values: Float64Array): void {
    const d = this.slope(y[this.driver]);
    for (let q = 0; q < this.rows.length; q++) values[this.positions[q]] += this.rowSign[q] * d;
  }
}

/**
 * H2 formation at the parametric rate R_f n_H n(H) (Jura 1975): the event rate
 * per H nucleus is R_f n_H x_H while each event uses the two H atoms listed, so
 * the rate's order differs from the stoichiometry: not mass-action.
 */
class ParametricH2 extends OneSpeciesTerm {
  constructor(name: string, hydrogen: number, reactants: Int32Array, products: Int32Array, private readonly k: number) {
    super(name, hydrogen, reactants, products);
  }

  protected rate(x: number): number {
    return this.k * x;
  }

  protected slope(): number {
    return this.k;
  }
}

/**
 * H2 photodissociation shielded by the H2 column to the cloud edge,
 * rate = k f(x_H2 N_H) x_H2 with f of Draine & Bertoldi (1996): the rate is not
 * linear in x_H2.
 */
class H2SelfShielding extends OneSpeciesTerm {
  constructor(name: string, h2: number, products: Int32Array, private readonly k: number, private readonly columnToEdge: number) {
    super(name, h2, [h2], products);
  }

  protected rate(x: number): number {
    return this.k * h2ShieldingFactor(x * this.columnToEdge) * x;
  }

  protected slope(x: number): number {
    const column = x * this.columnToEdge;
    return this.k * (h2ShieldingFactor(column) + column * h2ShieldingDerivative(column));
  }
}

/** True when a and b hold the same doubles bit for bit (+0 and -0 differ; NaN never matches). */
function sameBits(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < b.length; i++) {
    const x = a[i];
    const z = b[i];
    if (x !== z || (x === 0 && 1 / x !== 1 / z)) return false;
  }
  return true;
}

/** Compile a network for fixed conditions (see the module comment). */
export function compile(twoPhaseNetwork: Network, conditions: PhysicalConditions, grain: GrainOptions, options: CompileOptions = {}): CompiledSystem {
  // With the mantle on, every ice species has its mantle twin (appended when the file lists none).
  const network = modelNetwork(twoPhaseNetwork, grain);
  const rateSet = computeRates(network, conditions, grain, { selfShielding: options.selfShielding, multipliers: options.rateMultipliers });
  const n = network.species.length;
  const species = network.species.map((s) => s.name);
  const index = (name: string): number => {
    const i = network.speciesIndex.get(name);
    if (i === undefined) throw new Error(`species ${name} missing from the species index of ${network.name}`);
    return i;
  };
  const iceSpecies = Int32Array.from(network.species.flatMap((s, i) => (s.phase === 'ice' ? [i] : [])));
  const nH = conditions.density;

  const massAction = rateSet.rates.filter((r) => r.form === 'mass-action');
  const special = rateSet.rates.filter((r) => r.form !== 'mass-action');
  const omitted = special.map((r) => `${r.form} (${reactionName(r.reaction)}): ${NOT_MASS_ACTION[r.form as Exclude<RateForm, 'mass-action'>]}`);

  const m = massAction.length;
  const reactantStart = new Int32Array(m + 1);
  const productStart = new Int32Array(m + 1);
  for (let t = 0; t < m; t++) {
    reactantStart[t + 1] = reactantStart[t] + massAction[t].reaction.reactants.length;
    productStart[t + 1] = productStart[t] + massAction[t].reaction.products.length;
  }
  const reactants = new Int32Array(reactantStart[m]);
  const products = new Int32Array(productStart[m]);
  const k = new Float64Array(m);
  const reaction = new Int32Array(m);
  massAction.forEach((rate, t) => {
    const r = rate.reaction;
    r.reactants.forEach((name, q) => (reactants[reactantStart[t] + q] = index(name)));
    r.products.forEach((name, q) => (products[productStart[t] + q] = index(name)));
    reaction[t] = r.index;
  });
  /** The mass-action coefficients of a rate set: k_eff = k n_H^(reactants - 1). */
  const fillCoefficients = (rates: readonly ReactionRate[], density: number): void => {
    let t = 0;
    for (const rate of rates) {
      if (rate.form !== 'mass-action') continue;
      const order = rate.reaction.reactants.length;
      k[t++] = order >= 2 ? rate.k * density ** (order - 1) : rate.k;
    }
  };
  fillCoefficients(rateSet.rates, nH);

  /** The non-mass-action terms of a rate set (all but the surface-mantle transfer), in a fixed order. */
  const specialTerms = (set: RateSet, density: number): NonMassActionTerm[] => {
    const terms: NonMassActionTerm[] = [];
    if (options.massActionOnly) return terms;
    const specialRates = set.rates.filter((r) => r.form !== 'mass-action');
    const photo = specialRates.filter((r) => r.form === 'monolayer-photodesorption');
    if (photo.length > 0) {
      const channels = photo.map((rate) => ({ ice: index(rate.reaction.reactants[0]), products: Int32Array.from(rate.reaction.products.map(index)), k: rate.k }));
      terms.push(new MonolayerPhotodesorption(`photodesorption with the monolayer treatment (${photo.length} reactions)`, channels, set.grain.monolayerAbundance, iceSpecies));
    }
    const coverage = specialRates.filter((r) => r.form === 'coverage');
    if (coverage.length > 0) {
      // Group by fresh species: each parent (source) combines with each follow-on (follower).
      const groups = new Map<string, { sources: Map<string, FreshGroup['sources'][number]>; followers: Map<string, FreshGroup['followers'][number]>; count: number }>();
      for (const rate of coverage) {
        const r = rate.reaction;
        const d = r.derived!;
        const group = groups.get(d.fresh!) ?? { sources: new Map(), followers: new Map(), count: 0 };
        groups.set(d.fresh!, group);
        group.count += 1;
        const [parent, follow] = d.parents;
        group.sources.set(`${parent.index}`, { k: rate.parts!.appear * density ** (r.reactants.length - 2), precursors: Int32Array.from(r.reactants.slice(0, -1).map(index)) });
        const net = new Map<number, number>();
        for (const name of [d.fresh!, d.partner!]) net.set(index(name), (net.get(index(name)) ?? 0) - 1);
        for (const name of d.produces!) net.set(index(name), (net.get(index(name)) ?? 0) + 1);
        const changed = [...net].filter(([, v]) => v !== 0);
        group.followers.set(`${follow.index} ${d.partner}`, {
          partner: index(d.partner!),
          p: rate.parts!.follow,
          rows: Int32Array.from(changed, ([row]) => row),
          signs: Float64Array.from(changed, ([, v]) => v),
        });
      }
      const compiled: FreshGroup[] = [...groups.values()].map((g) => {
        // Every parent of a fresh species meets every follow-on (src/chem/nondiffusive.ts), so the product is the count.
        if (g.sources.size * g.followers.size !== g.count) throw new Error('non-diffusive reactions do not factorise by fresh species');
        return { sources: [...g.sources.values()], followers: [...g.followers.values()] };
      });
      terms.push(new CoverageTerms(`non-diffusive reactions at the partner's surface coverage (${coverage.length} reactions)`, compiled, set.grain.monolayerAbundance, iceSpecies));
    }
    specialRates.forEach((rate, q) => {
      const r = rate.reaction;
      const products = Int32Array.from(r.products.map(index));
      if (rate.form === 'parametric-h2') terms.push(new ParametricH2(omitted[q], index(r.reactants[0]), Int32Array.from(r.reactants.map(index)), products, rate.k * density));
      else if (rate.form === 'h2-self-shielding') terms.push(new H2SelfShielding(omitted[q], index(r.reactants[0]), products, rate.k, set.columnToEdge));
    });
    return terms;
  };
  const nonMassAction: NonMassActionTerm[] = specialTerms(rateSet, nH);

  // Sparsity: a term's rate depends on each reactant and changes every reactant and product.
  const rowsCols: Set<number>[] = Array.from({ length: n }, (_, i) => new Set([i]));
  for (let t = 0; t < m; t++) {
    for (let a = reactantStart[t]; a < reactantStart[t + 1]; a++) {
      const col = reactants[a];
      for (let b = reactantStart[t]; b < reactantStart[t + 1]; b++) rowsCols[reactants[b]].add(col);
      for (let b = productStart[t]; b < productStart[t + 1]; b++) rowsCols[products[b]].add(col);
    }
  }
  for (const term of nonMassAction) for (const [row, col] of term.entries) rowsCols[row].add(col);

  const pairs = grain.mantle ? mantlePairs(network.species) : undefined;
  const othersCount = nonMassAction.length;
  let transfer: IceTransfer | undefined;
  if (pairs && pairs.surface.length > 0) {
    const layers = grain.surfaceLayers * rateSet.grain.monolayerAbundance;
    transfer = new IceTransfer(pairs.surface, pairs.mantle, layers, n, (y) => othersAt(y), (y) => surfaceRoundOff(y));
    omitted.push(`${transfer.name}: the transfer rate is the net surface growth of every other process times a share of the surface or mantle, a ratio of sums of abundances (docs/ice-mantle.md)`);
    if (options.massActionOnly) transfer = undefined;
    else {
      nonMassAction.push(transfer);
      for (const [row, col] of transfer.entries) rowsCols[row].add(col);
    }
  }
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowPtr[i + 1] = rowPtr[i] + rowsCols[i].size;
  const colIdx = new Int32Array(rowPtr[n]);
  const position = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    const cols = [...rowsCols[i]].sort((a, b) => a - b);
    cols.forEach((col, q) => {
      colIdx[rowPtr[i] + q] = col;
      position.set(i * n + col, rowPtr[i] + q);
    });
  }
  const at = (row: number, col: number): number => position.get(row * n + col) as number;

  // For each reactant slot (term t, reactant a): where d(rate)/dx_a lands, with the net stoichiometric sign.
  const slotStart = new Int32Array(reactants.length + 1);
  const slotPos: number[] = [];
  const slotCoef: number[] = [];
  for (let t = 0; t < m; t++) {
    for (let a = reactantStart[t]; a < reactantStart[t + 1]; a++) {
      const col = reactants[a];
      const net = new Map<number, number>();
      for (let b = reactantStart[t]; b < reactantStart[t + 1]; b++) net.set(reactants[b], (net.get(reactants[b]) ?? 0) - 1);
      for (let b = productStart[t]; b < productStart[t + 1]; b++) net.set(products[b], (net.get(products[b]) ?? 0) + 1);
      for (const [row, coef] of net) {
        if (coef === 0) continue;
        slotPos.push(at(row, col));
        slotCoef.push(coef);
      }
      slotStart[a + 1] = slotPos.length;
    }
  }
  const jacPos = Int32Array.from(slotPos);
  const jacCoef = Float64Array.from(slotCoef);
  const boundPositions = nonMassAction.map((term) => Int32Array.from(term.entries.map(([row, col]) => at(row, col))));
  nonMassAction.forEach((term, q) => term.bind(boundPositions[q]));
  transfer?.readPattern(rowPtr, colIdx);

  // Net stoichiometry of each term for the rhs, cancelling species that appear on both sides.
  const netStart = new Int32Array(m + 1);
  const netSpecies: number[] = [];
  const netCoef: number[] = [];
  for (let t = 0; t < m; t++) {
    const net = new Map<number, number>();
    for (let b = reactantStart[t]; b < reactantStart[t + 1]; b++) net.set(reactants[b], (net.get(reactants[b]) ?? 0) - 1);
    for (let b = productStart[t]; b < productStart[t + 1]; b++) net.set(products[b], (net.get(products[b]) ?? 0) + 1);
    for (const [s, coef] of net) {
      if (coef === 0) continue;
      netSpecies.push(s);
      netCoef.push(coef);
    }
    netStart[t + 1] = netSpecies.length;
  }
  const rhsSpecies = Int32Array.from(netSpecies);
  const rhsCoef = Float64Array.from(netCoef);

  /** Every term but the surface-mantle transfer, which reads what these write to the surface rows. */
  const othersRhs = (y: Float64Array, dydt: Float64Array): void => {
    dydt.fill(0);
    // Terms are stored back to back, so one running index walks each array.
    let a = 0;
    let q = 0;
    for (let t = 0; t < m; t++) {
      let rate = k[t];
      for (const end = reactantStart[t + 1]; a < end; a++) rate *= y[reactants[a]];
      for (const end = netStart[t + 1]; q < end; q++) dydt[rhsSpecies[q]] += rhsCoef[q] * rate;
    }
    for (let g = 0; g < othersCount; g++) nonMassAction[g].addRhs(y, dydt);
  };

  // The others' rhs at the last state it was evaluated at. With the transfer,
  // beginStep reads it at the step's prediction, and the first Newton iterate
  // and a Jacobian taken at the prediction are at the same state: each reuses
  // it in place of a full pass over the terms. The state is compared bit for
  // bit (the sign of a zero too), so the values are those a fresh pass gives.
  const othersCache = new Float64Array(n);
  const othersCacheY = new Float64Array(n);
  let othersCacheValid = false;
  const othersAt = (y: Float64Array): Float64Array => {
    if (othersCacheValid && sameBits(y, othersCacheY)) return othersCache;
    othersCacheValid = false;
    othersRhs(y, othersCache);
    othersCacheY.set(y);
    othersCacheValid = true;
    return othersCache;
  };

  // The round-off bound of F, the sum the transfer reads from the surface rows
  // (docs/ice-mantle.md, "The band"). othersRhs adds every contribution
  // c to its row in turn and the transfer then adds the rows, so the computed
  // F is a recursive sum of the contributions, each a product of a few
  // factors, and |F_computed - F| <= gamma_N sum |c| with
  // gamma_N = N u / (1 - N u), u = 2^-53 and N the longest chain of roundings
  // a contribution passes through (Higham, Accuracy and Stability of
  // Numerical Algorithms, 2nd ed., 2002, section 4.2 and lemma 3.1).
  const surfaceRow = new Uint8Array(n);
  if (pairs) for (const row of pairs.surface) surfaceRow[row] = 1;
  const grossTerms: number[] = [];
  const grossWeight: number[] = [];
  const rowCount = new Int32Array(n);
  let maxOrder = 0;
  for (let t = 0; t < m; t++) {
    let weight = 0;
    for (let q = netStart[t]; q < netStart[t + 1]; q++) {
      if (!surfaceRow[rhsSpecies[q]]) continue;
      weight += Math.abs(rhsCoef[q]);
      rowCount[rhsSpecies[q]]++;
    }
    if (weight === 0) continue;
    grossTerms.push(t);
    grossWeight.push(weight);
    maxOrder = Math.max(maxOrder, reactantStart[t + 1] - reactantStart[t]);
  }
  let longestRow = 0;
  for (let i = 0; i < n; i++) if (surfaceRow[i]) longestRow = Math.max(longestRow, rowCount[i] + othersCount);
  const surfaceCount = pairs ? pairs.surface.length : 0;
  // Additions within the longest row and across the rows, the product k x_1 .. x_order, and the stoichiometric factor.
  const chain = longestRow + surfaceCount + maxOrder + 1;
  const unitRoundOff = 2 ** -53;
  const gammaChain = (chain * unitRoundOff) / (1 - chain * unitRoundOff);
  const grossTerm = Int32Array.from(grossTerms);
  const grossCoef = Float64Array.from(grossWeight);
  const grossScratch = new Float64Array(n);
  const surfaceRoundOff = (y: Float64Array): number => {
    let gross = 0;
    for (let g = 0; g < grossTerm.length; g++) {
      const t = grossTerm[g];
      let rate = k[t];
      for (let a = reactantStart[t]; a < reactantStart[t + 1]; a++) rate *= y[reactants[a]];
      gross += grossCoef[g] * Math.abs(rate);
    }
    // A non-mass-action term counts as one contribution per row: its own net rate there.
    for (let g = 0; g < othersCount; g++) {
      grossScratch.fill(0);
      nonMassAction[g].addRhs(y, grossScratch);
      for (let i = 0; i < n; i++) if (surfaceRow[i]) gross += Math.abs(grossScratch[i]);
    }
    return gammaChain * gross;
  };

  const rhs = (_t: number, y: Float64Array, dydt: Float64Array): void => {
    if (!transfer) {
      othersRhs(y, dydt);
      return;
    }
    dydt.set(othersAt(y));
    transfer.addRhs(y, dydt);
  };

  const jacobian = (_t: number, y: Float64Array, values: Float64Array): void => {
    values.fill(0);
    for (let t = 0; t < m; t++) {
      const first = reactantStart[t];
      const last = reactantStart[t + 1];
      for (let a = first; a < last; a++) {
        let partial = k[t];
        for (let b = first; b < last; b++) if (b !== a) partial *= y[reactants[b]];
        for (let q = slotStart[a]; q < slotStart[a + 1]; q++) values[jacPos[q]] += jacCoef[q] * partial;
      }
    }
    for (let q = 0; q < nonMassAction.length; q++) nonMassAction[q].addJacobian(y, values);
  };

  const switched = nonMassAction.filter((term): term is NonMassActionTerm & Required<Pick<NonMassActionTerm, 'beginStep'>> => term.beginStep !== undefined);
  const beginStep = (_t: number, y: Float64Array): boolean => {
    let changed = false;
    for (let g = 0; g < switched.length; g++) if (switched[g].beginStep(y)) changed = true;
    return changed;
  };

  const clampNotes = [...rateSet.clampNotes];
  const clampKinds = new Set(clampNotes.map((note) => note.split(':')[0]));
  const retarget = (next: PhysicalConditions): void => {
    const set = computeRates(network, next, grain, { selfShielding: options.selfShielding });
    const before = rateSet.rates;
    if (set.rates.length !== before.length || set.rates.some((r, i) => r.reaction.index !== before[i].reaction.index || r.form !== before[i].form)) {
      throw new Error('the reactions of the network changed form with the conditions; a model cannot follow them in one system');
    }
    fillCoefficients(set.rates, next.density);
    othersCacheValid = false;
    specialTerms(set, next.density).forEach((term, q) => {
      term.bind(boundPositions[q]);
      nonMassAction[q] = term;
    });
    for (const note of set.clampNotes) {
      const kind = note.split(':')[0];
      if (clampKinds.has(kind)) continue;
      clampKinds.add(kind);
      clampNotes.push(note);
    }
  };

  const terms: MassActionTerms = { reactantStart, reactants, productStart, products, k, reaction };
  const emitSystem = (y0: Float64Array, timesS: Float64Array): EmittedSystem => ({
    species,
    y0: Array.from(y0),
    times_s: Array.from(timesS),
    terms: Array.from({ length: m }, (_, t) => ({
      reactants: Array.from(reactants.subarray(reactantStart[t], reactantStart[t + 1])),
      products: Array.from(products.subarray(productStart[t], productStart[t + 1])),
      k: k[t],
    })),
    omitted,
  });

  return {
    n,
    species,
    terms,
    nonMassAction,
    omitted,
    skipped: rateSet.skipped,
    clampNotes,
    notes: rateSet.notes,
    rateSet,
    pattern: { rowPtr, colIdx },
    rankOne: transfer ? { u: transfer.u, w: transfer.w } : undefined,
    rhs,
    jacobian,
    beginStep,
    emitSystem,
    retarget,
  };
}
