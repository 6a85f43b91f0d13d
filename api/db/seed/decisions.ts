// The demo quality manager's six months of decisions, recorded through the paths the app uses, so
// that the demo opens on a plant that has been run properly: limits frozen once the first weeks
// showed a stable process (phase I → phase II); the alarms of each recognised special cause closed
// with its assignable cause; the miscalibrated press's sets excluded as a measurement error; the flow
// limits of HV Level 25 recalculated from the level after the new sand source; every older alarm
// triaged. What the last two weeks raised stays open for the first morning, and so does a recent lot
// out of specification that still waits for its disposition.
// Each decision is dated when the story has the manager make it (story-time.ts), on a working morning
// after the results it rests on were in: not when the seed ran.
import { sql } from 'drizzle-orm';
import type { Database } from '../client';
import { OUT_OF_SPEC, triageAlarm } from '@api/spc/alarms';
import { excludePoint, freezeLimits } from '@api/spc/chart-commands';
import { runCharacteristic } from '@api/spc/run';
import { createRunRecord } from '@api/spc/runs';
import { nextWorkingMorning, plantedCausesFor, type PlantedCause, type ScenarioWindow } from './scenario';
import { decidedAt } from './story-time';

const DAY = 86_400_000;

/** Alarms whose result came in within this many days before the end of the history are left open. */
export const OPEN_DAYS = 14;
/** A lot out of specification stays on hold, its alarms open, until its disposition: one this recent still waits. */
export const HELD_LOT_DAYS = 28;
/** The first limits come from the first eight weeks, or longer until 25 points (common practice: at least 20 to 25 subgroups). */
const BASELINE_DAYS = 56;
const BASELINE_POINTS = 25;
/** The limits after the new sand source come from its first four weeks. */
const SAND_BASELINE_DAYS = 28;

export const INITIAL_LIMITS_REASON = 'Phase I complete: the first weeks of production were stable, limits frozen for monitoring';
export const SAND_REVISION_REASON = 'New sand source: limits recalculated from the new level';
export const PRESS_EXCLUSION_REASON = 'Measurement error: press load cell read high; recalibrated at the end of the shift';

/** How the manager closed the alarms of each planted cause. */
export const causeNotes: Record<string, string> = {
  'cold-snap': 'Assignable cause: cold weather slowed early hydration; 7- and 28-day strengths normal, no action on product',
  'defoamer-drift': 'Assignable cause: ageing defoamer batch; new batch opened, air content back at its usual level',
  'sand-source': 'Assignable cause: new sand source; flow still inside specification, limits recalculated from the new level',
  'press-miscalibration': 'Measurement error: press recalibrated; points excluded',
  'oos-hvlf-flow': 'Lot held; retained sample retested with the same low flow; lot reworked and released after a passing retest',
  'oos-hvl25-rc28': 'Retained prisms confirmed the low 28-day strength; customer informed; no repeat in the following lots',
  'oos-hvfx-slip': 'Lot held; retest confirmed the slip; lot scrapped',
  'oos-hvfx-adh28': 'Retained sample confirmed the low adhesion; customer informed; no repeat in the following lots',
  'oos-hvr3-dens': 'Lot held; retest confirmed the low density; dosing scale checked, lot downgraded',
};
export const COMMON_CAUSE_NOTE = 'No assignable cause found: materials, dosing and test records checked; no action on product';
export const COMMON_CAUSE_SPREAD_NOTE = 'Spread checked against the test sheets; no assignable cause found, no action on product';
export const RETEST_PASSED_NOTE = 'Lot held; retest of the retained sample inside specification, lot released';

type OpenAlarm = { id: number; characteristic_id: number; code: string; rule: string; chart: string; lot_number: string; produced_ms: number; tested_ms: number | null };

/** The planted cause an alarm belongs to, if any: by characteristic and the time window of its lot (or the lot itself). */
export function causeOf(a: { code: string; lotNumber: string; producedMs: number; testedMs: number }, causes: readonly PlantedCause[]): PlantedCause | null {
  for (const c of causes) {
    if (!c.characteristicCodes.includes(a.code)) continue;
    if (c.kind === 'out-of-spec-lot') {
      if (c.lot === a.lotNumber) return c;
      continue;
    }
    const at = c.basis === 'tested' ? a.testedMs : a.producedMs;
    if (at >= Date.parse(c.start) && (c.end === null || at < Date.parse(c.end))) return c;
  }
  return null;
}

async function openAlarms(db: Database, codes?: readonly string[]): Promise<OpenAlarm[]> {
  const only = codes ? sql`and c.code = any(${sql.param([...codes])}::text[])` : sql``;
  const res = await db.execute<OpenAlarm>(sql`
    select a.id, a.characteristic_id, c.code, a.rule, a.chart, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms,
           (select (extract(epoch from max(m.tested_at)) * 1000)::float8 from measurements m
             where m.lot_id = a.lot_id and m.characteristic_id = a.characteristic_id and m.voided_at is null) as tested_ms
    from alarms a join characteristics c on c.id = a.characteristic_id join lots l on l.id = a.lot_id
    where a.status <> 'closed' ${only}
    order by a.id`);
  return res.rows.map((r) => ({ ...r, produced_ms: Number(r.produced_ms), tested_ms: r.tested_ms === null ? null : Number(r.tested_ms) }));
}

const causeOfAlarm = (a: OpenAlarm, causes: readonly PlantedCause[]) =>
  causeOf({ code: a.code, lotNumber: a.lot_number, producedMs: a.produced_ms, testedMs: a.tested_ms ?? a.produced_ms }, causes);

/**
 * One SPC run over the characteristics, worked through here as the queue's workers would, dated at
 * `at` (it keeps its duration); alarms it closes because their signal is gone are closed then too.
 */
async function runNow(db: Database, ids: number[], opts: { kind: 'full' | 'incremental'; trigger: 'first' | 'limits'; requestedBy: number | null; publicUrl: string; at: Date }) {
  await decidedAt(db, opts.at, async () => {
    const runId = await createRunRecord(db, { kind: opts.kind, trigger: opts.trigger, characteristicIds: ids, requestedBy: opts.requestedBy });
    for (const characteristicId of ids) await runCharacteristic(db, { runId, characteristicId, worker: 'demo-seed', publicUrl: opts.publicUrl });
    await db.execute(sql`
      update spc_runs set started_at = ${opts.at}::timestamptz + (started_at - created_at), finished_at = ${opts.at}::timestamptz + (finished_at - created_at), created_at = ${opts.at}
      where id = ${runId}`);
    await db.execute(sql`
      update alarms set closed_at = ${opts.at}, updated_at = ${opts.at}
      where resolution = 'data-changed' and characteristic_id = any(${sql.param(ids)}::int[]) and closed_at > ${opts.at}`);
  });
}

/** When the last result of the characteristic's lots produced in [from, to] was tested. */
async function lastResultMs(db: Database, characteristicId: number, from: Date, to: Date): Promise<number> {
  const res = await db.execute<{ ms: number }>(sql`
    select (extract(epoch from max(m.tested_at)) * 1000)::float8 as ms from measurements m join lots l on l.id = m.lot_id
    where m.characteristic_id = ${characteristicId} and m.voided_at is null and l.produced_at between ${from} and ${to}`);
  return Number(res.rows[0].ms);
}

/** Freezes limits as the manager did at `at`: the revision is made then, and the one before it superseded then. */
async function freezeAt(db: Database, at: Date, req: Parameters<typeof freezeLimits>[1]): Promise<void> {
  const revision = await decidedAt(db, at, () => freezeLimits(db, req));
  await db.execute(sql`update control_limit_revisions set created_at = ${at} where id = ${revision.id}`);
  await db.execute(sql`update control_limit_revisions set superseded_at = ${at} where characteristic_id = ${req.characteristicId} and revision = ${revision.revision - 1}`);
}

/** Closes an alarm with the manager's note at `at`. */
async function closeAt(db: Database, at: Date, alarmId: number, note: string, userId: number): Promise<void> {
  await decidedAt(db, at, () => triageAlarm(db, { id: alarmId, action: 'close', note, userId }));
  await db.execute(sql`update alarms set closed_at = ${at}, updated_at = ${at} where id = ${alarmId}`);
}

export interface DecisionOptions extends ScenarioWindow {
  managerId: number;
  publicUrl: string;
}

/** Records the manager's decisions on the freshly imported history; see the top of this file. */
export async function recordManagerDecisions(db: Database, opts: DecisionOptions): Promise<void> {
  const { managerId: userId } = opts;
  const endMs = opts.endDate.getTime();
  const causes = plantedCausesFor(opts);
  const chars = (await db.execute<{ id: number; code: string }>(sql`select id, code from characteristics order by id`)).rows;
  const idOf = new Map(chars.map((c) => [c.code, c.id]));
  // A decision rests on results that were in: the working morning after the last of them, never after the history ends.
  const morningAfter = (ms: number) => Math.min(nextWorkingMorning(ms), endMs);

  // Phase I → phase II: each chart's first weeks become its baseline, frozen once their last result is in.
  const frozenAt = new Map<number, number>();
  for (const c of chars) {
    const lots = await db.execute<{ produced_at: Date }>(sql`
      select distinct l.produced_at from measurements m join lots l on l.id = m.lot_id
      where m.characteristic_id = ${c.id} and m.voided_at is null order by l.produced_at`);
    const times = lots.rows.map((r) => new Date(r.produced_at).getTime());
    if (times.length < BASELINE_POINTS) continue;
    const from = new Date(times[0]);
    const to = new Date(Math.max(times[0] + BASELINE_DAYS * DAY, times[BASELINE_POINTS - 1]));
    const at = morningAfter(await lastResultMs(db, c.id, from, to));
    await freezeAt(db, new Date(at), { characteristicId: c.id, baselineFrom: from, baselineTo: to, reason: INITIAL_LIMITS_REASON, userId });
    frozenAt.set(c.id, at);
  }
  // The seed judges the whole history in one run; it stands for the monitoring that began when the first chart was frozen.
  const firstRunAt = Math.min(...frozenAt.values());
  await runNow(db, chars.map((c) => c.id), { kind: 'full', trigger: 'first', requestedBy: null, publicUrl: opts.publicUrl, at: new Date(firstRunAt) });

  /** An alarm is closed the working morning after its result came in, not before its chart's limits were frozen nor before `decided`. */
  const closingOf = (a: OpenAlarm, decided = 0) => new Date(Math.max(decided, frozenAt.get(a.characteristic_id) ?? 0, morningAfter(a.tested_ms ?? a.produced_ms)));

  // The new sand source and the miscalibrated press: their alarms closed with the cause, then the
  // limits recalculated from the new level (once its first four weeks were tested) and the press's sets
  // excluded (the morning after the press was recalibrated).
  const sand = causes.find((c) => c.id === 'sand-source');
  const press = causes.find((c) => c.id === 'press-miscalibration');
  const sandFrom = sand ? new Date(sand.start) : null;
  const sandTo = sandFrom ? new Date(Math.min(endMs, sandFrom.getTime() + SAND_BASELINE_DAYS * DAY)) : null;
  let sandAt = 0;
  if (sand) for (const code of sand.characteristicCodes) sandAt = Math.max(sandAt, morningAfter(await lastResultMs(db, idOf.get(code)!, sandFrom!, sandTo!)));
  const pressAt = press ? morningAfter(Date.parse(press.end!)) : 0;
  const decidedOn = (c: PlantedCause) => (c === sand ? sandAt : pressAt);

  const acted = [sand, press].filter((c): c is PlantedCause => c !== undefined);
  for (const a of await openAlarms(db, acted.flatMap((c) => c.characteristicCodes))) {
    const cause = causeOfAlarm(a, acted);
    if (cause) await closeAt(db, closingOf(a, decidedOn(cause)), a.id, causeNotes[cause.id], userId);
  }
  const changed = new Set<number>();
  if (press) {
    const hit = await db.execute<{ characteristic_id: number; lot_id: number }>(sql`
      select distinct m.characteristic_id, m.lot_id from measurements m join characteristics c on c.id = m.characteristic_id
      where c.code = any(${sql.param(press.characteristicCodes)}::text[]) and m.voided_at is null
        and m.tested_at >= ${press.start}::timestamptz and m.tested_at < ${press.end}::timestamptz
      order by 1, 2`);
    const at = new Date(pressAt);
    for (const r of hit.rows) {
      const { id } = await decidedAt(db, at, () => excludePoint(db, { characteristicId: r.characteristic_id, lotId: r.lot_id, reason: PRESS_EXCLUSION_REASON, userId }));
      await db.execute(sql`update point_exclusions set created_at = ${at} where id = ${id}`);
      changed.add(r.characteristic_id);
    }
  }
  if (sand) {
    for (const code of sand.characteristicCodes) {
      const id = idOf.get(code)!;
      await freezeAt(db, new Date(sandAt), { characteristicId: id, baselineFrom: sandFrom!, baselineTo: sandTo!, reason: SAND_REVISION_REASON, userId });
      changed.add(id);
    }
  }
  if (changed.size) {
    const at = new Date(Math.max(sand ? sandAt : 0, press ? pressAt : 0));
    await runNow(db, [...changed].sort((a, b) => a - b), { kind: 'incremental', trigger: 'limits', requestedBy: userId, publicUrl: opts.publicUrl, at });
  }

  // Everything older than the last two weeks was triaged at the time, but for a held lot's alarms.
  const cutoff = endMs - OPEN_DAYS * DAY;
  const open = await openAlarms(db);
  const resultAt = (a: OpenAlarm) => a.tested_ms ?? a.produced_ms;
  const held = new Set(open.filter((a) => a.rule === OUT_OF_SPEC && resultAt(a) >= endMs - HELD_LOT_DAYS * DAY).map((a) => `${a.code}|${a.lot_number}`));
  // What the sand and the press raised is closed above; later alarms on their charts are judged afresh.
  const others = causes.filter((c) => !acted.includes(c));
  for (const a of open) {
    if (resultAt(a) >= cutoff || held.has(`${a.code}|${a.lot_number}`)) continue;
    const cause = causeOfAlarm(a, others);
    const plain = a.rule === OUT_OF_SPEC ? RETEST_PASSED_NOTE : a.chart === 'dispersion' ? COMMON_CAUSE_SPREAD_NOTE : COMMON_CAUSE_NOTE;
    const note = (cause && causeNotes[cause.id]) ?? plain;
    await closeAt(db, closingOf(a), a.id, note, userId);
  }
}
