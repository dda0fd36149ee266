/**
 * `physical_track:` section: conditions that change with time
 * (docs/cloud-structure.md section 3), starting from each grid point's
 * conditions. Owned by the model room (src/model/physical-track.ts).
 *
 *   physical_track: { kind: free-fall, final_density: 1.0e5, retardation: 0.5, av_growth: true }
 *   physical_track: { kind: warm-up, final_temperature: 200, duration_yr: 1.0e5, shape: power-law, exponent: 2 }
 *
 * The numeric parameters of a track (TRACK_PARAMETERS) may be grid axes,
 * written as the conditions' are: a list or a range { from, to, count }.
 *   physical_track: { kind: free-fall, final_density: 1.0e5, retardation: [0.3, 1] }
 * The grid (src/grid/expand.ts) multiplies its points by their values, and
 * the fit and report name them like conditions.
 */
import { z } from 'zod';
import { rangeAxis } from './conditions.ts';

/** A track parameter: a number, or a grid axis (a list, or a range as the conditions take). */
const trackValue = (single: z.ZodNumber) =>
  z.union([single, z.array(z.number()), rangeAxis], { error: 'expected a number, a list of numbers or a range { from, to, count }' });
export type TrackValueSpec = number | number[] | z.infer<typeof rangeAxis>;

/** The numeric track parameters that may be grid axes: name as in the pipeline file (and in the fit's outputs), unit, limits. */
export const TRACK_PARAMETERS = {
  final_density: { unit: 'cm^-3', description: 'n_H at which the free-fall collapse stops', min: 0, max: undefined },
  retardation: { unit: '', description: 'retardation factor B of the free-fall collapse', min: 0, max: 1 },
  final_temperature: { unit: 'K', description: 'gas and dust temperature at the end of the warm-up', min: 0, max: undefined },
  duration_yr: { unit: 'yr', description: 'duration of the warm-up ramp', min: 0, max: undefined },
} as const satisfies Record<string, { unit: string; description: string; min: number; max: number | undefined }>;
export type TrackParameterName = keyof typeof TRACK_PARAMETERS;
export const TRACK_PARAMETER_NAMES = Object.keys(TRACK_PARAMETERS) as TrackParameterName[];

export function isTrackParameterName(s: string): s is TrackParameterName {
  return Object.prototype.hasOwnProperty.call(TRACK_PARAMETERS, s);
}

/** A sentence saying what is wrong with a track parameter's value, or undefined when it is acceptable. */
export function checkTrackValue(name: TrackParameterName, value: number): string | undefined {
  const info = TRACK_PARAMETERS[name];
  if (!Number.isFinite(value)) return `${name} must be a finite number, found ${value}`;
  if (!(value > info.min)) return `${name} must be greater than ${info.min}${info.unit ? ' ' + info.unit : ''}, found ${value}`;
  if (info.max !== undefined && value > info.max) return `${name} must be at most ${info.max}, found ${value}`;
  return undefined;
}

const freeFall = z
  .object({
    kind: z.literal('free-fall'),
    /** n_H at which the collapse stops, cm^-3; above every start density of the grid. */
    final_density: trackValue(z.number().positive()),
    /** Retardation factor B, 0 < B <= 1 (1: free fall). */
    retardation: trackValue(z.number().positive().max(1)).default(1),
    /** A_V grows as (n_H/n_0)^(2/3) from the point's visual_extinction. */
    av_growth: z.boolean().default(true),
  })
  .strict();

const warmUp = z
  .object({
    kind: z.literal('warm-up'),
    /** Gas and dust temperature at the end of the ramp, K. */
    final_temperature: trackValue(z.number().positive()),
    /** Duration of the ramp, years. */
    duration_yr: trackValue(z.number().positive()),
    /** linear, or power-law T - T_0 ~ t^exponent. */
    shape: z.enum(['linear', 'power-law']).default('linear'),
    exponent: z.number().positive().optional(),
  })
  .strict()
  .refine((w) => w.shape === 'power-law' || w.exponent === undefined, { path: ['exponent'], message: 'exponent applies to shape: power-law only; remove it, or set shape: power-law' })
  .refine((w) => w.shape === 'linear' || w.exponent !== undefined, { path: ['exponent'], message: 'a power-law ramp needs its exponent (2 for the t^2 heating of Garrod & Herbst 2006)' });

export const physicalTrackSection = z.discriminatedUnion('kind', [freeFall, warmUp]);
export type PhysicalTrackSection = z.infer<typeof physicalTrackSection>;
