import { z } from 'zod';

/** GET /api/v1/alarms query. */
export const listAlarmsQuerySchema = z.object({
  status: z.enum(['open', 'acknowledged', 'closed']).optional(),
  characteristicId: z.coerce.number().int().positive().optional(),
  /** Part of a lot number or characteristic code. */
  q: z.string().trim().max(100).optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(200),
});

/** :id of /api/v1/alarms/:id. */
export const alarmIdParamsSchema = z.object({
  id: z.coerce.number({ message: 'Alarm id must be a number' }).int('Alarm id must be a whole number').positive('Alarm id must be positive').max(2_147_483_647, 'No such alarm'),
});

/** POST /api/v1/alarms/:id/acknowledge and /close body. */
export const alarmNoteSchema = z.object({
  /** What was found or decided, for the record. */
  note: z.string({ message: 'A note is required' }).trim().min(3, 'Write a note of at least 3 characters: what was checked or decided').max(2000, 'The note is too long'),
});
