/** `realizations:` section: Monte Carlo realizations of the rate coefficients (docs/uncertainty.md). */
import { z } from 'zod';

export const realizationsSection = z
  .object({
    /** Realizations per model; the spread of N draws is known to about 1/sqrt(2N) of itself (20: 16 %). */
    count: z.number().int().min(2).default(20),
    /** Seed of the draws: the same seed gives the same realizations on any number of workers and shards. */
    seed: z.number().int().min(0).max(Number.MAX_SAFE_INTEGER).default(1),
    /** Where to run them: at each fitted sightline's best-fit model (the one choice so far). */
    at: z.enum(['best-fits']).default('best-fits'),
    /** Correlation coefficient of the sensitivity table: Pearson (Wakelam et al. 2010) or Spearman (ranks). */
    method: z.enum(['pearson', 'spearman']).default('pearson'),
    /** Sightlines to run them for; default all fitted ones. */
    sightlines: z.array(z.string().min(1)).min(1).optional(),
  })
  .strict();
export type RealizationsSection = z.infer<typeof realizationsSection>;
