/** `observations:` section of a pipeline file. Owned by the observations room (src/obs). */
import { z } from 'zod';

export const observationsSection = z
  .object({
    /** Path to the table, YAML list, VOTable or FITS file (relative to the pipeline file). */
    file: z.string(),
    format: z.enum(['csv', 'tsv', 'yaml', 'votable', 'fits']).optional(),
    /** N_H/A_V, cm^-2 mag^-1 (Bohlin, Savage & Drake 1978). */
    nh_per_av: z.number().positive().default(1.87e21),
    /** Extinction subtracted from A_V for ice species (0 to turn off). */
    ice_threshold_av: z.number().min(0).default(0),
    /** Model-cloud A_V as a fraction of the observed line-of-sight A_V (0.5 toward background stars: common practice). */
    model_av_fraction: z.number().positive().max(1).default(0.5),
    /** Reference species for ratios. */
    reference: z.string().default('H2O(s)'),
  })
  .strict();
export type ObservationsSection = z.infer<typeof observationsSection>;
