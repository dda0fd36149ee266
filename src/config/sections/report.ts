/** `report:` section. Owned by the report room (src/report). */
import { z } from 'zod';

export const reportSection = z
  .object({
    figures: z.array(z.string()).optional(),
    formats: z.array(z.enum(['svg', 'png', 'pdf'])).default(['svg', 'png']),
  })
  .strict();
export type ReportSection = z.infer<typeof reportSection>;
