/**
 * The candidate table the fit and the report read: the store's models as
 * they are, or, with visual_extinction through layers, the columns of the
 * sightlines summed over their layer models (src/grid/layered-candidates.ts).
 */
import { UserError } from '../config/errors.ts';
import type { Pipeline } from '../config/pipeline.ts';
import type { CandidateTable } from '../fit/types.ts';
import { loadCandidates } from '../grid/candidates.ts';
import { layeredColumns } from '../grid/expand.ts';
import { layeredCandidates } from '../grid/layered-candidates.ts';
import { binLineOfSightAv } from '../grid/layers.ts';
import type { ObservationSet } from '../obs/types.ts';

/** The line-of-sight A_V of each sightline's column (binned to the layer step), by sightline id; undefined without layers. */
export function sightlineColumnAv(pipeline: Pipeline, observations: ObservationSet): Map<string, number> | undefined {
  const columns = layeredColumns(pipeline.config.conditions);
  if (!columns) return undefined;
  const out = new Map<string, number>();
  for (const s of observations.sightlines) if (s.av !== undefined && s.av > 0) out.set(s.id, binLineOfSightAv(s.av, columns.step));
  return out;
}

/** With layered columns, no ice threshold may be subtracted from the observed A_V: the layers make it. */
export function checkLayeredObservations(pipeline: Pipeline): void {
  if (!layeredColumns(pipeline.config.conditions)) return;
  const threshold = pipeline.config.observations?.ice_threshold_av ?? 0;
  if (threshold > 0) {
    throw new UserError(
      `observations.ice_threshold_av is ${threshold} mag, but visual_extinction runs through layers: the layered column makes the ice threshold itself (its outer layers hold no ice), so subtracting one as well counts it twice. Set ice_threshold_av: 0.`,
      { file: pipeline.file, line: pipeline.yaml.lineOf(['observations', 'ice_threshold_av']), field: 'observations.ice_threshold_av' },
    );
  }
}

export function fitCandidates(pipeline: Pipeline, storeFile: string, species: string[], observations: ObservationSet): { table: CandidateTable; warnings: string[] } {
  const table = loadCandidates(storeFile, species);
  const columns = layeredColumns(pipeline.config.conditions);
  if (!columns) return { table, warnings: [] };
  checkLayeredObservations(pipeline);
  const avs = [...new Set(sightlineColumnAv(pipeline, observations)!.values())].sort((a, b) => a - b);
  return layeredCandidates(table, columns, avs);
}
