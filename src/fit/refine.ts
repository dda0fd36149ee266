/**
 * Sub-grid resolution by interpolating the models (docs/statistics.md
 * section 5; physics.md section 12): log10 abundances are interpolated
 * multilinearly in the log10 of each refined grid parameter and in log10
 * time, onto a mesh `factor` times finer, so that best fits and intervals
 * are not snapped to the grid's values. The refined table is a candidate
 * table like the store's (every later step reads it unchanged); a refined
 * point that is not a grid value gets the model id of its lower corner with
 * a leading `~` and its sub-steps along the refined axes after a `+`
 * (`~p0a1b2+1.3`), so that every point of the mesh has an id of its own.
 *
 * Only a full cell is interpolated: a refined point whose 2^d corner models
 * are not all in the store (grid exclusions, failed models) is left out. A
 * parameter tied to a refined one (dust temperature equal to gas temperature)
 * is interpolated with it; a parameter held per sightline (model A_V tied to
 * the sightline's own) is not refined.
 *
 * The error of the interpolation is measured at held-out grid values: every
 * interior value of a refined axis predicted from its two neighbours (linear
 * in log), per quantity. That leave-one-out error is taken at twice the grid
 * spacing; linear interpolation errs as h^2 f''/8 at most across a cell of
 * width h (any numerical analysis text, e.g. Numerical Recipes 3.1), so at the
 * grid's own spacing the error is a quarter of it. The quarter, summed in
 * quadrature over the refined axes, joins the model uncertainty of that
 * quantity.
 */
import { ABUNDANCE_FLOOR, type ModelQuantities } from './model-quantities.ts';
import type { GridAxes } from './axes.ts';
import { AGE_PARAMETER, type CandidateTable } from './types.ts';

/** Ratio of the leave-one-out error (spacing 2h) to the largest error of linear interpolation at spacing h: (2h)^2 / h^2. */
const LEAVE_ONE_OUT_TO_CELL = 4;

export interface RefinedGrid {
  table: CandidateTable;
  /** Refinement factor per refined axis (1 where an axis is not refined). */
  factor: number;
  /** Names of the refined axes (grid conditions, then age_yr). */
  axes: string[];
}

export interface InterpolationError {
  /** Quantity term key -> error of the interpolation at the grid spacing, dex. */
  errorDex: Map<string, number>;
  /** The leave-one-out error itself (at twice the spacing), dex, by term key. */
  leaveOneOutDex: Map<string, number>;
  /** Held-out grid values the measure used. */
  heldOut: number;
}

function log10Coordinate(v: number): number {
  return Math.log10(v);
}

/** The axes a refinement may act on: varied, independent, positive, not held. */
export function refinableAxes(axes: GridAxes, held: ReadonlySet<string>): string[] {
  return axes.independent.filter((name) => {
    const axis = axes.byName.get(name)!;
    return !held.has(name) && axis.values.length > 1 && axis.values[0] > 0;
  });
}

/** Candidates of the refined table for a factor: an upper bound (every cell full). */
export function refinedSize(table: CandidateTable, axes: GridAxes, names: readonly string[], factor: number): number {
  let models = table.nModels;
  let times = table.nTimes;
  for (const name of names) {
    const n = axes.byName.get(name)!.values.length;
    if (name === AGE_PARAMETER) times = (n - 1) * factor + 1;
    else models = (models / n) * ((n - 1) * factor + 1);
  }
  return Math.ceil(models) * times;
}

/**
 * The refined table. `names` are the axes to refine (from refinableAxes);
 * `factor` the number of steps each grid interval is cut into (1: a copy).
 */
export function refineTable(table: CandidateTable, axes: GridAxes, names: readonly string[], factor: number): RefinedGrid {
  const np = table.parameterNames.length;
  const nT = table.nTimes;
  const nS = table.nSpecies;
  const conditionNames = names.filter((n) => n !== AGE_PARAMETER);
  const refineTime = names.includes(AGE_PARAMETER) && factor > 1;
  const refined = conditionNames.map((n) => table.parameterNames.indexOf(n));
  const d = refined.length;
  const modelBins = (m: number) => table.parameterNames.map((name) => axes.byName.get(name)!.binOfCandidate[m * nT]);
  // Every model by the bins of all its conditions.
  const keyOf = (bins: readonly number[]) => bins.join(',');
  const byKey = new Map<string, number>();
  const binsOf: number[][] = [];
  for (let m = 0; m < table.nModels; m++) {
    const bins = modelBins(m);
    binsOf.push(bins);
    byKey.set(keyOf(bins), m);
  }
  const nodeCounts = refined.map((p) => axes.byName.get(table.parameterNames[p])!.values.length);

  const logAb = (m: number, t: number, s: number) => {
    const x = table.abundances[(m * nT + t) * nS + s];
    return Math.log10(x > ABUNDANCE_FLOOR ? x : ABUNDANCE_FLOOR);
  };

  const parameters: number[] = [];
  const modelIds: string[] = [];
  const rows: Float64Array[] = [];
  const steps = factor > 1 && d > 0 ? factor : 1;
  const corners = 1 << d;
  const cornerModels = new Int32Array(corners);
  const cornerWeights = new Float64Array(corners);
  for (let m = 0; m < table.nModels; m++) {
    const bins = binsOf[m];
    // The refined points this model owns: sub-steps 0..steps-1 along each refined axis, 0 only at the last value.
    const sub = new Array<number>(d).fill(0);
    for (;;) {
      let complete = true;
      for (let c = 0; c < corners && complete; c++) {
        const cb = bins.slice();
        let w = 1;
        for (let j = 0; j < d; j++) {
          const up = (c >> j) & 1;
          const frac = sub[j] / steps;
          if (up === 1 && sub[j] === 0) {
            w = 0;
            break;
          }
          cb[refined[j]] += up;
          w *= up === 1 ? frac : 1 - frac;
        }
        cornerWeights[c] = w;
        if (w === 0) {
          cornerModels[c] = -1;
          continue;
        }
        const cm = byKey.get(keyOf(cb));
        if (cm === undefined) complete = false;
        else cornerModels[c] = cm;
      }
      if (complete) {
        const isNode = sub.every((k) => k === 0);
        const params = new Array<number>(np);
        for (let p = 0; p < np; p++) {
          // A parameter equal at every corner (a fixed one, or a held axis) is copied, not recomputed through its log.
          let same = true;
          for (let c = 0; c < corners; c++) if (cornerWeights[c] > 0 && table.parameters[cornerModels[c] * np + p] !== table.parameters[m * np + p]) same = false;
          if (isNode || same) {
            params[p] = table.parameters[m * np + p];
            continue;
          }
          let acc = 0;
          let log = true;
          for (let c = 0; c < corners; c++) if (cornerWeights[c] > 0 && !(table.parameters[cornerModels[c] * np + p] > 0)) log = false;
          for (let c = 0; c < corners; c++) {
            if (cornerWeights[c] === 0) continue;
            const v = table.parameters[cornerModels[c] * np + p];
            acc += cornerWeights[c] * (log ? Math.log10(v) : v);
          }
          params[p] = log ? Math.pow(10, acc) : acc;
        }
        const row = new Float64Array(nT * nS);
        for (let t = 0; t < nT; t++) {
          for (let s = 0; s < nS; s++) {
            let acc = 0;
            for (let c = 0; c < corners; c++) if (cornerWeights[c] > 0) acc += cornerWeights[c] * logAb(cornerModels[c], t, s);
            row[t * nS + s] = acc;
          }
        }
        parameters.push(...params);
        modelIds.push(isNode ? table.modelIds[m] : `~${table.modelIds[m]}+${sub.join('.')}`);
        rows.push(row);
      }
      // Next combination of sub-steps.
      let j = 0;
      while (j < d) {
        const last = bins[refined[j]] === nodeCounts[j] - 1;
        if (!last && sub[j] + 1 < steps) {
          sub[j]++;
          break;
        }
        sub[j] = 0;
        j++;
      }
      if (j === d) break;
    }
  }

  // Time: log abundance linear in log time between output times (the first time kept as it is when not positive).
  const timeSteps = refineTime && table.timesYr[0] > 0 ? factor : 1;
  const times: number[] = [];
  const timeFrom: number[] = [];
  const timeWeight: number[] = [];
  for (let t = 0; t < nT; t++) {
    const last = t === nT - 1;
    for (let k = 0; k < (last ? 1 : timeSteps); k++) {
      const w = k / timeSteps;
      times.push(w === 0 ? table.timesYr[t] : Math.pow(10, (1 - w) * Math.log10(table.timesYr[t]) + w * Math.log10(table.timesYr[t + 1])));
      timeFrom.push(t);
      timeWeight.push(w);
    }
  }
  const nT2 = times.length;
  const abundances = new Float64Array(rows.length * nT2 * nS);
  rows.forEach((row, m) => {
    for (let k = 0; k < nT2; k++) {
      const t = timeFrom[k];
      const w = timeWeight[k];
      const base = (m * nT2 + k) * nS;
      for (let s = 0; s < nS; s++) {
        const lv = w === 0 ? row[t * nS + s] : (1 - w) * row[t * nS + s] + w * row[(t + 1) * nS + s];
        abundances[base + s] = Math.pow(10, lv);
      }
    }
  });
  return {
    table: { ...table, nModels: rows.length, nTimes: nT2, parameters: Float64Array.from(parameters), modelIds, timesYr: Float64Array.from(times), abundances },
    factor,
    axes: [...conditionNames, ...(timeSteps > 1 ? [AGE_PARAMETER] : [])],
  };
}

/**
 * The leave-one-out error of linear interpolation per quantity term, on the
 * grid's own model values (see the file's comment), for the refined axes.
 */
export function interpolationError(table: CandidateTable, axes: GridAxes, model: ModelQuantities, names: readonly string[]): InterpolationError {
  const nTerms = model.terms.length;
  const nT = table.nTimes;
  const np = table.parameterNames.length;
  const sumSq = names.map(() => new Float64Array(nTerms));
  const counts = names.map(() => 0);
  const keyOf = (m: number, p: number, bin: number) => {
    const parts: number[] = [];
    for (let q = 0; q < np; q++) parts.push(q === p ? bin : axes.byName.get(table.parameterNames[q])!.binOfCandidate[m * nT]);
    return parts.join(',');
  };
  names.forEach((name, a) => {
    const axis = axes.byName.get(name)!;
    const u = Array.from(axis.values, log10Coordinate);
    if (name === AGE_PARAMETER) {
      for (let m = 0; m < table.nModels; m++) {
        for (let t = 1; t < nT - 1; t++) {
          const w = (u[t] - u[t - 1]) / (u[t + 1] - u[t - 1]);
          for (let j = 0; j < nTerms; j++) {
            const base = m * nT;
            const pred = (1 - w) * model.values[(base + t - 1) * nTerms + j] + w * model.values[(base + t + 1) * nTerms + j];
            const e = pred - model.values[(base + t) * nTerms + j];
            sumSq[a][j] += e * e;
          }
          counts[a]++;
        }
      }
      return;
    }
    const p = table.parameterNames.indexOf(name);
    const byKey = new Map<string, number>();
    for (let m = 0; m < table.nModels; m++) byKey.set(keyOf(m, -1, 0), m);
    for (let m = 0; m < table.nModels; m++) {
      const bin = axis.binOfCandidate[m * nT];
      if (bin === 0 || bin === axis.values.length - 1) continue;
      const below = byKey.get(keyOf(m, p, bin - 1));
      const above = byKey.get(keyOf(m, p, bin + 1));
      if (below === undefined || above === undefined) continue;
      const w = (u[bin] - u[bin - 1]) / (u[bin + 1] - u[bin - 1]);
      for (let t = 0; t < nT; t++) {
        for (let j = 0; j < nTerms; j++) {
          const pred = (1 - w) * model.values[(below * nT + t) * nTerms + j] + w * model.values[(above * nT + t) * nTerms + j];
          const e = pred - model.values[(m * nT + t) * nTerms + j];
          sumSq[a][j] += e * e;
        }
        counts[a]++;
      }
    }
  });
  const errorDex = new Map<string, number>();
  const leaveOneOutDex = new Map<string, number>();
  model.terms.forEach((term, j) => {
    let cell = 0;
    let loo = 0;
    names.forEach((_, a) => {
      if (counts[a] === 0) return;
      const rms2 = sumSq[a][j] / counts[a];
      loo += rms2;
      cell += rms2 / (LEAVE_ONE_OUT_TO_CELL * LEAVE_ONE_OUT_TO_CELL);
    });
    errorDex.set(term.key, Math.sqrt(cell));
    leaveOneOutDex.set(term.key, Math.sqrt(loo));
  });
  return { errorDex, leaveOneOutDex, heldOut: counts.reduce((s, c) => s + c, 0) };
}
