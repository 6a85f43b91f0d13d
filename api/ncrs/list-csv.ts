// The NCR list of an audit pack: every nonconformance report about one product that was open at any time
// in a period (raised before its end, not closed before its start), one row each, as CSV (@shared/csv).
import { sql } from 'drizzle-orm';
import { csvDocument, type CsvValue } from '@shared/csv';
import { lotDispositionWords, ncrStatusWords, type LotDisposition, type NcrStatus } from '@shared/schemas/ncrs';
import { plantIso } from '@shared/time';
import type { Database } from '@api/db/client';

type Executor = Pick<Database, 'execute'>;

/** A plant makes a few NCRs a month; the cap only keeps a runaway query from making the pack huge. */
export const NCR_LIST_MAX_ROWS = 10_000;

export interface NcrListRequest {
  productId: number;
  /** The period's start and end instants (the plant days' bounds). */
  from: Date;
  to: Date;
  timeZone: string;
}

type NcrListRow = {
  number: string;
  title: string;
  severity: string;
  status: NcrStatus;
  raised_from: string;
  created_at: Date;
  raised_by: string | null;
  assignee: string | null;
  root_cause_category: string | null;
  root_cause_analysis: string | null;
  lots: { lot: string; disposition: LotDisposition | null }[] | null;
  alarms: number;
  actions: number;
  actions_open: number;
  approved_at: Date | null;
  effective: boolean | null;
  closed_at: Date | null;
  closed_by: string | null;
};

const header = [
  'ncr', 'title', 'severity', 'status', 'raised_from', 'raised_at', 'raised_by', 'assignee', 'root_cause_category', 'root_cause_analysis',
  'lots_and_dispositions', 'alarms', 'actions', 'actions_open', 'approved_at', 'effective', 'closed_at', 'closed_by',
];

/** The NCR list as CSV text, oldest first, and how many NCRs it holds. */
export async function ncrListCsv(db: Executor, r: NcrListRequest): Promise<{ csv: string; count: number }> {
  const rows = (
    await db.execute<NcrListRow>(sql`
      select n.number, n.title, n.severity, n.status, n.raised_from, n.created_at,
             cb.name as raised_by, asg.name as assignee, n.root_cause_category, n.root_cause_analysis,
             (select json_agg(json_build_object('lot', l.lot_number, 'disposition', nl.disposition) order by l.lot_number)
                from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id) as lots,
             (select count(*)::int from ncr_alarms na where na.ncr_id = n.id) as alarms,
             (select count(*)::int from ncr_actions a where a.ncr_id = n.id) as actions,
             (select count(*)::int from ncr_actions a where a.ncr_id = n.id and a.done_date is null) as actions_open,
             n.approved_at, n.effective, n.closed_at, clb.name as closed_by
      from ncrs n
      left join users cb on cb.id = n.created_by
      left join users asg on asg.id = n.assignee_id
      left join users clb on clb.id = n.closed_by
      where n.created_at <= ${r.to} and (n.closed_at is null or n.closed_at >= ${r.from})
        and (n.product_id = ${r.productId}
             or exists (select 1 from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id and l.product_id = ${r.productId})
             or exists (select 1 from ncr_alarms na join alarms a on a.id = na.alarm_id join characteristics c on c.id = a.characteristic_id
                        where na.ncr_id = n.id and c.product_id = ${r.productId}))
      order by n.year, n.sequence
      limit ${NCR_LIST_MAX_ROWS}`)
  ).rows;
  const at = (d: Date | null) => (d ? plantIso(d, r.timeZone) : null);
  const body: CsvValue[][] = rows.map((n) => [
    n.number,
    n.title,
    n.severity,
    ncrStatusWords[n.status],
    n.raised_from,
    at(n.created_at),
    n.raised_by,
    n.assignee,
    n.root_cause_category,
    n.root_cause_analysis,
    (n.lots ?? []).map((l) => `${l.lot}: ${l.disposition ? lotDispositionWords[l.disposition] : 'no decision yet'}`).join('; '),
    n.alarms,
    n.actions,
    n.actions_open,
    at(n.approved_at),
    n.effective === null ? null : n.effective ? 'yes' : 'no',
    at(n.closed_at),
    n.closed_by,
  ]);
  return { csv: csvDocument([header, ...body]), count: rows.length };
}
