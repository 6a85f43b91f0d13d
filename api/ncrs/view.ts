// An NCR as the pages read it: the report, its lots with their standing now, alarms, actions,
// attachments, its history in sentences, the steps it may take and what keeps it from closing.
import { sql, type SQL } from 'drizzle-orm';
import { signalName } from '@shared/spc';
import { causeCategoryWords, type CauseCategory } from '@shared/schemas/causes';
import {
  lotDispositionWords,
  ncrStatusWords,
  ncrTransitions,
  type LotDisposition,
  type NcrActionDue,
  type NcrActionKind,
  type NcrActionView,
  type NcrAlarmView,
  type NcrAttachmentView,
  type NcrHistoryEntry,
  type NcrList,
  type NcrListItem,
  type NcrLotView,
  type NcrRaisedFrom,
  type NcrSeverity,
  type NcrStatus,
  type NcrView,
} from '@shared/schemas/ncrs';
import type { HoldSource, LotStatus } from '@shared/schemas/lots';
import { formatPlantDay, plantDay, type PlantClock, type PlantDateFormat } from '@shared/time';
import { inTurn } from '@api/db/sql';
import { lotStatusSql } from '@api/lots/holds';
import { chartLink } from '@api/mail/compose';
import type { Executor } from '@api/spc/db';
import { closingBlockers } from './flow';

const iso = (d: Date | string | null): string | null => (d == null ? null : new Date(d).toISOString());
const isoOf = (d: Date | string): string => new Date(d).toISOString();

/** How soon an open action counts as due for the overview and the reminders: today and the next two plant days. */
export const DUE_SOON_DAYS = 2;

/** The attachment's download address under the API. */
export const attachmentUrl = (ncrId: number, attachmentId: number) => `/api/v1/ncrs/${ncrId}/attachments/${attachmentId}`;

type NcrRow = {
  id: number;
  plant_id: number;
  number: string;
  title: string;
  description: string;
  status: NcrStatus;
  severity: NcrSeverity;
  raised_from: NcrRaisedFrom;
  product_id: number | null;
  product_code: string | null;
  product_name: string | null;
  assignee_id: number | null;
  assignee_name: string | null;
  root_cause_category: CauseCategory | null;
  root_cause_analysis: string | null;
  approved_at: Date | null;
  approved_by: string | null;
  approval_note: string | null;
  effectiveness_check: string | null;
  effective: boolean | null;
  closed_at: Date | null;
  closed_by: string | null;
  created_at: Date;
  created_by: string | null;
  updated_at: Date;
  time_zone: string;
  date_format: PlantDateFormat;
  lot_numbers: string[];
  open_actions: number;
  overdue_actions: number;
};

/** The NCR's row with its product, people, plant clock and action counts; `today` is the plant's calendar day (in the plant's zone). */
const ncrSelect = sql`
  select n.id, n.plant_id, n.number, n.title, n.description, n.status, n.severity, n.raised_from, n.product_id, p.code as product_code, p.name as product_name,
    n.assignee_id, ua.name as assignee_name, n.root_cause_category, n.root_cause_analysis, n.approved_at, uap.name as approved_by, n.approval_note,
    n.effectiveness_check, n.effective, n.closed_at, ucl.name as closed_by, n.created_at, ucr.name as created_by, n.updated_at, pt.time_zone, pt.date_format,
    array(select l.lot_number from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id order by l.lot_number) as lot_numbers,
    (select count(*)::int from ncr_actions x where x.ncr_id = n.id and x.done_date is null) as open_actions,
    (select count(*)::int from ncr_actions x where x.ncr_id = n.id and x.done_date is null and x.due_date < (now() at time zone pt.time_zone)::date) as overdue_actions
  from ncrs n
  join plants pt on pt.id = n.plant_id
  left join products p on p.id = n.product_id
  left join users ua on ua.id = n.assignee_id
  left join users uap on uap.id = n.approved_by
  left join users ucl on ucl.id = n.closed_by
  left join users ucr on ucr.id = n.created_by`;

function listItem(r: NcrRow): NcrListItem {
  return {
    id: r.id,
    number: r.number,
    title: r.title,
    status: r.status,
    severity: r.severity,
    product: r.product_id === null ? null : { id: r.product_id, code: r.product_code!, name: r.product_name! },
    assignee: r.assignee_id === null ? null : { id: r.assignee_id, name: r.assignee_name! },
    lotNumbers: r.lot_numbers,
    openActions: r.open_actions,
    overdueActions: r.overdue_actions,
    createdAt: isoOf(r.created_at),
    createdBy: r.created_by,
    updatedAt: isoOf(r.updated_at),
    closedAt: iso(r.closed_at),
  };
}

type ActionRow = {
  id: number;
  ncr_id: number;
  kind: NcrActionKind;
  description: string;
  owner_id: number;
  owner_name: string;
  due_date: string;
  done_date: string | null;
  evidence: string | null;
  created_at: Date;
  created_by: string | null;
};

const actionSelect = sql`
  select x.id, x.ncr_id, x.kind, x.description, x.owner_id, uo.name as owner_name, x.due_date::text as due_date, x.done_date::text as done_date, x.evidence,
    x.created_at, uc.name as created_by
  from ncr_actions x join users uo on uo.id = x.owner_id left join users uc on uc.id = x.created_by`;

/** An action; overdue when not done and its due day is before today's date at the plant. */
export function actionView(r: ActionRow, today: string): NcrActionView {
  return {
    id: r.id,
    kind: r.kind,
    description: r.description,
    owner: { id: r.owner_id, name: r.owner_name },
    dueDate: r.due_date,
    doneDate: r.done_date,
    evidence: r.evidence,
    overdue: r.done_date === null && r.due_date < today,
    createdAt: isoOf(r.created_at),
    createdBy: r.created_by,
  };
}

type AuditRow = { at: Date; actor: string | null; action: string; after: Record<string, unknown> | null; before: Record<string, unknown> | null; reason: string | null };

const text = (v: unknown) => (v == null ? '' : String(v));
const fieldWords: Record<string, string> = {
  title: 'title',
  description: 'description',
  severity: 'severity',
  productId: 'product',
  rootCauseCategory: 'root cause category',
  rootCauseAnalysis: 'root-cause analysis',
  effectivenessCheck: 'effectiveness check',
  effective: 'effectiveness verdict',
};

/** One audit event of an NCR as a sentence for people. */
export function historySentence(
  action: string,
  after: Record<string, unknown> | null,
  before: Record<string, unknown> | null,
  ctx: { clock: PlantClock; actionName: (id: unknown) => string },
): string {
  const a = after ?? {};
  const day = (d: unknown) => (typeof d === 'string' ? formatPlantDay(d, ctx.clock) : text(d));
  switch (action) {
    case 'raise': {
      const from = a.raisedFrom === 'alarms' ? 'from alarms' : a.raisedFrom === 'lot' ? 'from a lot' : 'directly';
      return `Raised ${text(a.number)} ${from}, severity ${text(a.severity)}.`;
    }
    case 'transition':
      return `Moved from ${ncrStatusWords[before?.status as NcrStatus] ?? text(before?.status)} to ${ncrStatusWords[a.status as NcrStatus] ?? text(a.status)}.`;
    case 'assign':
      return a.assigneeName ? `Assigned to ${text(a.assigneeName)}.` : 'Assignee removed.';
    case 'approve':
      return `Approved: ${text(a.approvalNote)}`;
    case 'add lots': {
      const held = Array.isArray(a.held) && a.held.length ? `; put on hold: ${(a.held as string[]).join(', ')}` : '';
      return `Lots added: ${((a.lotNumbers as string[]) ?? []).join(', ')}${held}.`;
    }
    case 'link alarms':
      return `Alarms linked: ${((a.alarmIds as number[]) ?? []).map((id) => `#${id}`).join(', ')}.`;
    case 'disposition': {
      const word = lotDispositionWords[a.disposition as LotDisposition] ?? text(a.disposition);
      return `Lot ${text(a.lotNumber)}: ${word}${a.downgradeProductCode ? ` (as ${text(a.downgradeProductCode)})` : ''}.`;
    }
    case 'add action':
      return `${a.kind === 'preventive' ? 'Preventive' : 'Corrective'} action added for ${text(a.ownerName)}, due ${day(a.dueDate)}: ${text(a.description)}`;
    case 'update action': {
      if (a.doneDate && !before?.doneDate) return `Action ${ctx.actionName(a.actionId)} done on ${day(a.doneDate)}.`;
      const changed = Object.keys(a).filter((k) => k !== 'actionId');
      return `Action ${ctx.actionName(a.actionId)} changed: ${changed.map((k) => (k === 'doneDate' ? 'done date' : k === 'dueDate' ? 'due date' : k === 'ownerId' ? 'owner' : k)).join(', ')}.`;
    }
    case 'attach file':
      return `File attached: ${text(a.fileName)}.`;
    case 'update': {
      const changed = Object.keys(a).map((k) => fieldWords[k] ?? k);
      if (a.rootCauseCategory && Object.keys(a).length === 1) return `Root cause category set to ${causeCategoryWords[a.rootCauseCategory as CauseCategory]?.label ?? text(a.rootCauseCategory)}.`;
      return `Changed: ${changed.join(', ')}.`;
    }
    default:
      return `${action[0].toUpperCase()}${action.slice(1)}.`;
  }
}

/** The NCR and everything on it; null when there is none with that id. */
export async function loadNcrView(db: Executor, id: number, publicUrl: string, now: Date = new Date()): Promise<NcrView | null> {
  const res = await db.execute<NcrRow>(sql`${ncrSelect} where n.id = ${id}`);
  const r = res.rows[0];
  if (!r) return null;
  const today = plantDay(now, r.time_zone);

  const [lotRows, alarmRows, actionRows, attachmentRows, historyRows] = await inTurn([
    () => db.execute<{
      lot_id: number;
      lot_number: string;
      product_code: string;
      produced_at: Date;
      quantity_t: number | null;
      disposition: LotDisposition | null;
      downgrade_id: number | null;
      downgrade_code: string | null;
      downgrade_name: string | null;
      disposition_note: string | null;
      disposed_at: Date | null;
      disposed_by: string | null;
      lot_status: LotStatus;
      hold_id: number | null;
      hold_source: HoldSource | null;
      hold_reason: string | null;
      hold_alarm_id: number | null;
      hold_ncr_id: number | null;
      hold_ncr_number: string | null;
      hold_placed_by: string | null;
      hold_placed_at: Date | null;
    }>(sql`
      -- lotStatusSql names its own ncr_lots nl and lot_holds h: the lot is named through l, which it does not shadow.
      select nl.lot_id, l.lot_number, p.code as product_code, l.produced_at, nl.quantity_t, nl.disposition, dp.id as downgrade_id, dp.code as downgrade_code, dp.name as downgrade_name,
        nl.disposition_note, nl.disposed_at, ud.name as disposed_by, ${lotStatusSql(sql`l.id`)} as lot_status,
        h.id as hold_id, h.source as hold_source, h.reason as hold_reason, h.alarm_id as hold_alarm_id, h.ncr_id as hold_ncr_id, hn.number as hold_ncr_number,
        uh.name as hold_placed_by, h.placed_at as hold_placed_at
      from ncr_lots nl
      join lots l on l.id = nl.lot_id
      join products p on p.id = l.product_id
      left join products dp on dp.id = nl.downgrade_product_id
      left join users ud on ud.id = nl.disposed_by
      left join lot_holds h on h.lot_id = nl.lot_id and h.released_at is null
      left join ncrs hn on hn.id = h.ncr_id
      left join users uh on uh.id = h.placed_by
      where nl.ncr_id = ${id}
      order by l.lot_number`),
    () => db.execute<{ id: number; characteristic_id: number; code: string; name: string; lot_number: string; rule: string; description: string; status: string }>(sql`
      select a.id, a.characteristic_id, c.code, c.name, l.lot_number, a.rule, a.description, a.status
      from ncr_alarms na join alarms a on a.id = na.alarm_id join characteristics c on c.id = a.characteristic_id join lots l on l.id = a.lot_id
      where na.ncr_id = ${id} order by a.id`),
    () => db.execute<ActionRow>(sql`${actionSelect} where x.ncr_id = ${id} order by x.due_date, x.id`),
    () => db.execute<{ id: number; file_name: string; content_type: string; size_bytes: number; sha256: string; note: string | null; created_at: Date; created_by: string | null }>(sql`
      select na.id, f.file_name, f.content_type, f.size_bytes, f.sha256, na.note, na.created_at, u.name as created_by
      from ncr_attachments na join stored_files f on f.id = na.file_id left join users u on u.id = na.created_by
      where na.ncr_id = ${id} order by na.id`),
    () => db.execute<AuditRow>(sql`
      select e.at, u.name as actor, e.action, e.after, e.before, e.reason
      from audit_events e left join users u on u.id = e.actor_id
      where e.entity = 'ncr' and e.entity_id = ${String(id)} order by e.at, e.id`),
  ]);

  const lots: NcrLotView[] = lotRows.rows.map((l) => ({
    lotId: l.lot_id,
    lotNumber: l.lot_number,
    productCode: l.product_code,
    producedAt: isoOf(l.produced_at),
    quantityT: l.quantity_t,
    disposition: l.disposition,
    downgradeProduct: l.downgrade_id === null ? null : { id: l.downgrade_id, code: l.downgrade_code!, name: l.downgrade_name! },
    dispositionNote: l.disposition_note,
    disposedAt: iso(l.disposed_at),
    disposedBy: l.disposed_by,
    lotStatus: l.lot_status,
    hold:
      l.hold_id === null
        ? null
        : {
            id: l.hold_id,
            source: l.hold_source!,
            reason: l.hold_reason!,
            alarmId: l.hold_alarm_id,
            ncr: l.hold_ncr_id === null ? null : { id: l.hold_ncr_id, number: l.hold_ncr_number! },
            placedBy: l.hold_placed_by,
            placedAt: isoOf(l.hold_placed_at!),
            releasedAt: null,
            releasedBy: null,
            releaseReason: null,
          },
  }));
  const alarms: NcrAlarmView[] = alarmRows.rows.map((a) => ({
    id: a.id,
    characteristicId: a.characteristic_id,
    characteristicCode: a.code,
    characteristicName: a.name,
    lotNumber: a.lot_number,
    signal: signalName(a.rule),
    description: a.description,
    status: a.status,
    chartUrl: chartLink(publicUrl, a.characteristic_id, a.lot_number),
  }));
  const actions = actionRows.rows.map((x) => actionView(x, today));
  const attachments: NcrAttachmentView[] = attachmentRows.rows.map((f) => ({
    id: f.id,
    fileName: f.file_name,
    contentType: f.content_type,
    sizeBytes: f.size_bytes,
    sha256: f.sha256,
    note: f.note,
    createdAt: isoOf(f.created_at),
    createdBy: f.created_by,
    url: attachmentUrl(id, f.id),
  }));
  const clock: PlantClock = { timeZone: r.time_zone, dateFormat: r.date_format };
  const described = new Map(actions.map((x) => [x.id, x.description]));
  // An action by the start of what it is, as the page lists it: ids are not shown to people.
  const actionName = (id: unknown) => {
    const d = described.get(Number(id));
    return d ? `“${d.length > 60 ? `${d.slice(0, 59)}…` : d}”` : text(id);
  };
  const history: NcrHistoryEntry[] = historyRows.rows.map((h) => ({
    at: isoOf(h.at),
    actor: h.actor,
    action: h.action,
    summary: historySentence(h.action, h.after, h.before, { clock, actionName }),
    reason: h.reason,
  }));
  const { lotNumbers: _lotNumbers, ...item } = listItem(r);
  return {
    ...item,
    description: r.description,
    raisedFrom: r.raised_from,
    rootCauseCategory: r.root_cause_category,
    rootCauseAnalysis: r.root_cause_analysis,
    approvedAt: iso(r.approved_at),
    approvedBy: r.approved_by,
    approvalNote: r.approval_note,
    effectivenessCheck: r.effectiveness_check,
    effective: r.effective,
    closedBy: r.closed_by,
    lots,
    alarms,
    actions,
    attachments,
    history,
    allowedTransitions: [...ncrTransitions[r.status]],
    closingBlockers: closingBlockers({
      rootCauseCategory: r.root_cause_category,
      rootCauseAnalysis: r.root_cause_analysis,
      lotsUndecided: lots.filter((l) => !l.disposition).map((l) => l.lotNumber),
      actionsOpen: actions.filter((a) => !a.doneDate),
      approved: r.approved_at !== null,
      effectivenessCheck: r.effectiveness_check,
      effective: r.effective,
    }),
  };
}

export interface NcrListFilter {
  status?: NcrStatus;
  severity?: NcrSeverity;
  productId?: number;
  assigneeId?: number;
  q?: string;
  overdue?: boolean;
  limit: number;
}

/** The NCRs matching a filter, newest first, at most `limit`; with how many match and the count of each state. */
export async function listNcrs(db: Executor, f: NcrListFilter): Promise<NcrList> {
  const like = f.q ? `%${f.q.replace(/[%_\\]/g, '\\$&')}%` : null;
  const where: SQL = sql`
    (${f.status ?? null}::ncr_status is null or n.status = ${f.status ?? null}::ncr_status)
    and (${f.severity ?? null}::ncr_severity is null or n.severity = ${f.severity ?? null}::ncr_severity)
    and (${f.productId ?? null}::int is null or n.product_id = ${f.productId ?? null}::int)
    and (${f.assigneeId ?? null}::int is null or n.assignee_id = ${f.assigneeId ?? null}::int)
    and (${like}::text is null or n.number ilike ${like} or n.title ilike ${like}
         or exists (select from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id and l.lot_number ilike ${like}))
    and (${f.overdue ?? null}::boolean is null or ${f.overdue ?? null}::boolean = exists (
         select from ncr_actions x join plants xp on xp.id = n.plant_id
         where x.ncr_id = n.id and x.done_date is null and x.due_date < (now() at time zone xp.time_zone)::date))`;
  const [rows, counts] = await Promise.all([
    db.execute<NcrRow>(sql`${ncrSelect} where ${where} order by n.created_at desc, n.id desc limit ${f.limit}`),
    db.execute<{ status: NcrStatus; n: number }>(sql`select n.status, count(*)::int as n from ncrs n where ${where} group by n.status`),
  ]);
  const byStatus = Object.fromEntries(counts.rows.map((c) => [c.status, c.n])) as Partial<Record<NcrStatus, number>>;
  return { items: rows.rows.map(listItem), total: counts.rows.reduce((t, c) => t + c.n, 0), counts: byStatus };
}

/** Open actions of NCRs not closed that are overdue or due within DUE_SOON_DAYS plant days, soonest first, at most `limit`. */
export async function dueActions(db: Executor, opts: { limit: number; now?: Date }): Promise<NcrActionDue[]> {
  const res = await db.execute<ActionRow & { number: string; title: string; time_zone: string }>(sql`
    select q.*, n.number, n.title, pt.time_zone
    from (${actionSelect}) q
    join ncrs n on n.id = q.ncr_id join plants pt on pt.id = n.plant_id
    where q.done_date is null and n.status <> 'closed'
      and q.due_date::date <= (now() at time zone pt.time_zone)::date + ${DUE_SOON_DAYS}::int
    order by q.due_date, q.id limit ${opts.limit}`);
  const now = opts.now ?? new Date();
  return res.rows.map((r) => ({ ncrId: r.ncr_id, ncrNumber: r.number, ncrTitle: r.title, action: actionView(r, plantDay(now, r.time_zone)) }));
}
