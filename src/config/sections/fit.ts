/** `fit:` section. Owned by the fit room (src/fit). */
import { z } from 'zod';

export const fitQuantity = z
  .object({
    species: z.string(),
    /** `abundance`: X = N/N_H; `ratio`: N/N(reference). */
    as: z.enum(['abundance', 'ratio']).default('ratio'),
  })
  .strict();

export const fitSection = z
  .object({
    quantities: z.array(fitQuantity).min(1),
    /** Model-uncertainty floor, dex (common practice: a factor of 2). */
    model_sigma_dex: z.number().min(0).default(0.3),
    levels: z.array(z.number().gt(0).lt(1)).default([0.683, 0.954]),
  })
  .strict();
export type FitSection = z.infer<typeof fitSection>;
