/**
 * `initial:` section: the composition a model starts from. A preset name
 * (`low-metal`), a path to a composition file, a mapping of species to
 * fractional abundances, or a first stage: a model of its own (conditions
 * and an age, starting from one of the above) whose final composition starts
 * every model of the pipeline (docs/cloud-structure.md section 2).
 *
 *   initial:
 *     first_stage:
 *       from: low-metal
 *       age_yr: 1.0e6
 *       conditions: { density: 1.0e3, visual_extinction: 1.5, gas_temperature: 15, dust_temperature: 15 }
 */
import { z } from 'zod';

export const compositionSpec = z.union([z.string(), z.record(z.string(), z.number().min(0))], {
  error: 'expected a preset name (low-metal), a path to a composition file, or a mapping of species to fractional abundances',
});

export const firstStageSpec = z
  .object({
    /** The first stage's own initial composition. */
    from: compositionSpec.default('low-metal'),
    /** Its duration, years. */
    age_yr: z.number().positive(),
    /** Its physical conditions (names of src/config/conditions.ts; the others take their defaults). Each a single number. */
    conditions: z.record(z.string(), z.number()).default({}),
  })
  .strict();
export type FirstStageSpec = z.infer<typeof firstStageSpec>;

export const initialSection = z.union([compositionSpec, z.object({ first_stage: firstStageSpec }).strict()], {
  error: 'expected a preset name (low-metal), a path to a composition file, a mapping of species to fractional abundances, or { first_stage: { from, age_yr, conditions } }',
});
