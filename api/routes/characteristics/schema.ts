import { z } from 'zod';
import { recordId } from '@api/routes/catalogue-writes';

/** Bodies of the administrator's writes, shared with the catalogue forms. */
export { createCharacteristicSchema, updateCharacteristicSchema } from '@shared/schemas/catalogue';

/** :id of /api/v1/characteristics/:id. */
export const characteristicParamsSchema = z.object({
  /** Numeric id of the characteristic. */
  id: recordId,
});
