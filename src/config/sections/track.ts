/**
 * `physical_track:` section: conditions that change with time
 * (docs/cloud-structure.md section 3), starting from each grid point's
 * conditions. Owned by the model room (src/model/physical-track.ts).
 *
 *   physical_track: { kind: free-fall, final_density: 1.0e5, retardation: 0.5, av_growth: true }
 *   physical_track: { kind: warm-up, final_temperature: 200, duration_yr: 1.0e5, shape: power-law, exponent: 2 }
 */
import { z } from 'zod';

const freeFall = z
  .object({
    kind: z.literal('free-fall'),
    /** n_H at which the collapse stops, cm^-3; above every start density of the grid. */
    final_density: z.number().positive(),
    /** Retardation factor B, 0 < B <= 1 (1: free fall). */
    retardation: z.number().positive().max(1).default(1),
    /** A_V grows as (n_H/n_0)^(2/3) from the point's visual_extinction. */
    av_growth: z.boolean().default(true),
  })
  .strict();

const warmUp = z
  .object({
    kind: z.literal('warm-up'),
    /** Gas and dust temperature at the end of the ramp, K. */
    final_temperature: z.number().positive(),
    /** Duration of the ramp, years. */
    duration_yr: z.number().positive(),
    /** linear, or power-law T - T_0 ~ t^exponent. */
    shape: z.enum(['linear', 'power-law']).default('linear'),
    exponent: z.number().positive().optional(),
  })
  .strict()
  .refine((w) => w.shape === 'power-law' || w.exponent === undefined, { path: ['exponent'], message: 'exponent applies to shape: power-law only; remove it, or set shape: power-law' })
  .refine((w) => w.shape === 'linear' || w.exponent !== undefined, { path: ['exponent'], message: 'a power-law ramp needs its exponent (2 for the t^2 heating of Garrod & Herbst 2006)' });

export const physicalTrackSection = z.discriminatedUnion('kind', [freeFall, warmUp]);
export type PhysicalTrackSection = z.infer<typeof physicalTrackSection>;
