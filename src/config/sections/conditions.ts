/** `conditions:` section: fixed values and grid axes. Owned by the grid room (src/grid). */
import { z } from 'zod';

const range = z
  .object({ from: z.number(), to: z.number(), count: z.number().int().positive(), scale: z.enum(['log', 'linear']).default('log') })
  .strict();
const tie = z.object({ tie: z.string() }).strict();

export const conditionAxis = z.union([z.number(), z.array(z.number()), range, tie]);
export const conditionsSection = z.record(z.string(), conditionAxis);
export type ConditionsSection = z.infer<typeof conditionsSection>;
