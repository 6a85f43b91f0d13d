// The demo quality manager's six months of decisions, recorded through the paths the app uses, so
// that the demo opens on a plant that has been run properly: limits frozen once the first weeks
// showed a stable process (phase I → phase II); the alarms of each recognised special cause closed
// with its assignable cause; the miscalibrated press's sets excluded as a measurement error; the flow
// limits of HV Level 25 recalculated from the level after the new sand source; every older alarm
// triaged. What the last two weeks raised stays open for the first morning, and so does a recent lot
// out of specification that still waits for its disposition.
import { sql } from 'drizzle-orm';
import type { Database } from '../client';
import { OUT_OF_SPEC, triageAlarm } from '@api/spc/alarms';
import { excludePoint, freezeLimits } from '@api/spc/chart-commands';
import { runCharacteristic } from '@api/spc/run';
import { createRunRecord } from '@api/spc/runs';
import { plantedCausesFor, type PlantedCause, type ScenarioWindow } from './scenario';

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

type OpenAlarm = { id: number; code: string; rule: string; chart: string; lot_number: string; produced_ms: number; tested_ms: number | null };

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
    select a.id, c.code, a.rule, a.chart, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms,
           (select (extract(epoch from max(m.tested_at)) * 1000)::float8 from measurements m
             where m.lot_id = a.lot_id and m.characteristic_id = a.characteristic_id and m.voided_at is null) as tested_ms
    from alarms a join characteristics c on c.id = a.characteristic_id join lots l on l.id = a.lot_id
    where a.status <> 'closed' ${only}
    order by a.id`);
  return res.rows.map((r) => ({ ...r, produced_ms: Number(r.produced_ms), tested_ms: r.tested_ms === null ? null : Number(r.tested_ms) }));
}

const causeOfAlarm = (a: OpenAlarm, causes: readonly PlantedCause[]) =>
  causeOf({ code: a.code, lotNumber: a.lot_number, producedMs: a.produced_ms, testedMs: a.tested_ms ?? a.produced_ms }, causes);

/** One SPC run over the characteristics, worked through here as the queue's workers would. */
async function runNow(db: Database, ids: number[], opts: { kind: 'full' | 'incremental'; trigger: 'first' | 'limits'; requestedBy: number | null; publicUrl: string }) {
  const runId = await createRunRecord(db, { kind: opts.kind, trigger: opts.trigger, characteristicIds: ids, requestedBy: opts.requestedBy });
  for (const characteristicId of ids) await runCharacteristic(db, { runId, characteristicId, worker: 'demo-seed', publicUrl: opts.publicUrl });
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

  // Phase I → phase II: each chart's first weeks become its baseline.
  for (const c of chars) {
    const lots = await db.execute<{ produced_at: Date }>(sql`
      select distinct l.produced_at from measurements m join lots l on l.id = m.lot_id
      where m.characteristic_id = ${c.id} and m.voided_at is null order by l.produced_at`);
    const times = lots.rows.map((r) => new Date(r.produced_at).getTime());
    if (times.length < BASELINE_POINTS) continue;
    const to = Math.max(times[0] + BASELINE_DAYS * DAY, times[BASELINE_POINTS - 1]);
    await freezeLimits(db, { characteristicId: c.id, baselineFrom: new Date(times[0]), baselineTo: new Date(to), reason: INITIAL_LIMITS_REASON, userId });
  }
  await runNow(db, chars.map((c) => c.id), { kind: 'full', trigger: 'first', requestedBy: null, publicUrl: opts.publicUrl });

  // The new sand source and the miscalibrated press: their alarms closed with the cause, then the
  // limits recalculated from the new level and the press's sets excluded.
  const sand = causes.find((c) => c.id === 'sand-source');
  const press = causes.find((c) => c.id === 'press-miscalibration');
  const acted = [sand, press].filter((c): c is PlantedCause => c !== undefined);
  for (const a of await openAlarms(db, acted.flatMap((c) => c.characteristicCodes))) {
    const cause = causeOfAlarm(a, acted);
    if (cause) await triageAlarm(db, { id: a.id, action: 'close', note: causeNotes[cause.id], userId });
  }
  const changed = new Set<number>();
  if (press) {
    const hit = await db.execute<{ characteristic_id: number; lot_id: number }>(sql`
      select distinct m.characteristic_id, m.lot_id from measurements m join characteristics c on c.id = m.characteristic_id
      where c.code = any(${sql.param(press.characteristicCodes)}::text[]) and m.voided_at is null
        and m.tested_at >= ${press.start}::timestamptz and m.tested_at < ${press.end}::timestamptz
      order by 1, 2`);
    for (const r of hit.rows) {
      await excludePoint(db, { characteristicId: r.characteristic_id, lotId: r.lot_id, reason: PRESS_EXCLUSION_REASON, userId });
      changed.add(r.characteristic_id);
    }
  }
  if (sand) {
    const from = new Date(sand.start);
    for (const code of sand.characteristicCodes) {
      const id = idOf.get(code)!;
      await freezeLimits(db, { characteristicId: id, baselineFrom: from, baselineTo: new Date(Math.min(endMs, from.getTime() + SAND_BASELINE_DAYS * DAY)), reason: SAND_REVISION_REASON, userId });
      changed.add(id);
    }
  }
  if (changed.size) await runNow(db, [...changed].sort((a, b) => a - b), { kind: 'incremental', trigger: 'limits', requestedBy: userId, publicUrl: opts.publicUrl });

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
    await triageAlarm(db, { id: a.id, action: 'close', note, userId });
  }
}
