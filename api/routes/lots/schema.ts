import { z } from 'zod';

/** GET /api/v1/lots query. */
export const listLotsQuerySchema = z.object({
  /** Product code to narrow to. */
  product: z.string().trim().optional(),
  /** Start of a lot number, e.g. "L1-2611". */
  q: z.string().trim().max(64).optional(),
  /** At most this many, newest first. */
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

/** :lotNumber of /api/v1/lots/:lotNumber. */
export const lotParamsSchema = z.object({
  /** Lot number as stored. */
  lotNumber: z.string().trim().min(1).max(64),
});
