import { z } from 'zod';
import { alarmOutcomes, alarmStatuses } from '@shared/schemas/alarms';
import { causeCategories } from '@shared/schemas/causes';
import { lineText, noteText, recordId } from '@shared/schemas/fields';

/** A signal's rule as the filter names it: a run rule, out-of-spec or capability. */
const rule = z.enum(['out-of-spec', 'capability', 'we1', 'we2', 'we3', 'we4', 'trend', 'alternating', 'hugging', 'mixture'], { message: 'Choose a signal from the list' });

/** GET /api/v1/alarms query. */
export const listAlarmsQuerySchema = z.object({
  status: z.enum(alarmStatuses, { message: `status must be one of ${alarmStatuses.join(', ')}` }).optional(),
  characteristicId: recordId('Characteristic id').optional(),
  productId: recordId('Product id').optional(),
  lineId: recordId('Line id').optional(),
  rule: rule.optional(),
  /** A user's id, `me` (the signed-in user) or `nobody` (not assigned). */
  assignee: z.union([z.enum(['me', 'nobody']), recordId('Assignee id')]).optional(),
  /** Only alarms detected at least this many days ago (older than), or at most (newer than). */
  olderThanDays: z.coerce.number({ message: 'Give the age in days' }).int('Give the age in whole days').min(0).max(3650).optional(),
  newerThanDays: z.coerce.number({ message: 'Give the age in days' }).int('Give the age in whole days').min(0).max(3650).optional(),
  /** What matters this morning (default), newest or oldest detection first. */
  sort: z.enum(['priority', 'newest', 'oldest'], { message: 'sort must be priority, newest or oldest' }).default('priority'),
  /** Part of a lot number or characteristic code. */
  q: z.preprocess((v) => (v === '' ? undefined : v), lineText('the search text', { max: 100 }).optional()),
  limit: z.coerce.number().int().min(1).max(1000).default(200),
});

/** :id of /api/v1/alarms/:id. */
export const alarmIdParamsSchema = z.object({ id: recordId('Alarm id') });

/** PATCH /api/v1/alarms/:id: a step of the status flow and what it needs, the assignee, the investigation. */
export const alarmPatchSchema = z
  .object({
    /** The next status (shared/schemas/alarms.ts alarmSteps). */
    status: z.enum(alarmStatuses, { message: `status must be one of ${alarmStatuses.join(', ')}` }).optional(),
    /** Closing: what was found. */
    outcome: z.enum(alarmOutcomes, { message: 'Choose what was found: an assignable cause, no cause, or a false alarm' }).optional(),
    /** Closing with an assignable cause: its category. */
    causeCategory: z.enum(causeCategories, { message: 'Choose a cause category from the list' }).optional(),
    /** What was checked or found (closing), why it opens again (reopening), or a note on the step. */
    note: noteText('a note', { max: 2000 }).optional(),
    /** Closing with an assignable cause: leave the alarm's point out of the limit estimate. */
    excludePoints: z.boolean({ message: 'excludePoints must be true or false' }).optional(),
    /** Who follows it up; null: nobody. */
    assigneeId: recordId('Assignee id').nullable().optional(),
    /** The investigation it belongs to; null: none. */
    groupId: recordId('Investigation id').nullable().optional(),
  })
  .strict()
  .refine((b) => b.status !== undefined || b.assigneeId !== undefined || b.groupId !== undefined, { message: 'Say what to change: a status, the assignee or the investigation' });
export type AlarmPatch = z.infer<typeof alarmPatchSchema>;

/** POST /api/v1/alarms/:id/comments */
export const alarmCommentSchema = z.object({
  /** The comment, for everyone following the alarm. */
  body: noteText('a comment', { max: 4000 }),
});

/** POST /api/v1/alarms/acknowledge: several open alarms at once. */
export const bulkAcknowledgeSchema = z.object({
  ids: z.array(recordId('Alarm id'), { message: 'Choose the alarms to acknowledge' }).min(1, 'Choose at least one alarm').max(500, 'Acknowledge at most 500 alarms at once'),
  /** What was checked, for the record. */
  note: noteText('a note', { max: 2000 }).optional(),
});

