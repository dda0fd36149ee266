/**
 * The three-phase ice (gas, reactive surface, inert bulk mantle) of Hasegawa &
 * Herbst (1993, MNRAS 263, 589) with the transfer rates of Garrod & Pauly
 * (2011, ApJ 735, 15); docs/ice-mantle.md explains the model.
 *
 * Every ice species `X(s)` (the reactive surface) has a mantle twin
 * `X(mantle)`. The mantle takes part in no reaction and leaves only through
 * the surface. Let F be the net rate at which every other process (accretion,
 * desorption, surface reactions, ...) changes the surface population
 * x_surf = sum_i x_s(i), all per H nucleus, and Lambda = L x_ML the abundance of
 * L monolayers. Garrod & Pauly's forms (memory: the papers' text was not at
 * hand to re-check the symbols) are then
 *
 *   growth, F > 0:  x_s(i) -> x_m(i) at alpha_gain F x_s(i)/x_surf,  alpha_gain = x_surf / Lambda,
 *   erosion, F < 0: x_m(i) -> x_s(i) at alpha_loss |F| x_m(i)/x_mant, alpha_loss = min(1, x_mant / x_surf),
 *
 * so the growth transfer is F x_s(i)/Lambda (the surface settles at L
 * monolayers as the ice grows), and the erosion transfer |F| x_m(i) /
 * max(x_mant, x_surf) refills the surface from the mantle for as long as the
 * mantle holds at least a surface's worth, then less as it runs out.
 */
import type { GrainOptions } from '../config/conditions.ts';
import type { NonMassActionTerm } from './system.ts';
import type { Network } from './network-types.ts';
import { iceName, mantleName, parseSpecies, type Species } from './species.ts';

/** Output name of the surface layers of an ice species when the mantle is on: `CO(surface)`. */
export function surfaceLayerName(gasName: string): string {
  return `${gasName}(surface)`;
}

/**
 * The network with a mantle twin for every ice species (and an ice twin for
 * every mantle species a file lists alone), appended after its own species.
 * Returns the network itself when nothing is missing. Reactions are unchanged:
 * the transfer is a term of the compiled system (IceTransfer), not a reaction.
 */
export function withMantle(network: Network): Network {
  const missing: string[] = [];
  const seen = new Set(network.species.map((s) => s.name));
  for (const s of network.species) {
    const twin = s.phase === 'ice' ? mantleName(s.gasName) : s.phase === 'mantle' ? iceName(s.gasName) : undefined;
    if (twin !== undefined && !seen.has(twin)) {
      seen.add(twin);
      missing.push(twin);
    }
  }
  if (missing.length === 0) return network;
  const species = [...network.species];
  const speciesIndex = new Map(network.speciesIndex);
  for (const name of missing) {
    const parsed = parseSpecies(name);
    const mass = network.speciesData.get(parsed.gasName)?.mass;
    speciesIndex.set(name, species.length);
    species.push(mass !== undefined ? { ...parsed, mass } : parsed);
  }
  return { ...network, species, speciesIndex };
}

/** The network a model with these grain options integrates. */
export function modelNetwork(network: Network, grain: GrainOptions): Network {
  return grain.mantle ? withMantle(network) : network;
}

/** Surface-mantle pairs of a network's species (indices into its species list). */
export function mantlePairs(species: readonly Species[]): { surface: Int32Array; mantle: Int32Array } {
  const index = new Map(species.map((s, i) => [s.name, i]));
  const surface: number[] = [];
  const mantle: number[] = [];
  species.forEach((s, i) => {
    if (s.phase !== 'ice') return;
    const m = index.get(mantleName(s.gasName));
    if (m === undefined) return;
    surface.push(i);
    mantle.push(m);
  });
  return { surface: Int32Array.from(surface), mantle: Int32Array.from(mantle) };
}

/**
 * The columns a model writes (CSV, JSON, the model store): each is the sum of
 * some state entries. With a mantle, `X(s)` is the whole ice of X (surface
 * plus mantle: what an observed ice column measures), beside `X(surface)` and
 * `X(mantle)`; without one, the columns are the state itself.
 */
export interface OutputColumns {
  names: string[];
  /** Column c sums the state entries parts[start[c] .. start[c+1]). */
  start: Int32Array;
  parts: Int32Array;
}

export function outputColumns(species: readonly Species[], grain: Pick<GrainOptions, 'mantle'>): OutputColumns {
  // Without the mantle, a mantle species a file lists is an inert species of its own, not a part of X(s).
  const index = grain.mantle ? new Map(species.map((s, i) => [s.name, i])) : new Map<string, number>();
  const names: string[] = [];
  const start: number[] = [0];
  const parts: number[] = [];
  const column = (name: string, ...of: number[]): void => {
    names.push(name);
    parts.push(...of);
    start.push(parts.length);
  };
  species.forEach((s, i) => {
    const twin = s.phase === 'ice' ? index.get(mantleName(s.gasName)) : s.phase === 'mantle' ? index.get(iceName(s.gasName)) : undefined;
    if (twin === undefined) column(s.name, i);
    else if (s.phase === 'ice') {
      column(s.name, i, twin);
      column(surfaceLayerName(s.gasName), i);
      column(mantleName(s.gasName), twin);
    }
  });
  return { names, start: Int32Array.from(start), parts: Int32Array.from(parts) };
}

/** The output column names of a model of this network with these grain options. */
export function outputSpeciesNames(network: Network, grain: GrainOptions): string[] {
  return outputColumns(modelNetwork(network, grain).species, grain).names;
}

/** Writes the output columns of state y into out (length names.length). */
export function fillOutputs(columns: OutputColumns, y: ArrayLike<number>, out: Float64Array, offset = 0): void {
  const { start, parts } = columns;
  for (let c = 0; c + 1 < start.length; c++) {
    let sum = 0;
    for (let p = start[c]; p < start[c + 1]; p++) sum += y[parts[p]];
    out[offset + c] = sum;
  }
}

/**
 * The surface-mantle transfer as one non-mass-action term (rates in the module
 * comment). Its rate depends on F, the sum of every other term's contribution
 * to the surface rows, so it must be evaluated after all of them: the
 * compiler adds it last, and F comes from the others' rhs, which the
 * compiler keeps for the last state it was asked at (the step's prediction
 * serves beginStep, the first Newton iterate and a Jacobian taken there).
 *
 * Its Jacobian is exact and has two parts. Each transfer rate is a share a_i
 * of F (a_i = x_s(i)/Lambda growing, x_m(i)/max(x_surf, x_mant) eroding), so
 * its derivative is a_i dF/dx_j, plus F da_i/dx_j. The first part, and the
 * part of the second that comes from the denominator, form one dense rank-one
 * block u w^T over the surface and mantle rows: u holds -a_i on the surface
 * row and +a_i on the mantle row of species i; w holds dF/dx_j (the sum of the
 * surface rows of the others' Jacobian, read before this term writes), less
 * F/d on the columns of the sum d when eroding. The solver applies that block
 * by the Sherman-Morrison formula (src/solve/newton-matrix.ts) rather than
 * storing it, which would fill the LU. The rest, F/d on species i's own
 * column, goes on four pattern entries per species.
 */
/** The transfer's form: held by beginStep, or free (by the sign of F at each call) before the first. */
type Branch = 'free' | 'growth' | 'erosion';

export class IceTransfer implements NonMassActionTerm {
  readonly name: string;
  readonly entries: [number, number][] = [];
  /** The dense rank-one part of the Jacobian, rewritten by every addJacobian. */
  readonly u: Float64Array;
  readonly w: Float64Array;
  private readonly k: number;
  /** Per species, positions of (surface, surface), (mantle, surface), (surface, mantle), (mantle, mantle). */
  private positions: Int32Array = new Int32Array(0);
  private rowPtr: Int32Array = new Int32Array(0);
  private colIdx: Int32Array = new Int32Array(0);
  private branch: Branch = 'free';

  /**
   * @param layersAbundance Lambda = L x_ML, the abundance of the surface's monolayers
   * @param others the rhs of every other term (the system's, less this one) at y;
   *   the array it returns is read before the next call and never written
   */
  constructor(
    private readonly surface: Int32Array,
    private readonly mantle: Int32Array,
    private readonly layersAbundance: number,
    n: number,
    private readonly others: (y: Float64Array) => Float64Array,
    private readonly roundOff: (y: Float64Array) => number = () => 0,
  ) {
    this.k = surface.length;
    this.name = `surface-mantle transfer (${this.k} ice species, ${layersAbundance.toPrecision(3)} per H for the surface layers)`;
    surface.forEach((s, q) => {
      const m = mantle[q];
      this.entries.push([s, s], [m, s], [s, m], [m, m]);
    });
    this.u = new Float64Array(n);
    this.w = new Float64Array(n);
  }

  bind(positions: Int32Array): void {
    this.positions = positions;
  }

  /** The system's final pattern, to read the others' surface rows. */
  readPattern(rowPtr: Int32Array, colIdx: Int32Array): void {
    this.rowPtr = rowPtr;
    this.colIdx = colIdx;
  }

  private surfaceRate(dydt: Float64Array): number {
    let f = 0;
    for (let q = 0; q < this.k; q++) f += dydt[this.surface[q]];
    return f;
  }

  private total(y: Float64Array, idx: Int32Array): number {
    let s = 0;
    for (let q = 0; q < idx.length; q++) s += y[idx[q]];
    return s;
  }

  /**
   * Holds the branch given by the sign of F at the step's predicted state
   * until the next step (OdeProblem.beginStep). The two forms meet at F = 0
   * with slopes in F that differ by 1e4 and more for trace species; once the
   * ice stops growing F sits at round-off around 0, and a branch chosen afresh
   * at every Newton iterate made the iteration straddle the switch without
   * contracting. With the branch held, the rhs is smooth within a step. This
   * is sound: the error test still judges each step on the rhs it used, and
   * the transfer is proportional to F, so where the held branch can disagree
   * with the sign of F inside a step, F and the transfer are both near 0.
   *
   * The branch changes only when F leaves the band |F| <= roundOff(y), the
   * bound on the floating-point error of F as computed (docs/ice-mantle.md,
   * "The band"). Inside it the sign of F is not known, and choosing by it
   * switched the form at most steps of a steady ice: the erosion form feeds
   * a trace surface species from its mantle at |F| x_m/max(x_surf, x_mant),
   * the growth form does not, so the noise in F's sign moved such species
   * by more than the error test allows.
   */
  beginStep(y: Float64Array): boolean {
    const f = this.surfaceRate(this.others(y));
    const branch = f >= 0 ? 'growth' : 'erosion';
    if (branch === this.branch) return false;
    // Within the round-off of F its sign carries no information: the form in hand stays.
    // The band (one more pass over the terms) is needed only when the sign asks for a change.
    if (this.branch !== 'free' && Math.abs(f) <= this.roundOff(y)) return false;
    this.branch = branch;
    return true;
  }

  /** Growth (surface -> mantle at F x_s / Lambda) or erosion (mantle -> surface at |F| x_m / max(x_mant, x_surf)). */
  private growing(f: number): boolean {
    return this.branch === 'free' ? f >= 0 : this.branch === 'growth';
  }

  addRhs(y: Float64Array, dydt: Float64Array): void {
    const f = this.surfaceRate(dydt);
    if (f === 0) return;
    if (this.growing(f)) {
      const scale = f / this.layersAbundance;
      for (let q = 0; q < this.k; q++) {
        const t = scale * y[this.surface[q]];
        dydt[this.surface[q]] -= t;
        dydt[this.mantle[q]] += t;
      }
    } else {
      const d = Math.max(this.total(y, this.surface), this.total(y, this.mantle));
      if (!(d > 0)) return;
      const scale = f / d;
      for (let q = 0; q < this.k; q++) {
        const t = scale * y[this.mantle[q]];
        dydt[this.surface[q]] -= t;
        dydt[this.mantle[q]] += t;
      }
    }
  }

  addJacobian(y: Float64Array, values: Float64Array): void {
    const { u, w, rowPtr, colIdx, positions: pos } = this;
    const f = this.surfaceRate(this.others(y));
    // w = dF/dx: the surface rows of the other terms' Jacobian, before this term writes.
    w.fill(0);
    u.fill(0);
    for (let q = 0; q < this.k; q++) {
      const row = this.surface[q];
      for (let p = rowPtr[row]; p < rowPtr[row + 1]; p++) w[colIdx[p]] += values[p];
    }
    const growth = this.growing(f);
    const sSurface = this.total(y, this.surface);
    const sMantle = this.total(y, this.mantle);
    const d = growth ? this.layersAbundance : Math.max(sSurface, sMantle);
    if (!(d > 0)) {
      w.fill(0);
      return;
    }
    const from = growth ? this.surface : this.mantle;
    if (!growth) {
      // d = max(x_surf, x_mant) depends on whichever sum is the larger.
      const denominator = sMantle >= sSurface ? this.mantle : this.surface;
      for (let q = 0; q < this.k; q++) w[denominator[q]] -= f / d;
    }
    const own = f / d;
    // The share's own column: the surface species when growing, the mantle species when eroding.
    const at = growth ? 0 : 2;
    for (let q = 0; q < this.k; q++) {
      const a = y[from[q]] / d;
      u[this.surface[q]] = -a;
      u[this.mantle[q]] = a;
      values[pos[4 * q + at]] -= own;
      values[pos[4 * q + at + 1]] += own;
    }
  }
}
