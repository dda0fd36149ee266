/**
 * The grid's axes as the fit sees them: for each condition and for age_yr,
 * the distinct values (ascending) and, for every candidate, the index of its
 * value, so that profiles reduce chi^2 arrays by integer bins.
 */
import { AGE_PARAMETER, type CandidateTable } from './types.ts';

/** Grid values closer than this (relative) are the same value (round-off from a store's float conversions). */
const SAME_VALUE_RELATIVE = 1e-9;

export interface Axis {
  name: string;
  values: Float64Array;
  /** Index into values of every candidate (candidate = model * nTimes + time). */
  binOfCandidate: Int32Array;
  /** More than one value. */
  varied: boolean;
}

export interface GridAxes {
  /** Every condition of the table, in the table's order, then age_yr. */
  axes: Axis[];
  byName: Map<string, Axis>;
  /** Names of the varied axes that are not determined by other varied axes (ties excluded), age last. */
  independent: string[];
}

function distinctSorted(values: Float64Array): Float64Array {
  const sorted = Float64Array.from(values).sort();
  const out: number[] = [];
  for (const v of sorted) {
    const last = out[out.length - 1];
    if (out.length === 0 || Math.abs(v - last) > SAME_VALUE_RELATIVE * Math.max(Math.abs(v), Math.abs(last))) out.push(v);
  }
  return Float64Array.from(out);
}

function binOf(values: Float64Array, v: number): number {
  let lo = 0;
  let hi = values.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (values[mid] < v && Math.abs(values[mid] - v) > SAME_VALUE_RELATIVE * Math.abs(v)) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export function buildAxes(table: CandidateTable): GridAxes {
  const np = table.parameterNames.length;
  const nT = table.nTimes;
  const nC = table.nModels * nT;
  const axes: Axis[] = [];
  const modelBins: Int32Array[] = [];
  for (let p = 0; p < np; p++) {
    const column = new Float64Array(table.nModels);
    for (let m = 0; m < table.nModels; m++) column[m] = table.parameters[m * np + p];
    const values = distinctSorted(column);
    const perModel = Int32Array.from(column, (v) => binOf(values, v));
    modelBins.push(perModel);
    const bins = new Int32Array(nC);
    for (let c = 0; c < nC; c++) bins[c] = perModel[(c / nT) | 0];
    axes.push({ name: table.parameterNames[p], values, binOfCandidate: bins, varied: values.length > 1 });
  }
  const times = distinctSorted(table.timesYr);
  const timeBins = new Int32Array(nC);
  const timeBinOfIndex = Int32Array.from(table.timesYr, (t) => binOf(times, t));
  for (let c = 0; c < nC; c++) timeBins[c] = timeBinOfIndex[c % nT];
  axes.push({ name: AGE_PARAMETER, values: times, binOfCandidate: timeBins, varied: times.length > 1 });

  // A varied condition tied to another (dust temperature set equal to gas temperature)
  // adds no freedom: count it only when it splits the models' existing combinations.
  const independent: string[] = [];
  let combos = new Array<string>(table.nModels).fill('');
  let nCombos = 1;
  for (let p = 0; p < np; p++) {
    if (!axes[p].varied) continue;
    const next = combos.map((k, m) => `${k}|${modelBins[p][m]}`);
    const n = new Set(next).size;
    if (n > nCombos) {
      independent.push(axes[p].name);
      combos = next;
      nCombos = n;
    }
  }
  if (times.length > 1) independent.push(AGE_PARAMETER);
  return { axes, byName: new Map(axes.map((a) => [a.name, a])), independent };
}
