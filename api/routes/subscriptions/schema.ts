import { z } from 'zod';

/** POST /api/v1/subscriptions body: a product line or a product, and which alerts. */
export const createSubscriptionSchema = z
  .object({
    lineId: z.number().int().positive().optional(),
    productId: z.number().int().positive().optional(),
    /** E-mail at once on out-of-specification results and points beyond a control limit. */
    immediate: z.boolean(),
    /** The morning digest of the night's new alarms. */
    digest: z.boolean(),
  })
  .refine((s) => (s.lineId === undefined) !== (s.productId === undefined), { message: 'Choose either a product line or a product', path: ['lineId'] })
  .refine((s) => s.immediate || s.digest, { message: 'Choose immediate alerts, the morning digest or both', path: ['immediate'] });

/** PATCH /api/v1/subscriptions/:id body. */
export const updateSubscriptionSchema = z
  .object({ immediate: z.boolean().optional(), digest: z.boolean().optional() })
  .refine((s) => s.immediate !== undefined || s.digest !== undefined, { message: 'Nothing to change' });

export const subscriptionIdParamsSchema = z.object({
  id: z.coerce.number({ message: 'Subscription id must be a number' }).int().positive(),
});
