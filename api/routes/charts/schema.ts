import { z } from 'zod';
import { chartPeriods, instant } from '@shared/schemas/charts';

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

/**
 * GET /api/v1/characteristics/:id/chart?period=&lot=&from=&to= — production time, inclusive. Without
 * any, the period since the limits in force apply; with a lot alone, the first period that holds it.
 */
export const chartQuerySchema = z
  .object({
    /** One of the offered periods. */
    period: z.enum(chartPeriods, { message: `period must be one of ${chartPeriods.join(', ')}` }).optional(),
    /** A lot to bring into the period (links from alarms). */
    lot: z
      .string()
      .trim()
      .min(1, 'Give a lot number')
      .max(64, 'A lot number has at most 64 characters')
      .regex(/^[^\p{Cc}]+$/u, 'A lot number has no control characters')
      .optional(),
    /** First production time charted (ISO 8601). */
    from: instant().optional(),
    /** Last production time charted (ISO 8601). */
    to: instant().optional(),
  })
  .refine((v) => !v.from || !v.to || v.from.getTime() <= v.to.getTime(), { path: ['to'], message: 'to must not be before from' })
  .refine((v) => !v.period || (!v.from && !v.to), { path: ['period'], message: 'Give either a period or from and to, not both' });
