/**
 * Test and benchmark problems for the stiff integrator: the Robertson problem
 * and a seeded random mass-action system shaped like a gas-grain network.
 * Invented data, for checks and timing only.
 */
import type { OdeProblem, SparsityPattern } from '../../src/solve/index.ts';
import { seededRandom } from '../../scripts/seeded-random.ts';

export { seededRandom };


/** Builds a CSR pattern from per-row column sets. */
export function patternFromRows(rows: Set<number>[]): SparsityPattern {
  const rowPtr = new Int32Array(rows.length + 1);
  for (let i = 0; i < rows.length; i++) rowPtr[i + 1] = rowPtr[i] + rows[i].size;
  const colIdx = new Int32Array(rowPtr[rows.length]);
  for (let i = 0; i < rows.length; i++) {
    const sorted = [...rows[i]].sort((a, b) => a - b);
    colIdx.set(sorted, rowPtr[i]);
  }
  return { rowPtr, colIdx };
}

/** Fully dense pattern of size n. */
export function densePattern(n: number): SparsityPattern {
  const rows: Set<number>[] = [];
  for (let i = 0; i < n; i++) rows.push(new Set(Array.from({ length: n }, (_, j) => j)));
  return patternFromRows(rows);
}

/**
 * Robertson (1966) chemical kinetics problem:
 * y1' = -0.04 y1 + 1e4 y2 y3, y2' = 0.04 y1 - 1e4 y2 y3 - 3e7 y2^2, y3' = 3e7 y2^2.
 */
export function robertson(): { problem: OdeProblem; y0: Float64Array } {
  const problem: OdeProblem = {
    n: 3,
    pattern: densePattern(3),
    rhs(_t, y, dydt) {
      dydt[0] = -0.04 * y[0] + 1e4 * y[1] * y[2];
      dydt[2] = 3e7 * y[1] * y[1];
      dydt[1] = -dydt[0] - dydt[2];
    },
    jacobian(_t, y, v) {
      v[0] = -0.04;
      v[1] = 1e4 * y[2];
      v[2] = 1e4 * y[1];
      v[3] = 0.04;
      v[4] = -1e4 * y[2] - 6e7 * y[1];
      v[5] = -1e4 * y[1];
      v[6] = 0;
      v[7] = 6e7 * y[1];
      v[8] = 0;
    },
  };
  return { problem, y0: Float64Array.from([1, 0, 0]) };
}

/** Chance that a two-body reaction's partner is a hub species (else a core species, rarely any species). */
const HUB_PARTNER = 0.6;
/** Chance that the partner is one of the next CORE_SIZE species after the hubs (C, O, OH, CN, ... in a real network). */
const CORE_PARTNER = 0.35;
const CORE_SIZE = 40;
/** Chance that the second product is a hub species. */
const HUB_BYPRODUCT = 0.7;
/** Chance that a product is any species rather than a related one. */
const LONG_RANGE_PRODUCT = 0.02;
/** Related species lie within this many places in the complexity order. */
const PRODUCT_REACH = 6;

export interface MassActionOptions {
  species: number;
  seed: number;
  /** Species that take part in most reactions (as H2, H, e-, He+, C+ do in a real network). */
  hubs?: number;
  /** Two-body reactions per species as the first reactant. */
  reactionsPerSpecies?: number;
  /** Density of hydrogen nuclei in cm^-3: two-body rates are k n_H x_a x_b. */
  density?: number;
}

/**
 * Random mass-action system in fractional abundances x_i: two-body reactions
 * A + B -> C + D with k log-uniform in 1e-18..1e-9 cm^3 s^-1, one partner a hub
 * species or one of a core of common partners, products related to the reactants (see
 * `related`), and one first-order destruction per species
 * (k in 1e-17..1e-10 s^-1, as cosmic-ray and photo processes). Every reaction
 * keeps the number of particles, so sum(x) is conserved: a check on the solver.
 */
export function massActionNetwork(options: MassActionOptions): {
  problem: OdeProblem;
  y0: Float64Array;
  reactions: number;
  /** The reactions, for cross-checks with other integrators; index -1 means none. */
  reactionList: { reactant1: Int32Array; reactant2: Int32Array; product1: Int32Array; product2: Int32Array; rate: Float64Array };
} {
  const n = options.species;
  const hubs = options.hubs ?? Math.min(12, Math.max(1, Math.floor(n / 10)));
  const perSpecies = options.reactionsPerSpecies ?? 10;
  const density = options.density ?? 1e4;
  const random = seededRandom(options.seed);
  const pick = (): number => Math.floor(random() * n);
  const logUniform = (lo: number, hi: number): number => 10 ** (lo + (hi - lo) * random());

  // Products are chemically related species: a neighbour in the order of
  // complexity (adding or removing an atom), now and then a distant one,
  // and often a hub as the by-product (H, H2, e-). That locality is what
  // keeps a real network's LU factors sparse.
  const related = (s: number): number => {
    if (s < hubs || random() < LONG_RANGE_PRODUCT) return pick();
    const offset = Math.floor(random() * (2 * PRODUCT_REACH + 1)) - PRODUCT_REACH;
    return Math.min(n - 1, Math.max(hubs, s + offset));
  };
  const r1: number[] = [];
  const r2: number[] = [];
  const p1: number[] = [];
  const p2: number[] = [];
  const k: number[] = [];
  const product = (avoid1: number, avoid2: number, make: () => number): number => {
    for (;;) {
      const s = make();
      if (s !== avoid1 && s !== avoid2) return s;
    }
  };
  for (let s = 0; s < n; s++) {
    for (let m = 0; m < perSpecies; m++) {
      const u = random();
      const partner =
        u < HUB_PARTNER
          ? Math.floor(random() * hubs)
          : u < HUB_PARTNER + CORE_PARTNER
            ? Math.min(n - 1, hubs + Math.floor(random() * CORE_SIZE))
            : pick();
      r1.push(s);
      r2.push(partner);
      p1.push(product(s, partner, () => related(s)));
      p2.push(product(s, partner, () => (random() < HUB_BYPRODUCT ? Math.floor(random() * hubs) : related(partner))));
      k.push(logUniform(-18, -9) * density);
    }
    r1.push(s);
    r2.push(-1);
    p1.push(product(s, s, () => related(s)));
    p2.push(-1);
    k.push(logUniform(-17, -10));
  }
  const nr = k.length;

  const rows: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
  for (let r = 0; r < nr; r++) {
    for (const s of [r1[r], r2[r], p1[r], p2[r]]) {
      if (s < 0) continue;
      rows[s].add(r1[r]);
      if (r2[r] >= 0) rows[s].add(r2[r]);
    }
  }
  const pattern = patternFromRows(rows);
  const position = (row: number, col: number): number => {
    for (let p = pattern.rowPtr[row]; p < pattern.rowPtr[row + 1]; p++) if (pattern.colIdx[p] === col) return p;
    throw new Error('entry outside the pattern');
  };
  // For reaction r: jacobianSlots[8r + 2m + v] = position of d(species m)/d(reactant v), or -1.
  const jacobianSlots = new Int32Array(8 * nr).fill(-1);
  for (let r = 0; r < nr; r++) {
    const affected = [r1[r], r2[r], p1[r], p2[r]];
    for (let m = 0; m < 4; m++) {
      if (affected[m] < 0) continue;
      jacobianSlots[8 * r + 2 * m] = position(affected[m], r1[r]);
      if (r2[r] >= 0) jacobianSlots[8 * r + 2 * m + 1] = position(affected[m], r2[r]);
    }
  }
  const R1 = Int32Array.from(r1);
  const R2 = Int32Array.from(r2);
  const P1 = Int32Array.from(p1);
  const P2 = Int32Array.from(p2);
  const K = Float64Array.from(k);
  const SIGN = [-1, -1, 1, 1];

  const problem: OdeProblem = {
    n,
    pattern,
    rhs(_t, x, dxdt) {
      dxdt.fill(0);
      for (let r = 0; r < nr; r++) {
        const b = R2[r];
        const rate = K[r] * x[R1[r]] * (b >= 0 ? x[b] : 1);
        dxdt[R1[r]] -= rate;
        if (b >= 0) dxdt[b] -= rate;
        dxdt[P1[r]] += rate;
        if (P2[r] >= 0) dxdt[P2[r]] += rate;
      }
    },
    jacobian(_t, x, values) {
      values.fill(0);
      for (let r = 0; r < nr; r++) {
        const b = R2[r];
        const d1 = K[r] * (b >= 0 ? x[b] : 1);
        const d2 = b >= 0 ? K[r] * x[R1[r]] : 0;
        const base = 8 * r;
        for (let m = 0; m < 4; m++) {
          const s1 = jacobianSlots[base + 2 * m];
          if (s1 < 0) continue;
          values[s1] += SIGN[m] * d1;
          const s2 = jacobianSlots[base + 2 * m + 1];
          if (s2 >= 0) values[s2] += SIGN[m] * d2;
        }
      }
    },
  };

  const y0 = new Float64Array(n);
  y0[0] = 0.5;
  for (let s = 1; s < hubs; s++) y0[s] = logUniform(-4, -2);
  for (let s = hubs; s < n; s++) y0[s] = random() < 0.8 ? logUniform(-12, -6) : 0;
  return { problem, y0, reactions: nr, reactionList: { reactant1: R1, reactant2: R2, product1: P1, product2: P2, rate: K } };
}
