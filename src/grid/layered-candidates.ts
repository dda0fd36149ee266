/**
 * The candidate table of layered sightlines (src/grid/layers.ts): the store
 * holds one model per layer cell; a sightline is compared with columns, the
 * sum over the cells it crosses of each cell model's abundances weighted by
 * the cell's share of N_H. Each row of the result is one column: the other
 * conditions of its layer models, with visual_extinction the line-of-sight
 * A_V it was summed for, so a sightline is held at its own A_V (src/fit/held.ts)
 * like a sightline tied to a single model. Abundances become column-averaged
 * abundances <x> = N(X)/N_H, ratios of them column ratios N(X)/N(Y).
 */
import type { PhysicalConditions } from '../config/conditions.ts';
import { UserError } from '../config/errors.ts';
import { isTrackParameterName } from '../config/sections/track.ts';
import type { CandidateTable } from '../fit/types.ts';
import { pointId, type LayeredColumns, type TrackParameters } from './expand.ts';
import { cellAv, sightlineLayers } from './layers.ts';

const AV = 'visual_extinction';
/** Relative tolerance matching a stored model's A_V with a cell's middle. */
const SAME_AV_RELATIVE = 1e-9;
/** Prefix of a column's id (a model id starts with `p`). */
const COLUMN_ID_PREFIX = 'c';

export interface LayeredTable {
  table: CandidateTable;
  /** Columns left out because a layer model failed or is missing, as sentences. */
  warnings: string[];
}

/**
 * Columns for every line-of-sight A_V of `losAvs` (already binned) and every
 * combination of the other conditions in the table.
 */
export function layeredCandidates(table: CandidateTable, columns: LayeredColumns, losAvs: readonly number[]): LayeredTable {
  const np = table.parameterNames.length;
  const avParam = table.parameterNames.indexOf(AV);
  if (avParam < 0) throw new RangeError('the candidate table has no visual_extinction');
  const { nTimes, nSpecies } = table;
  const rowSize = nTimes * nSpecies;
  // Models grouped by their other conditions; in each group, the model row of each cell.
  const groups = new Map<string, { first: number; cellRow: Map<number, number> }>();
  for (let m = 0; m < table.nModels; m++) {
    const key: number[] = [];
    for (let p = 0; p < np; p++) if (p !== avParam) key.push(table.parameters[m * np + p]);
    const k = key.join(',');
    let g = groups.get(k);
    if (!g) groups.set(k, (g = { first: m, cellRow: new Map() }));
    const av = table.parameters[m * np + avParam];
    const cell = Math.round(av / columns.step - 0.5);
    if (Math.abs(cellAv(cell, columns.step) - av) <= SAME_AV_RELATIVE * av) g.cellRow.set(cell, m);
  }
  const layers = losAvs.map((av) => sightlineLayers(columns.geometry, av, columns.step));
  const parameters: number[] = [];
  const modelIds: string[] = [];
  const rows: number[][] = [];
  const weights: Float64Array[] = [];
  const missing = new Map<number, number>();
  for (const g of groups.values()) {
    losAvs.forEach((losAv, i) => {
      const { cells, weights: w } = layers[i];
      const found = Array.from(cells, (c) => g.cellRow.get(c) ?? -1);
      if (found.includes(-1)) {
        missing.set(losAv, (missing.get(losAv) ?? 0) + 1);
        return;
      }
      const conditions = {} as Record<string, number>;
      const track: TrackParameters = {};
      table.parameterNames.forEach((name, p) => {
        const v = p === avParam ? losAv : table.parameters[g.first * np + p];
        parameters.push(v);
        if (isTrackParameterName(name)) track[name] = v;
        else conditions[name] = v;
      });
      // Track parameters on grid axes enter the id as they do a point's (src/grid/expand.ts).
      modelIds.push(COLUMN_ID_PREFIX + pointId(conditions as unknown as PhysicalConditions, Object.keys(track).length > 0 ? track : undefined).slice(1));
      rows.push(found);
      weights.push(w);
    });
  }
  const n = rows.length;
  if (n === 0) {
    throw new UserError('no sightline column could be summed: the model store lacks the layer models (or every one failed). Rerun `hoarfrost grid` on this pipeline.');
  }
  const abundances = new Float64Array(n * rowSize);
  for (let r = 0; r < n; r++) {
    const out = r * rowSize;
    const found = rows[r];
    const w = weights[r];
    for (let q = 0; q < found.length; q++) {
      const src = found[q] * rowSize;
      const wq = w[q];
      for (let j = 0; j < rowSize; j++) abundances[out + j] += wq * table.abundances[src + j];
    }
  }
  const warnings = [...missing].map(([av, count]) => `${count} column(s) at line-of-sight A_V = ${av} mag left out: one of their layer models failed or is missing from the store.`);
  return {
    table: { ...table, nModels: n, parameters: Float64Array.from(parameters), modelIds, abundances },
    warnings,
  };
}
