/**
 * Element and charge totals of a state, and their drift from the start: a
 * check of the integration at every output (docs/physics.md section 7).
 */
import type { Network } from '../chem/network-types.ts';
import type { ConservationReport } from './types.ts';

/** Whether drift d is worse than the worst so far; NaN (a failed state) is the worst of all and stays so. */
function worse(d: number, worst: number): boolean {
  return !Number.isNaN(worst) && (Number.isNaN(d) || d > worst);
}

export class ConservationCheck {
  readonly elements: string[];
  /** counts[e * n + i]: atoms of element e in species i. */
  private readonly counts: Float64Array;
  private readonly charges: Float64Array;
  private readonly initialTotals: Float64Array;
  private readonly initialCharge: number;
  private readonly initialPositive: number;
  private readonly drift: Float64Array;
  private chargeDrift = 0;

  constructor(network: Network, y0: Float64Array) {
    const n = network.species.length;
    this.elements = [...new Set(network.species.flatMap((s) => Object.keys(s.elements)))].sort();
    this.counts = new Float64Array(this.elements.length * n);
    this.charges = Float64Array.from(network.species, (s) => s.charge);
    network.species.forEach((s, i) => {
      this.elements.forEach((el, e) => (this.counts[e * n + i] = s.elements[el] ?? 0));
    });
    this.initialTotals = this.totals(y0);
    this.initialCharge = this.charge(y0);
    this.initialPositive = this.positiveCharge(y0);
    this.drift = new Float64Array(this.elements.length);
  }

  private totals(y: Float64Array): Float64Array {
    const n = y.length;
    const out = new Float64Array(this.elements.length);
    for (let e = 0; e < out.length; e++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += this.counts[e * n + i] * y[i];
      out[e] = s;
    }
    return out;
  }

  private charge(y: Float64Array): number {
    let q = 0;
    for (let i = 0; i < y.length; i++) q += this.charges[i] * y[i];
    return q;
  }

  private positiveCharge(y: Float64Array): number {
    let q = 0;
    for (let i = 0; i < y.length; i++) if (this.charges[i] > 0) q += this.charges[i] * y[i];
    return q;
  }

  /** Record the drift of one output state. */
  observe(y: Float64Array): void {
    const totals = this.totals(y);
    for (let e = 0; e < totals.length; e++) {
      const ref = this.initialTotals[e];
      const d = ref > 0 ? Math.abs(totals[e] - ref) / ref : Math.abs(totals[e]);
      if (worse(d, this.drift[e])) this.drift[e] = d;
    }
    // Charge balance relative to the total positive charge (the electron budget).
    const scale = Math.max(this.initialPositive, this.positiveCharge(y));
    const dq = Math.abs(this.charge(y) - this.initialCharge);
    const rel = scale > 0 ? dq / scale : dq;
    if (worse(rel, this.chargeDrift)) this.chargeDrift = rel;
  }

  report(): ConservationReport {
    const perElement: Record<string, number> = {};
    let worst = 'charge';
    let max = this.chargeDrift;
    this.elements.forEach((el, e) => {
      perElement[el] = this.drift[e];
      if (worse(this.drift[e], max)) {
        max = this.drift[e];
        worst = el;
      }
    });
    return { maxRelativeDrift: max, worst, perElement, chargeDrift: this.chargeDrift };
  }
}
