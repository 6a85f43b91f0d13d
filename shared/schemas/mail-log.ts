// The sent-mail log as the API answers it: what the outbox sent, or still tries to send. Kept free of zod.

export const mailLogStatuses = ['pending', 'sent'] as const;
export type MailLogStatus = (typeof mailLogStatuses)[number];

/** One message of GET /api/v1/mail-log. */
export interface MailLogEntry {
  id: number;
  /** 'alarm' (one lot's signals) or 'digest' (the morning digest). */
  kind: string;
  to: string;
  subject: string;
  status: MailLogStatus;
  /** Send attempts so far; the last error while it is still pending. */
  attempts: number;
  lastError: string | null;
  queuedAt: string;
  sentAt: string | null;
}

/** GET /api/v1/mail-log: one page, the newest queued first. */
export interface MailLogPage {
  items: MailLogEntry[];
  page: number;
  pageSize: number;
  total: number;
}

/** GET /api/v1/mail-log/:id: the message with its text. */
export interface MailLogMessage extends MailLogEntry {
  text: string;
}
