// The one way a change of what a chart is computed from reaches the SPC run: uploads, manual entry,
// corrections, voids, exclusions and inclusions, frozen limits and chart settings all call
// resultsChanged(). Lots whose results changed are judged against the specification at once (an
// out-of-spec alarm and its e-mails should not wait for the run), then an incremental run of the
// characteristics is started. Both read the stored, committed facts, as the chart does.
//
// The run is requested after the change has committed, not in its transaction: the import runs on its
// own connection and manual transaction, and a queue that cannot be reached must not refuse a change
// of results. A request that fails is logged; the nightly run catches up. Neither step may fail the
// request that changed the data.
import { sql } from 'drizzle-orm';
import { brokenLimit, isOutOfSpec, lotResult, specAt, specVerdict } from '@shared/spc';
import type { Database } from '../db/client';
import type { Subgroup } from '../ingest/import';
import { logger } from '../logger';
import { queueLotMail } from '../mail/notify';
import { holdOutOfSpecLots } from '../lots/holds';
import { OUT_OF_SPEC, lateResultText, outOfSpecText } from './alarms';
import { arr, type Executor } from './db';
import type { SpcQueue } from './queue';
import { startRun, type RunTrigger } from './runs';

type LotResultRow = {
  characteristic_id: number;
  lot_id: number;
  lot_number: string;
  produced_at: Date;
  vals: number[];
  unit: string;
  decimals: number;
};

/** The lot's position on the chart (lots before it in production order) and how many lots come after it. */
async function positionOf(tx: Executor, characteristicId: number, lotId: number): Promise<{ pointIndex: number; laterLots: number }> {
  const res = await tx.execute<{ before: number; after: number }>(sql`
    with pts as (select distinct m.lot_id from measurements m where m.characteristic_id = ${characteristicId} and m.voided_at is null),
         me as (select produced_at, lot_number from lots where id = ${lotId})
    select count(*) filter (where o.produced_at < me.produced_at or (o.produced_at = me.produced_at and o.lot_number collate "C" < me.lot_number collate "C"))::int as before,
           count(*) filter (where o.produced_at > me.produced_at)::int as after
    from pts join lots o on o.id = pts.lot_id, me`);
  return { pointIndex: res.rows[0].before, laterLots: res.rows[0].after };
}

/**
 * Judges the lots behind new measurements against the specification in force at each lot's
 * production time and raises an out-of-spec alarm (with its e-mails) for every lot outside it.
 * The lot's result is the mean of its live replicates, as on the chart. Returns the alarm ids.
 */
export async function raiseOutOfSpecAlarms(db: Database, subgroups: Subgroup[], publicUrl: string): Promise<number[]> {
  if (!subgroups.length) return [];
  return db.transaction(async (tx) => {
    const res = await tx.execute<LotResultRow>(sql`
      with touched as (select * from unnest(${arr(subgroups.map((s) => s.lotId))}::int[], ${arr(subgroups.map((s) => s.characteristicId))}::int[]) as t(lot_id, characteristic_id))
      select t.characteristic_id, t.lot_id, l.lot_number, l.produced_at, c.unit, tm.decimals,
        (select array_agg(m.value order by m.replicate) from measurements m where m.lot_id = t.lot_id and m.characteristic_id = t.characteristic_id and m.voided_at is null) as vals
      from touched t join lots l on l.id = t.lot_id join characteristics c on c.id = t.characteristic_id join test_methods tm on tm.id = c.test_method_id`);
    const specRows = await tx.execute<{ characteristic_id: number; revision: number; lsl: number | null; usl: number | null; target: number | null; effective_from: Date }>(sql`
      select characteristic_id, revision, lsl, usl, target, effective_from from spec_limits
      where characteristic_id = any(${arr([...new Set(res.rows.map((r) => r.characteristic_id))])}::int[]) order by effective_from, revision`);
    const specs = new Map<number, { revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: Date }[]>();
    for (const s of specRows.rows) {
      const list = specs.get(s.characteristic_id) ?? [];
      list.push({ revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effective_from) });
      specs.set(s.characteristic_id, list);
    }

    const raised: number[] = [];
    for (const r of res.rows) {
      if (!r.vals?.length) continue;
      const values = r.vals.map(Number);
      const producedAt = new Date(r.produced_at);
      const spec = specAt(specs.get(r.characteristic_id) ?? [], producedAt);
      const result = lotResult(values);
      const verdict = specVerdict(result, spec);
      if (!spec || !isOutOfSpec(verdict)) continue;
      const below = verdict === 'below-lsl';
      const limit = brokenLimit(verdict, spec).value;
      const description = outOfSpecText({ result, values, limitName: below ? 'LSL' : 'USL', limitValue: limit, revision: spec.revision, unit: r.unit, decimals: r.decimals });
      const { pointIndex, laterLots } = await positionOf(tx, r.characteristic_id, r.lot_id);
      const lateReason = laterLots > 0 ? lateResultText(r.lot_number) : null;
      const ins = await tx.execute<{ id: number }>(sql`
        insert into alarms (characteristic_id, lot_id, rule, chart, point_index, statistic, "values", limit_name, limit_value, description, late, late_reason, source)
        values (${r.characteristic_id}, ${r.lot_id}, ${OUT_OF_SPEC}, 'location', ${pointIndex}, ${result}, ${arr(values)}::float8[], ${below ? 'LSL' : 'USL'}, ${limit},
                ${description}, ${lateReason !== null}, ${lateReason}, 'ingest')
        on conflict (characteristic_id, rule, chart, lot_id) do update set
          status = 'open', resolution = null, closed_at = null, closed_by = null, close_note = null, point_index = excluded.point_index,
          statistic = excluded.statistic, "values" = excluded."values", limit_name = excluded.limit_name, limit_value = excluded.limit_value,
          description = excluded.description, late = excluded.late, late_reason = excluded.late_reason, updated_at = now()
        where alarms.status = 'closed' and alarms.resolution = 'data-changed'
        returning id`);
      if (ins.rows[0]) raised.push(ins.rows[0].id);
    }
    // The lots out of specification go on hold in this transaction, with their alarms.
    await holdOutOfSpecLots(tx, raised);
    // One e-mail per lot for what this import found; the run that follows mails only what it adds. The
    // transaction names the occasion: a signal reopened by a later import is told again.
    if (raised.length) {
      const occasion = await tx.execute<{ id: string }>(sql`select txid_current()::text as id`);
      await queueLotMail(tx, raised, `import:${occasion.rows[0].id}`, publicUrl);
    }
    return raised;
  });
}

export interface SpcDeps {
  db: Database;
  queue: SpcQueue;
  /** Address of the web app in alarm e-mails. */
  publicUrl: string;
}

/** Why the results of some characteristics, or what their charts are computed from, changed: the run's trigger. */
export type ResultsChangedBecause = Extract<RunTrigger, 'upload' | 'correction' | 'void' | 'limits' | 'settings'>;

export interface ResultsChange {
  /** The characteristics whose charts must be computed again. */
  characteristicIds: number[];
  /** 'upload' for uploads and manual entry, 'limits' for exclusions, inclusions and frozen limits. */
  because: ResultsChangedBecause;
  /** The person who made the change. */
  by: number | null;
  /** Lots whose results were added or changed, judged against the specification at once. */
  judge?: Subgroup[];
}

/** What a router is given to report a change; api/app.ts wires it once. */
export type ResultsChanged = (change: ResultsChange) => Promise<void>;

/**
 * A decision on the chart (limits, exclusions, chart settings) names who asked for the run; runs that
 * follow new or withdrawn results are the system's, as the runs page has always shown them.
 */
const requesterOf = (change: ResultsChange): number | null => (change.because === 'limits' || change.because === 'settings' ? change.by : null);

/** Judges the changed lots, then starts the incremental run; failures are logged, never thrown. */
export async function resultsChanged(deps: SpcDeps, change: ResultsChange): Promise<void> {
  if (change.judge?.length) {
    try {
      await raiseOutOfSpecAlarms(deps.db, change.judge, deps.publicUrl);
    } catch (err) {
      logger.error({ err: (err as Error).message, characteristicIds: change.characteristicIds }, 'out-of-specification check failed; the next run will raise the alarms');
    }
  }
  if (!change.characteristicIds.length) return;
  try {
    await startRun(deps.db, deps.queue, { trigger: change.because, characteristicIds: change.characteristicIds, requestedBy: requesterOf(change) });
  } catch (err) {
    logger.error({ err: (err as Error).message, characteristicIds: change.characteristicIds, trigger: change.because }, 'incremental SPC run not started; the nightly run will catch up');
  }
}
