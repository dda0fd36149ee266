/**
 * The fit stage's query: every finished model of the store's current grid,
 * with the chosen species at every output time, decoded straight from the
 * BLOBs into one Float64Array (no object per model in the decode loop).
 */
import { CONDITION_NAMES } from '../config/conditions.ts';
import { UserError } from '../config/errors.ts';
import type { CandidateTable } from '../fit/types.ts';
import { ModelStore } from './store.ts';

const BYTES_PER_VALUE = 8;

export function loadCandidates(storeFile: string, species: string[]): CandidateTable {
  const store = ModelStore.open(storeFile, { readonly: true });
  try {
    const meta = store.meta();
    if (!meta) throw new UserError('the model store holds no grid yet. Run `hoarfrost grid` on the pipeline first.', { file: storeFile });
    const nAll = meta.species.length;
    const nTimes = meta.timesYr.length;
    const where = new Map(meta.species.map((s, i) => [s, i]));
    const missing = species.filter((s) => !where.has(s));
    if (missing.length > 0) {
      throw new UserError(
        `the model store has no species ${missing.map((s) => `'${s}'`).join(', ')}; the network of this grid has ${nAll} species (${meta.species.slice(0, 12).join(', ')}${nAll > 12 ? ', ...' : ''}). Check the spelling (ice species end in (s)), or add the species to the network and rerun the grid.`,
        { file: storeFile },
      );
    }
    const columns = Int32Array.from(species, (s) => where.get(s)!);
    const nSpecies = species.length;
    // Track parameters on grid axes are parameters of the fit like the conditions, after them.
    const parameterNames: string[] = [...CONDITION_NAMES, ...meta.trackAxes];
    const nParams = parameterNames.length;
    const n = store.finishedCount();
    const parameters = new Float64Array(n * nParams);
    const abundances = new Float64Array(n * nTimes * nSpecies);
    const modelIds = new Array<string>(n);
    let k = 0;
    for (const row of store.finishedRows(meta.trackAxes)) {
      const blob = row[3] as Buffer;
      if (row[1] !== nTimes || row[2] !== nAll || blob.byteLength !== nTimes * nAll * BYTES_PER_VALUE) {
        throw new UserError(`model ${String(row[0])} has ${String(row[1])} times x ${String(row[2])} species, the grid ${nTimes} x ${nAll}: the store is inconsistent. Rerun \`hoarfrost grid\` to recompute it.`, { file: storeFile });
      }
      modelIds[k] = row[0] as string;
      for (let p = 0; p < nParams; p++) parameters[k * nParams + p] = row[4 + p] as number;
      const base = k * nTimes * nSpecies;
      for (let t = 0; t < nTimes; t++) {
        const rowOffset = t * nAll;
        const outOffset = base + t * nSpecies;
        for (let s = 0; s < nSpecies; s++) abundances[outOffset + s] = blob.readDoubleLE((rowOffset + columns[s]) * BYTES_PER_VALUE);
      }
      k++;
    }
    return {
      parameterNames,
      nModels: k,
      nTimes,
      nSpecies,
      parameters,
      modelIds,
      timesYr: meta.timesYr,
      species: [...species],
      abundances,
    };
  } finally {
    store.close();
  }
}
