import { z } from 'zod';
import { instant } from '@shared/schemas/charts';

export { excludePointSchema, freezeLimitsSchema, includePointSchema } from '@shared/schemas/charts';

/** :id of /api/v1/characteristics/:id/… */
export const characteristicParamsSchema = z.object({
  /** Characteristic id. */
  id: z.coerce.number().int('The characteristic id must be a whole number').positive('The characteristic id must be positive'),
});

/** :id and :lotId of DELETE /api/v1/characteristics/:id/exclusions/:lotId */
export const exclusionParamsSchema = characteristicParamsSchema.extend({
  /** Lot id of the excluded point. */
  lotId: z.coerce.number().int('The lot id must be a whole number').positive('The lot id must be positive'),
});

/** GET /api/v1/characteristics/:id/chart?from=&to= — production time, both optional and inclusive. */
export const chartQuerySchema = z
  .object({
    /** First production time charted (ISO 8601). */
    from: instant().optional(),
    /** Last production time charted (ISO 8601). */
    to: instant().optional(),
  })
  .refine((v) => !v.from || !v.to || v.from.getTime() <= v.to.getTime(), { path: ['to'], message: 'to must not be before from' });
