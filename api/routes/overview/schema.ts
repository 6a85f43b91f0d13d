import { z } from 'zod';
import { overviewPeriods } from '@shared/schemas/overview';

/** GET /api/v1/overview?line=&family=&days= */
export const overviewQuerySchema = z.object({
  /** Production line code, e.g. "L1"; all lines when absent. */
  line: z.string().trim().min(1).max(32).optional(),
  /** Product family, e.g. "levelling"; all families when absent. */
  family: z.string().trim().min(1).max(64).optional(),
  /** Days of production looked back on for trend, signals and capability. */
  days: z.coerce
    .number({ message: `days must be one of ${overviewPeriods.join(', ')}` })
    .refine((d) => (overviewPeriods as readonly number[]).includes(d), `days must be one of ${overviewPeriods.join(', ')}`)
    .default(30),
});
