import { z } from 'zod';

/** POST /api/v1/process-events body: shared with the web form. */
export { processEventSchema, type ProcessEventInput } from '@shared/schemas/plant-records';

/** GET /api/v1/process-events query. */
export const listProcessEventsQuerySchema = z.object({
  /** Only events from this instant on (ISO 8601). */
  from: z.iso.datetime({ offset: true, message: 'from: use an ISO date and time' }).optional(),
  /** Only events before this instant (ISO 8601). */
  to: z.iso.datetime({ offset: true, message: 'to: use an ISO date and time' }).optional(),
});
