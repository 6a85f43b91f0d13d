// The outbox: any message (an alarm, the morning digest, later a report or a lot hold) is queued in
// the transaction that decides it, with what it is about, and sent afterwards. A message is claimed for a while (so two senders never send it at
// the same time), sent, and marked sent; a failure is kept with its error and tried again later,
// with a growing pause, for as long as it takes — a message is never dropped.
import { sql } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Database } from '../db/client';
import type { MailKind, MailRefs } from '../db/schema';
import { arr } from '../db/sql';
import { logger } from '../logger';

/** First retry after this; doubles with every failure up to MAX_BACKOFF_S. */
export const BASE_BACKOFF_S = 5;
export const MAX_BACKOFF_S = 3600;
const CLAIM_S = 120;
const BATCH = 20;

export function createTransport(smtpUrl: string): Transporter {
  // Base64 bodies: unambiguous for any text, and what the fake server decodes.
  return nodemailer.createTransport({ url: smtpUrl, connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 } as never, { textEncoding: 'base64' });
}

export const backoffSeconds = (attempts: number) => Math.min(MAX_BACKOFF_S, BASE_BACKOFF_S * 2 ** Math.max(0, attempts - 1));

/** One message to queue. */
export interface OutboxMail {
  kind: MailKind;
  /** At most one message per key: queuing the same key again does nothing (e.g. `alarm:7:user:3`). */
  dedupeKey: string;
  /** The address, and the user it belongs to when it is one. */
  to: { address: string; userId?: number | null };
  subject: string;
  text: string;
  html: string;
  /** What the message is about. */
  refs: MailRefs;
}

/** Queues messages in the caller's transaction, so they are sent only if it commits; returns how many were new. */
export async function queueMail(tx: Pick<Database, 'execute'>, mail: OutboxMail | readonly OutboxMail[]): Promise<number> {
  const mails: readonly OutboxMail[] = Array.isArray(mail) ? mail : [mail as OutboxMail];
  if (!mails.length) return 0;
  const column = <T>(pick: (m: OutboxMail) => T) => arr(mails.map(pick));
  const inserted = await tx.execute(sql`
    insert into mail_outbox (dedupe_key, kind, user_id, to_address, subject, text_body, html_body, refs)
    select * from unnest(${column((m) => m.dedupeKey)}::text[], ${column((m) => m.kind)}::text[], ${column((m) => m.to.userId ?? null)}::int[],
                         ${column((m) => m.to.address)}::text[], ${column((m) => m.subject)}::text[], ${column((m) => m.text)}::text[],
                         ${column((m) => m.html)}::text[], ${column((m) => JSON.stringify(m.refs))}::jsonb[])
    on conflict (dedupe_key) do nothing`);
  return inserted.rowCount ?? 0;
}

type ListRefs = { [K in keyof MailRefs]-?: NonNullable<MailRefs[K]> extends number[] ? K : never }[keyof MailRefs];

/** Messages about any of these alarms (or lots): a condition on `mail_outbox`. */
export const refersTo = (list: ListRefs, ids: readonly number[]) =>
  sql`exists (select from jsonb_array_elements(mail_outbox.refs -> ${list}::text) ref where ref::int = any(${arr([...ids])}::int[]))`;

type OutboxRow = { id: number; to_address: string; subject: string; text_body: string; html_body: string; attempts: number };

export interface SendOutcome {
  sent: number;
  failed: number;
}

/** Claims and sends every message that is due now. */
export async function sendDue(db: Database, transport: Pick<Transporter, 'sendMail'>, from: string): Promise<SendOutcome> {
  const outcome = { sent: 0, failed: 0 };
  for (;;) {
    const claimed = await db.execute<OutboxRow>(sql`
      update mail_outbox set locked_until = now() + make_interval(secs => ${CLAIM_S}), attempts = attempts + 1
      where id in (
        select id from mail_outbox
        where status = 'pending' and next_attempt_at <= now() and (locked_until is null or locked_until < now())
        order by id limit ${BATCH} for update skip locked)
      returning id, to_address, subject, text_body, html_body, attempts`);
    if (!claimed.rows.length) return outcome;
    for (const m of claimed.rows) {
      try {
        await transport.sendMail({ from, to: m.to_address, subject: m.subject, text: m.text_body, html: m.html_body, headers: { 'X-Prismline-Message': String(m.id) } });
        await db.execute(sql`update mail_outbox set status = 'sent', sent_at = now(), locked_until = null, last_error = null where id = ${m.id}`);
        outcome.sent++;
      } catch (err) {
        const message = (err as Error).message.slice(0, 1000);
        await db.execute(sql`
          update mail_outbox set locked_until = null, last_error = ${message}, next_attempt_at = now() + make_interval(secs => ${backoffSeconds(m.attempts)})
          where id = ${m.id}`);
        logger.warn({ outboxId: m.id, attempts: m.attempts, err: message }, 'e-mail not sent; it stays in the outbox for a retry');
        outcome.failed++;
      }
    }
  }
}

export interface MailSender {
  /** Sends what is due now, without waiting for the next poll. */
  flush(): Promise<SendOutcome>;
  stop(): Promise<void>;
}

/** Polls the outbox; errors (the database away, the relay down) are logged and the loop goes on. */
export function startMailSender(db: Database, transport: Pick<Transporter, 'sendMail'>, opts: { from: string; pollMs: number }): MailSender {
  let stopped = false;
  let timer: NodeJS.Timeout | null = null;
  let current: Promise<SendOutcome> | null = null;
  const tick = async (): Promise<SendOutcome> => {
    if (current) return current;
    current = sendDue(db, transport, opts.from)
      .catch((err) => {
        logger.warn({ err: (err as Error).message }, 'outbox not read');
        return { sent: 0, failed: 0 };
      })
      .finally(() => {
        current = null;
      });
    return current;
  };
  const loop = () => {
    if (stopped) return;
    timer = setTimeout(() => void tick().then(loop), opts.pollMs);
  };
  loop();
  return {
    flush: tick,
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      if (current) await current;
    },
  };
}
