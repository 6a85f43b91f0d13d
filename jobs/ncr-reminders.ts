// The daily reminders of NCR actions: to the owner (and the NCR's assignee) when an open action falls
// due within two days at the plant, and again when it is overdue. The dedupe key names the action, its
// due date and which reminder it is, so each goes once however often the job runs, and a new due date
// is reminded afresh.
import { sql } from 'drizzle-orm';
import { plantDay, type PlantDateFormat } from '@shared/time';
import type { Database } from '@api/db/client';
import { composeNcrActionReminder, ncrMailFacts } from '@api/mail/ncr-mail';
import { queueMail, type OutboxMail } from '@api/mail/outbox';
import { DUE_SOON_DAYS } from '@api/ncrs/view';

type DueRow = {
  action_id: number;
  ncr_id: number;
  kind: string;
  description: string;
  due_date: string;
  owner_id: number;
  owner_name: string;
  owner_email: string;
  assignee_id: number | null;
  assignee_email: string | null;
  assignee_active: boolean | null;
  date_format: PlantDateFormat;
};

/** Reminders go out for at most this many actions a run; the rest wait for the next day. */
const MAX_ACTIONS_PER_RUN = 1000;

/** Queues the plant's action reminders of the plant's day of `now`; answers how many messages were new. */
export async function queueNcrReminders(db: Pick<Database, 'execute'>, opts: { plantId: number; timeZone: string; now: Date; publicUrl: string }): Promise<number> {
  const today = plantDay(opts.now, opts.timeZone);
  const res = await db.execute<DueRow>(sql`
    select x.id as action_id, x.ncr_id, x.kind, x.description, x.due_date::text as due_date, x.owner_id, uo.name as owner_name, uo.email as owner_email,
      n.assignee_id, ua.email as assignee_email, ua.active as assignee_active, pt.date_format
    from ncr_actions x
    join ncrs n on n.id = x.ncr_id
    join plants pt on pt.id = n.plant_id
    join users uo on uo.id = x.owner_id
    left join users ua on ua.id = n.assignee_id
    where n.plant_id = ${opts.plantId} and n.status <> 'closed' and x.done_date is null and uo.active
      and x.due_date <= ${today}::date + ${DUE_SOON_DAYS}::int
    order by x.due_date, x.id limit ${MAX_ACTIONS_PER_RUN}`);
  if (!res.rows.length) return 0;
  const facts = await ncrMailFacts(db, [...new Set(res.rows.map((r) => r.ncr_id))]);
  const mails: OutboxMail[] = [];
  for (const r of res.rows) {
    const ncr = facts.get(r.ncr_id)!;
    const state = r.due_date < today ? 'overdue' : 'due-soon';
    const composed = composeNcrActionReminder(
      ncr,
      { actionId: r.action_id, kind: r.kind, description: r.description, ownerName: r.owner_name, dueDate: r.due_date },
      state,
      opts.publicUrl,
      { timeZone: opts.timeZone, dateFormat: r.date_format },
    );
    const to = [{ id: r.owner_id, email: r.owner_email }];
    if (r.assignee_id !== null && r.assignee_id !== r.owner_id && r.assignee_active) to.push({ id: r.assignee_id, email: r.assignee_email! });
    for (const u of to) {
      mails.push({
        kind: 'ncr-action',
        dedupeKey: `ncr-action:${r.action_id}:due:${r.due_date}:${state}:user:${u.id}`,
        to: { address: u.email, userId: u.id },
        ...composed,
        refs: { ncrId: r.ncr_id, ncrActionId: r.action_id },
      });
    }
  }
  return queueMail(db, mails);
}
