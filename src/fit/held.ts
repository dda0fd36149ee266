/**
 * Parameters held at one value for one sightline: the grid ties model A_V to
 * each sightline's observed A_V, so a sightline may only be compared with the
 * models of its own A_V. Builds the sightline's model mask.
 */
import { UserError } from '../config/errors.ts';
import type { GridAxes } from './axes.ts';
import type { ObservationVector } from './observation-vector.ts';
import type { CandidateTable } from './types.ts';

/** Relative tolerance when matching a held value to a grid value. */
const HELD_VALUE_RELATIVE = 1e-6;

export function holdParameters(obs: ObservationVector, held: Readonly<Record<string, number>>, table: CandidateTable, axes: GridAxes, where: { file?: string } = {}, withMask = true): void {
  const names = Object.keys(held);
  if (names.length === 0) return;
  const mask = new Uint8Array(table.nModels).fill(1);
  for (const name of names) {
    const axis = axes.byName.get(name);
    const value = held[name];
    const p = table.parameterNames.indexOf(name);
    if (axis === undefined || p < 0) throw new RangeError(`held parameter ${name} is not a grid condition`);
    let bin = -1;
    axis.values.forEach((v, i) => {
      if (Math.abs(v - value) <= HELD_VALUE_RELATIVE * Math.max(Math.abs(v), Math.abs(value), 1e-300)) bin = i;
    });
    if (bin < 0) {
      throw new UserError(
        `sightline ${obs.sightline} is compared with models at ${name} = ${value}, but the model store has none there (its values: ${Array.from(axis.values).join(', ')}). ` +
          'The store was computed for other sightlines or another step: rerun `hoarfrost grid` on this pipeline.',
        { file: where.file, field: `conditions.${name}` },
      );
    }
    const np = table.parameterNames.length;
    for (let m = 0; m < table.nModels; m++) {
      const v = table.parameters[m * np + p];
      if (Math.abs(v - axis.values[bin]) > HELD_VALUE_RELATIVE * Math.abs(axis.values[bin])) mask[m] = 0;
    }
    obs.held[name] = axis.values[bin];
  }
  if (!mask.includes(1)) {
    throw new UserError(`sightline ${obs.sightline}: no model of the store has ${names.map((n) => `${n} = ${obs.held[n]}`).join(' and ')} together. Rerun \`hoarfrost grid\` on this pipeline.`, { file: where.file });
  }
  if (withMask) obs.modelMask = mask;
}
