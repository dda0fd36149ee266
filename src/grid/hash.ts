/**
 * Content hashes (sha256) of everything that changes a model's result: the
 * network file contents, the conditions, the grain options, the initial
 * composition, the output times, the solver settings and the tool version.
 * A stored model whose hash differs from the current one is stale.
 *
 * Numbers enter the hash through String(), the shortest text that reads back
 * to the same double, so the hash changes exactly when a value does.
 */
import { createHash } from 'node:crypto';
import { CONDITION_NAMES, type GrainOptions, type PhysicalConditions } from '../config/conditions.ts';
import type { SolverSettings } from '../model/types.ts';

const MODEL_HASH_TAG = 'hoarfrost-model-v1';
const GRID_HASH_TAG = 'hoarfrost-grid-v1';

/** What every model of a grid shares. */
export interface SharedModelInputs {
  networkHash: string;
  grain: GrainOptions;
  initial: Readonly<Record<string, number>>;
  timesYr: Float64Array;
  solver: SolverSettings;
  massActionOnly: boolean;
  /** H2 self-shielding on (photochemistry.h2_self_shielding). */
  selfShielding: boolean;
  toolVersion: string;
}

/** Hash of the inputs all points share; combined with each point's conditions by `modelHash`. */
export function sharedInputsHash(s: SharedModelInputs): string {
  const h = createHash('sha256').update(MODEL_HASH_TAG);
  h.update(`\ntool=${s.toolVersion}\nnetwork=${s.networkHash}`);
  h.update(`\ngrain=tunnelling:${s.grain.tunnelling},diffusionCompetition:${s.grain.diffusionCompetition},h2Formation:${s.grain.h2Formation},threeBody:${s.grain.threeBody},eleyRideal:${s.grain.eleyRideal},photodissociationInduced:${s.grain.photodissociationInduced},icePhotolysis:${s.grain.icePhotolysis},icePhotolysisFactor:${String(s.grain.icePhotolysisFactor)}`);
  // Added only when on, so that the models stored before the option existed keep their hashes.
  if (s.grain.mantle) h.update(`,mantle:true,surfaceLayers:${String(s.grain.surfaceLayers)}`);
  for (const name of Object.keys(s.initial).sort()) h.update(`\ninitial ${name}=${String(s.initial[name])}`);
  h.update(`\ntimes=${Array.from(s.timesYr, String).join(',')}`);
  h.update(`\nsolver=rtol:${String(s.solver.rtol)},atol:${String(s.solver.atol)},maxSteps:${String(s.solver.maxSteps ?? '')}`);
  h.update(`\nmassActionOnly=${s.massActionOnly}`);
  h.update(`\nselfShielding=${s.selfShielding}`);
  return h.digest('hex');
}

export function modelHash(sharedHash: string, conditions: PhysicalConditions): string {
  const h = createHash('sha256').update(sharedHash);
  for (const name of CONDITION_NAMES) h.update(`\n${name}=${String(conditions[name])}`);
  return h.digest('hex');
}

/** Hash of a whole grid: its points' ids and model hashes in grid order. Shards of one grid share it. */
export function gridHash(points: readonly { id: string; hash: string }[]): string {
  const h = createHash('sha256').update(GRID_HASH_TAG);
  for (const p of points) h.update(`\n${p.id} ${p.hash}`);
  return h.digest('hex');
}
