import { z } from 'zod';

/** POST /api/v1/spc-runs body (optional). */
export const startRunSchema = z
  .object({
    /** Only these characteristics; every active characteristic when absent. */
    characteristicIds: z.array(z.number().int().positive()).min(1, 'Name at least one characteristic').max(10_000).optional(),
  })
  .default({});

/** :id of /api/v1/spc-runs/:id. */
export const runIdParamsSchema = z.object({
  id: z.coerce.number({ message: 'Run id must be a number' }).int().positive('Run id must be positive'),
});

/** GET /api/v1/spc-runs query. */
export const listRunsQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
