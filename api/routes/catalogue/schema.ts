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

/** Bodies of the administrator's writes, shared with the catalogue forms. */
export {
  createCharacteristicSchema,
  createLineSchema,
  createProductSchema,
  updateCharacteristicSchema,
  updateLineSchema,
  updateProductSchema,
} from '@shared/schemas/catalogue';

/** :id of /api/v1/lines/:id, /api/v1/products/:id and /api/v1/characteristics/:id. */
export const catalogueIdParamsSchema = z.object({
  /** Numeric id of the line, product or characteristic. */
  id: z.coerce.number({ message: 'The id must be a number' }).int('The id must be a whole number').positive('The id must be positive'),
});
