import { z } from 'zod';
import { mailLogStatuses } from '@shared/schemas/mail-log';

const INT32_MAX = 2_147_483_647;

/** GET /api/v1/mail-log query. */
export const mailLogQuerySchema = z.object({
  /** Page number, from 1. */
  page: z.coerce.number({ message: 'The page must be a number' }).int('The page must be a whole number').min(1, 'Pages start at 1').max(100_000, 'There are not that many pages').default(1),
  /** Messages a page, at most 100. */
  pageSize: z.coerce.number({ message: 'The page size must be a number' }).int('The page size must be a whole number').min(1, 'Show at least one message').max(100, 'Show at most 100 messages a page').default(50),
  /** Only messages sent, or only those still waiting. */
  status: z.enum(mailLogStatuses, { message: 'The status is pending or sent' }).optional(),
});

/** :id of /api/v1/mail-log/:id. */
export const mailLogIdParamsSchema = z.object({
  id: z.coerce.number({ message: 'Message id must be a number' }).int('Message id must be a whole number').positive('Message id must be positive').max(INT32_MAX, 'No such message'),
});
