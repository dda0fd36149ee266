/**
 * `conditions:` and `exclude:` sections: fixed values, grid axes, ties and
 * exclusion rules. Owned by the grid room (src/grid), which expands them.
 *
 *   conditions:
 *     density: { from: 1e3, to: 1e6, count: 7 }        # logarithmic range (default scale)
 *     gas_temperature: [10, 15, 20]                     # a list
 *     dust_temperature: { tie: gas_temperature }        # equal to another condition (times `factor`)
 *     visual_extinction: { tie: sightlines, step: 0.5 } # model A_V from the observed sightlines
 *     # or: visual_extinction: { layers: slab, step: 0.5 }  # each sightline a column through layers
 *     uv_field: 1                                       # a fixed value
 *   exclude:
 *     - dust_temperature: { above: gas_temperature }
 *     - density: { above: 1e5 }
 *       visual_extinction: { below: 2 }
 *
 * Names are checked against CONDITION_NAMES, and values against each
 * condition's limits, when the grid is expanded (src/grid/expand.ts), where
 * the errors can name the line.
 */
import { z } from 'zod';

/** A range of values, as grid axes (conditions, track parameters) take it. */
export const rangeAxis = z
  .object({
    from: z.number(),
    to: z.number(),
    count: z.number().int().positive(),
    scale: z.enum(['log', 'linear']).default('log'),
  })
  .strict();

/** Tie to another condition (value = factor * that condition), or, for visual_extinction, to the observed sightlines. */
const tie = z
  .object({
    tie: z.string(),
    factor: z.number().positive().optional(),
    /** Sightline ties only: model A_V values are binned to multiples of this step, mag. */
    step: z.number().positive().optional(),
  })
  .strict();

/**
 * visual_extinction only: each sightline's column is a sum over layers from
 * the cloud surface to its deepest point, each layer a model at its own
 * depth A_V (docs/cloud-structure.md section 1).
 */
const layers = z
  .object({
    layers: z.enum(['slab', 'sphere']),
    /** Cell width of the layers in A_V, mag. */
    step: z.number().positive().optional(),
    /** Sphere only: the sightline's impact parameter as a fraction of the radius (0 = through the centre). */
    impact_parameter: z.number().min(0).optional(),
  })
  .strict();

export const conditionAxis = z.union([z.number(), z.array(z.number()), rangeAxis, tie, layers], {
  error: 'expected a finite number, a list of numbers, a range { from, to, count }, a tie { tie: NAME } or, for visual_extinction, layers { layers: slab }',
});
export const conditionsSection = z.record(z.string(), conditionAxis);
export type ConditionsSection = z.infer<typeof conditionsSection>;
export type ConditionAxisSpec = z.infer<typeof conditionAxis>;

/** A bound in an exclusion rule: a number, or the name of another condition of the same point. */
const bound = z.union([z.number(), z.string()]);

const comparison = z
  .object({
    above: bound.optional(),
    below: bound.optional(),
    at_least: bound.optional(),
    at_most: bound.optional(),
    equals: bound.optional(),
  })
  .strict()
  .refine((c) => Object.values(c).some((v) => v !== undefined), { message: 'a comparison needs at least one of above, below, at_least, at_most, equals' });

/** One rule: every condition listed must match for a point to be left out (rules are alternatives). */
export const excludeRule = z
  .record(z.string(), z.union([z.number(), comparison]))
  .refine((r) => Object.keys(r).length > 0, { message: 'an exclusion rule needs at least one condition' });
export const excludeSection = z.array(excludeRule);
export type ExcludeRule = z.infer<typeof excludeRule>;
export type ExcludeSection = z.infer<typeof excludeSection>;
