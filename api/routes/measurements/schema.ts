import { z } from 'zod';

/** POST /api/v1/measurements (manual entry) and PATCH /api/v1/measurements/:id (correction): shared with the entry form. */
export { manualEntrySchema, correctMeasurementSchema, type ManualEntry } from '@shared/ingest';

/** :id of /api/v1/measurements/:id. */
export const measurementIdParamsSchema = z.object({
  /** Numeric measurement id. */
  id: z.coerce.number({ message: 'Measurement id must be a number' }).int().positive(),
});
