import { z } from 'zod';

/** POST /api/v1/characteristics/:id/spec-revisions body: shared with the web form. */
export { specRevisionSchema, type SpecRevisionInput } from '@shared/schemas/plant-records';

/** :id of /api/v1/characteristics/:id/spec-revisions. */
export const characteristicIdParamsSchema = z.object({
  /** Numeric characteristic id. */
  id: z.coerce.number({ message: 'Characteristic id must be a number' }).int().positive('Characteristic id must be positive'),
});
