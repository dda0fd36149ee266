/**
 * Grid parameters a sightline is held at: with `visual_extinction: { tie:
 * sightlines }` the grid holds models at each sightline's own (binned) model
 * A_V, and a sightline may only be compared with the models of its bin; with
 * `visual_extinction: { layers: ... }` with the columns of its own binned
 * line-of-sight A_V.
 */
import type { Pipeline } from '../config/pipeline.ts';
import { DEFAULT_MODEL_AV_FRACTION } from '../config/sections/observations.ts';
import { DEFAULT_SIGHTLINE_AV_STEP, sightlineModelAv } from '../grid/sightlines.ts';
import type { ObservationSet } from '../obs/types.ts';
import { sightlineColumnAv } from './columns.ts';

export function heldParameters(pipeline: Pipeline, observations: ObservationSet): Record<string, Record<string, number>> | undefined {
  // With layers each sightline is compared with the columns of its own line-of-sight A_V.
  const columnAv = sightlineColumnAv(pipeline, observations);
  if (columnAv) return Object.fromEntries([...columnAv].map(([id, av]) => [id, { visual_extinction: av }]));
  const axis = pipeline.config.conditions.visual_extinction;
  if (typeof axis !== 'object' || Array.isArray(axis) || !('tie' in axis) || axis.tie !== 'sightlines') return undefined;
  const fraction = pipeline.config.observations?.model_av_fraction ?? DEFAULT_MODEL_AV_FRACTION;
  const step = axis.step ?? DEFAULT_SIGHTLINE_AV_STEP;
  const held: Record<string, Record<string, number>> = {};
  for (const s of observations.sightlines) {
    if (s.av !== undefined) held[s.id] = { visual_extinction: sightlineModelAv(Math.max(0, s.av), fraction, step) };
  }
  return held;
}
