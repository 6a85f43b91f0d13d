import { z } from 'zod';
import { recordId } from '@api/routes/catalogue-writes';

/** Bodies of the administrator's writes, shared with the catalogue forms. */
export { createProductSchema, updateProductSchema } from '@shared/schemas/catalogue';

/** :id of /api/v1/products/:id. */
export const productParamsSchema = z.object({
  /** Numeric id of the product. */
  id: recordId,
});
