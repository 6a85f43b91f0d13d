import { z } from 'zod';
import { lineText, noteText, recordId } from '@shared/schemas/fields';

/** :id of /api/v1/alarm-groups/:id. */
export const alarmGroupIdParamsSchema = z.object({ id: recordId('Investigation id') });

/** POST /api/v1/alarm-groups: one investigation of several alarms. */
export const createAlarmGroupSchema = z.object({
  title: lineText('a title', { min: 3, max: 200 }),
  note: noteText('a note', { max: 2000 }).optional(),
  alarmIds: z.array(recordId('Alarm id'), { message: 'Choose the alarms of the investigation' }).min(1, 'Choose at least one alarm').max(500, 'Group at most 500 alarms at once'),
});
