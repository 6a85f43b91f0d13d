import { z } from 'zod';
import { recordId } from '@api/routes/catalogue-writes';

/** Body of the administrator's change, shared with the plant settings page. */
export { updatePlantSchema, type UpdatePlantInput } from '@shared/schemas/plants';

/** :id of /api/v1/plants/:id. */
export const plantParamsSchema = z.object({
  /** Numeric id of the plant. */
  id: recordId,
});
