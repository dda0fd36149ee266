/**
 * The model side of every observed quantity: log10 of the candidate's
 * abundance (numerator alone) or ratio (numerator over denominator, both
 * from the candidate's species columns), for every candidate, computed once
 * per fit and laid out candidate-major so the scoring loop reads it in order.
 */
import { UserError } from '../config/errors.ts';
import type { ObservedQuantity } from '../obs/types.ts';
import type { CandidateTable } from './types.ts';

/**
 * Abundances below this (zero or negative from a solver's round-off) are
 * raised to it before the log is taken, so that a species a model lacks
 * scores as very far off rather than as -Infinity (a numerical floor, far
 * below any observable abundance).
 */
export const ABUNDANCE_FLOOR = 1e-30;

/** One distinct (numerator, denominator) pair among the observed quantities. */
export interface QuantityTerm {
  /** Key `num` or `num/den`, the same for every sightline. */
  key: string;
  label: string;
  numerator: string;
  denominator?: string;
}

export interface ModelQuantities {
  terms: QuantityTerm[];
  nCandidates: number;
  /** log10 model value: values[candidate * terms.length + term]. Candidate = model * nTimes + time. */
  values: Float64Array;
}

export function termKey(numerator: string, denominator: string | undefined): string {
  return denominator === undefined ? numerator : `${numerator}/${denominator}`;
}

/** The distinct quantity terms of a list of observed quantities, in first-seen order. */
export function collectTerms(quantities: readonly ObservedQuantity[]): QuantityTerm[] {
  const seen = new Map<string, QuantityTerm>();
  for (const q of quantities) {
    const key = termKey(q.numerator, q.denominator);
    if (!seen.has(key)) seen.set(key, { key, label: q.label, numerator: q.numerator, denominator: q.denominator });
  }
  return [...seen.values()];
}

/**
 * Fills the model value matrix. Throws a UserError naming every species the
 * store lacks (the network does not form it, or the store predates it).
 */
export function buildModelQuantities(table: CandidateTable, terms: readonly QuantityTerm[], where: { file?: string } = {}): ModelQuantities {
  const speciesIndex = new Map(table.species.map((s, i) => [s, i]));
  const missing = new Set<string>();
  for (const t of terms) {
    if (!speciesIndex.has(t.numerator)) missing.add(t.numerator);
    if (t.denominator !== undefined && !speciesIndex.has(t.denominator)) missing.add(t.denominator);
  }
  if (missing.size > 0) {
    const list = [...missing].sort();
    throw new UserError(
      `the fit asks for ${list.map((s) => `'${s}'`).join(', ')}, but the model store has no abundance for ${list.length === 1 ? 'it' : 'them'} ` +
        `(it holds ${table.species.length} species: ${table.species.slice(0, 12).join(', ')}${table.species.length > 12 ? ', ...' : ''}). ` +
        'Check the spelling against the network (ice species end in (s), e.g. CO(s)), remove the quantity from fit.quantities, or rerun the models with a network that forms it.',
      { file: where.file, field: 'fit.quantities' },
    );
  }
  const nTerms = terms.length;
  const nCandidates = table.nModels * table.nTimes;
  // Each species' log10 is taken once per candidate, however many terms use it
  // (the reference species of ratios is in most of them).
  const used = [...new Set(terms.flatMap((t) => (t.denominator === undefined ? [t.numerator] : [t.numerator, t.denominator])))];
  const usedColumn = Int32Array.from(used, (s) => speciesIndex.get(s)!);
  const slotOf = new Map(used.map((s, i) => [s, i]));
  const numSlot = Int32Array.from(terms, (t) => slotOf.get(t.numerator)!);
  const denSlot = Int32Array.from(terms, (t) => (t.denominator === undefined ? -1 : slotOf.get(t.denominator)!));
  const logs = new Float64Array(used.length);
  const values = new Float64Array(nCandidates * nTerms);
  const ns = table.nSpecies;
  const ab = table.abundances;
  for (let c = 0; c < nCandidates; c++) {
    const row = c * ns;
    for (let k = 0; k < logs.length; k++) {
      const x = ab[row + usedColumn[k]];
      logs[k] = Math.log10(x > ABUNDANCE_FLOOR ? x : ABUNDANCE_FLOOR);
    }
    for (let j = 0; j < nTerms; j++) {
      const d = denSlot[j];
      values[c * nTerms + j] = d >= 0 ? logs[numSlot[j]] - logs[d] : logs[numSlot[j]];
    }
  }
  return { terms: [...terms], nCandidates, values };
}
