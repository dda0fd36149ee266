/**
 * Sizes checked before anything is allocated, so a slip of a few zeros in a
 * file gives a located error instead of minutes of work and a crash. Each
 * limit sits far above what a study needs; those a real user could outgrow
 * can be raised through an environment variable (a whole number), which a
 * computing centre can also lower for everyone.
 *
 * | limit | default | variable |
 * |---|---|---|
 * | grid points | 1,000,000 | HOARFROST_MAX_GRID_POINTS |
 * | output times per model | 10,000 | (fixed) |
 * | observation rows (sightlines or map pixels) | 1,000,000 | HOARFROST_MAX_OBSERVATION_ROWS |
 * | observation text file (CSV, TSV, YAML, VOTable) | 256 MB | HOARFROST_MAX_OBSERVATION_BYTES |
 * | characters in one observation cell (a sightline name) | 1,000 | (fixed) |
 *
 * Why these: planning costs about 1 kB of memory per grid point and a model
 * takes seconds, so 1e6 points is a week on 100 cores and about 1 GB to
 * plan (a 4e6-point grid took 3.7 GB for `--status`). 10,000 output times is
 * 2,500 per decade over four decades of age; each model stores times x
 * species doubles. A million rows covers a 1000 x 1000 pixel map; 256 MB of
 * text is about 1.6 million rows of a typical table (50 MB held 318,000).
 * No name in a table of sightlines is near 1,000 characters.
 */
import { UserError } from './errors.ts';

export const DEFAULT_MAX_GRID_POINTS = 1_000_000;
export const MAX_OUTPUT_TIMES = 10_000;
export const DEFAULT_MAX_OBSERVATION_ROWS = 1_000_000;
export const DEFAULT_MAX_OBSERVATION_BYTES = 256 * 1024 * 1024;
export const MAX_CELL_CHARACTERS = 1_000;

/** A limit, from its environment variable when that is set. */
export function limit(variable: string, fallback: number): number {
  const text = process.env[variable];
  if (text === undefined || text.trim() === '') return fallback;
  if (!/^\s*\d+\s*$/.test(text) || Number(text) < 1) throw new UserError(`the environment variable ${variable} must be a whole number of at least 1, found '${text}'. Unset it to use the default ${fallback}.`);
  return Number(text);
}

export const maxGridPoints = (): number => limit('HOARFROST_MAX_GRID_POINTS', DEFAULT_MAX_GRID_POINTS);
export const maxObservationRows = (): number => limit('HOARFROST_MAX_OBSERVATION_ROWS', DEFAULT_MAX_OBSERVATION_ROWS);
export const maxObservationBytes = (): number => limit('HOARFROST_MAX_OBSERVATION_BYTES', DEFAULT_MAX_OBSERVATION_BYTES);
