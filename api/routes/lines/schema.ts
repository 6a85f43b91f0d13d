import { z } from 'zod';
import { recordId } from '@api/routes/catalogue-writes';

/** Bodies of the administrator's writes, shared with the catalogue forms. */
export { createLineSchema, updateLineSchema } from '@shared/schemas/catalogue';

/** :id of /api/v1/lines/:id. */
export const lineParamsSchema = z.object({
  /** Numeric id of the production line. */
  id: recordId,
});
