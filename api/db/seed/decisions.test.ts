// The demo plant as its quality manager finds it on the first morning: a database of its own in the
// test cluster, seeded as the demo server seeds it, so that other test files' changes to the shared
// demo database cannot move the counts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TZDate } from '@date-fns/tz';
import { sql } from 'drizzle-orm';
import { ensureDatabase, type Cluster } from '@scripts/lib/cluster';
import { createDatabase, type Database } from '../client';
import { migrateDatabase } from '../migrate';
import { computeCharacteristicChart, limitRevisions } from '@api/spc/chart-load';
import { DATA_CHANGED_NOTE } from '@api/spc/alarms';
import { causeOf, causeNotes, HELD_LOT_DAYS, OPEN_DAYS } from './decisions';
import { demoEndDate, seedDemo } from './index';
import { nextWorkingMorning, plantedCausesFor, processEventsFor, specificationIssuedAt, type PlantedCause } from './scenario';

const DAY = 86_400_000;
const cluster: Cluster = { root: process.env.PRISMLINE_TEST_PG_ROOT ?? '', port: Number(process.env.PRISMLINE_TEST_PG_PORT) };
let db: Database;
let endMs: number;
let causes: PlantedCause[];
let managerId: number;

type AlarmRow = {
  id: number; code: string; rule: string; chart: string; lot_number: string; produced_ms: number; tested_ms: number; run_id: number;
  status: string; resolution: string | null; close_note: string | null; closed_by: number | null;
};
let rows: AlarmRow[];
const cause = (id: string) => causes.find((c) => c.id === id)!;
const causeOfRow = (a: AlarmRow) => causeOf({ code: a.code, lotNumber: a.lot_number, producedMs: a.produced_ms, testedMs: a.tested_ms }, causes);

beforeAll(async () => {
  db = createDatabase(await ensureDatabase(cluster, 'prismline_first_morning'), 2);
  await migrateDatabase(db.$client);
  const now = new Date();
  await seedDemo(db, { publicUrl: 'http://127.0.0.1:3000', now });
  const endDate = demoEndDate(now);
  endMs = endDate.getTime();
  causes = plantedCausesFor({ endDate });
  managerId = (await db.execute<{ id: number }>(sql`select id from users where email = 'manager@harrowvale.example'`)).rows[0].id;
  rows = (
    await db.execute<AlarmRow>(sql`
      select a.id, c.code, a.rule, a.chart, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms,
             (select (extract(epoch from max(m.tested_at)) * 1000)::float8 from measurements m where m.lot_id = a.lot_id and m.characteristic_id = a.characteristic_id) as tested_ms,
             a.run_id, a.status, a.resolution, a.close_note, a.closed_by
      from alarms a join characteristics c on c.id = a.characteristic_id join lots l on l.id = a.lot_id order by a.id`)
  ).rows.map((r) => ({ ...r, produced_ms: Number(r.produced_ms), tested_ms: Number(r.tested_ms) }));
}, 180_000);
afterAll(() => db.$client.end());

describe('the seeded demo plant on the first morning', () => {
  it('leaves tens of alarms open, not hundreds: the last two weeks and a held lot', () => {
    const open = rows.filter((a) => a.status === 'open');
    // A workable morning list, while six months of history raised hundreds.
    expect(open.length).toBeGreaterThanOrEqual(10);
    expect(open.length).toBeLessThanOrEqual(60);
    expect(rows.length).toBeGreaterThan(300);
    const heldFrom = endMs - HELD_LOT_DAYS * DAY;
    const held = new Set(open.filter((a) => a.rule === 'out-of-spec' && a.tested_ms >= heldFrom).map((a) => `${a.code}|${a.lot_number}`));
    for (const a of open) {
      expect(a.tested_ms >= endMs - OPEN_DAYS * DAY || held.has(`${a.code}|${a.lot_number}`), `alarm ${a.id} ${a.code} ${a.lot_number}`).toBe(true);
    }
  });

  it('keeps the recent out-of-specification lot open for its disposition', () => {
    const planted = cause('oos-hvl25-dens');
    const alarm = rows.find((a) => a.code === 'HVL25-DENS' && a.rule === 'out-of-spec' && a.lot_number === planted.lot);
    expect(alarm?.status).toBe('open');
  });

  it('shows the sand-source step as a limit revision with its reason, judged from the new level on', async () => {
    const sand = cause('sand-source');
    const sandMs = Date.parse(sand.start);
    for (const code of ['HVL25-FLOW', 'HVL25-FLOW30']) {
      const id = (await db.execute<{ id: number }>(sql`select id from characteristics where code = ${code}`)).rows[0].id;
      const [revised, initial] = await limitRevisions(db, id);
      expect(revised).toMatchObject({ revision: 2, reason: 'New sand source: limits recalculated from the new level', createdByName: 'Demo Quality Manager', supersededAt: null });
      expect(revised.baselineFrom.getTime()).toBe(sandMs);
      // Phase I baselines of at least 20 to 25 subgroups (common practice).
      expect(initial.baselinePoints).toBeGreaterThanOrEqual(25);
      expect(revised.baselinePoints).toBeGreaterThanOrEqual(25);
      // The planted drop is 2.5 within-lot standard deviations of 2 mm (flow) and 2.2 mm (after 30 min).
      const drop = code === 'HVL25-FLOW' ? 5 : 5.5;
      expect(initial.center - revised.center).toBeGreaterThan(drop - 1);
      expect(initial.center - revised.center).toBeLessThan(drop + 1);

      const chart = await computeCharacteristicChart(db, id);
      expect(chart.limits).toMatchObject({ source: 'frozen', revisionId: revised.id, reason: revised.reason });
      for (const p of chart.points) expect(p.center).toBe(Date.parse(p.producedAt) < sandMs ? initial.center : revised.center);
    }
    // What the step raised against the first limits, before they were revised.
    const [first] = (await db.execute<{ id: number }>(sql`select id from spc_runs where trigger = 'first'`)).rows;
    const stepAlarms = rows.filter((a) => a.run_id === first.id && causeOfRow(a)?.id === 'sand-source');
    expect(stepAlarms.length).toBeGreaterThan(10);
    for (const a of stepAlarms) expect(a).toMatchObject({ status: 'closed', resolution: 'by-user', close_note: causeNotes['sand-source'], closed_by: managerId });
  });

  it('closed the earlier alarms with a note by the quality manager, naming the cause where one was found', async () => {
    const closed = rows.filter((a) => a.status === 'closed');
    for (const a of closed) {
      if (a.resolution === 'by-user') {
        expect(a.closed_by).toBe(managerId);
        expect(a.close_note!.length).toBeGreaterThan(20);
      } else {
        // An alarm whose pattern no longer shows once the press's sets were left out closes by itself.
        expect(a).toMatchObject({ resolution: 'data-changed', close_note: DATA_CHANGED_NOTE });
      }
    }
    expect(closed.filter((a) => a.resolution !== 'by-user').length).toBeLessThanOrEqual(5);
    for (const id of ['cold-snap', 'defoamer-drift', 'press-miscalibration']) {
      const own = rows.filter((a) => causeOfRow(a)?.id === id);
      expect(own.length, id).toBeGreaterThan(0);
      for (const a of own) expect(a, id).toMatchObject({ status: 'closed', close_note: causeNotes[id] });
    }
    // The press's sets are left out of the limits and rules with the measurement error as the reason.
    const excluded = await db.execute<{ code: string; reason: string }>(sql`
      select c.code, e.reason from point_exclusions e join characteristics c on c.id = e.characteristic_id where e.removed_at is null`);
    expect(new Set(excluded.rows.map((e) => e.code))).toEqual(new Set(cause('press-miscalibration').characteristicCodes));
    expect(excluded.rows.every((e) => /^Measurement error/.test(e.reason))).toBe(true);
    // Each closing is in the audit trail with its note.
    const audited = await db.execute<{ n: number }>(sql`
      select count(*)::int as n from audit_events where entity = 'alarm' and action = 'close' and actor_id = ${managerId}`);
    expect(audited.rows[0].n).toBe(closed.filter((a) => a.resolution === 'by-user').length);
  });
});

// The history tells its story at the story's moments: a person reading a limit revision, a
// specification, a process event or a closed alarm sees when the story has it happen, not when the
// seed ran. The plant's wall clock is read with @date-fns/tz (the IANA zone database), not with the
// scenario's own calendar.
describe('the seeded decisions are dated in the story', () => {
  const london = (ms: number) => new TZDate(ms, 'Europe/London');
  /** A working morning of the plant: Monday to Friday, 10:00 on the plant's clock. */
  const isWorkingMorning = (ms: number) => {
    const d = london(ms);
    return d.getDay() >= 1 && d.getDay() <= 5 && d.getHours() === 10 && d.getMinutes() === 0 && d.getSeconds() === 0;
  };
  const idOf = async (code: string) => (await db.execute<{ id: number }>(sql`select id from characteristics where code = ${code}`)).rows[0].id;
  const lastResult = async (characteristicId: number, from: Date, to: Date) =>
    Number(
      (
        await db.execute<{ ms: number }>(sql`
          select (extract(epoch from max(m.tested_at)) * 1000)::float8 as ms from measurements m join lots l on l.id = m.lot_id
          where m.characteristic_id = ${characteristicId} and m.voided_at is null and l.produced_at between ${from} and ${to}`)
      ).rows[0].ms,
    );

  it('issues the specifications when the quality manager issued them, before the history begins', async () => {
    const issued = specificationIssuedAt(endMs);
    const specs = (
      await db.execute<{ characteristic_id: number; created_ms: number; effective_ms: number; created_by: number }>(sql`
        select characteristic_id, (extract(epoch from created_at) * 1000)::float8 as created_ms, (extract(epoch from effective_from) * 1000)::float8 as effective_ms, created_by
        from spec_limits`)
    ).rows;
    expect(specs.length).toBeGreaterThan(20);
    for (const s of specs) expect({ created: Number(s.created_ms), effective: Number(s.effective_ms), by: s.created_by }).toEqual({ created: issued, effective: issued, by: managerId });
    // 09:00 on the plant's clock, before the first lot of the history.
    expect(london(issued).getHours()).toBe(9);
    const [first] = (await db.execute<{ ms: number }>(sql`select (extract(epoch from min(produced_at)) * 1000)::float8 as ms from lots`)).rows;
    expect(issued).toBeLessThan(Number(first.ms));
    const audited = await db.execute<{ ms: number }>(sql`
      select (extract(epoch from at) * 1000)::float8 as ms from audit_events where action = 'revise specification' and actor_id = ${managerId}`);
    expect(audited.rows.map((r) => Number(r.ms))).toEqual(specs.map(() => issued));
  });

  it('freezes each chart on the working morning after its baseline was tested, and revises the flow limits after the sand source', async () => {
    const revisions = (
      await db.execute<{ id: number; characteristic_id: number; revision: number; from_ms: number; to_ms: number; created_ms: number; superseded_ms: number | null; created_by: number }>(sql`
        select id, characteristic_id, revision, (extract(epoch from baseline_from) * 1000)::float8 as from_ms, (extract(epoch from baseline_to) * 1000)::float8 as to_ms,
               (extract(epoch from created_at) * 1000)::float8 as created_ms, (extract(epoch from superseded_at) * 1000)::float8 as superseded_ms, created_by
        from control_limit_revisions order by characteristic_id, revision`)
    ).rows.map((r) => ({ ...r, from_ms: Number(r.from_ms), to_ms: Number(r.to_ms), created_ms: Number(r.created_ms), superseded_ms: r.superseded_ms === null ? null : Number(r.superseded_ms) }));
    expect(revisions.length).toBeGreaterThan(20);
    for (const r of revisions) {
      const last = await lastResult(r.characteristic_id, new Date(r.from_ms), new Date(r.to_ms));
      // The scenario's story date: the working morning after the baseline's last result.
      expect(r.created_ms, `revision ${r.revision} of characteristic ${r.characteristic_id}`).toBe(nextWorkingMorning(last));
      expect(isWorkingMorning(r.created_ms)).toBe(true);
      expect(r.created_ms).toBeGreaterThan(last);
      expect(r.created_ms - last).toBeLessThan(4 * DAY);
      expect(r.created_ms).toBeLessThan(endMs);
      expect(r.created_by).toBe(managerId);
      const next = revisions.find((n) => n.characteristic_id === r.characteristic_id && n.revision === r.revision + 1);
      expect(r.superseded_ms).toBe(next ? next.created_ms : null);
      const [audit] = (
        await db.execute<{ ms: number }>(sql`
          select (extract(epoch from at) * 1000)::float8 as ms from audit_events
          where action = 'freeze limits' and entity = 'characteristic' and entity_id = ${String(r.characteristic_id)} and (after ->> 'revision')::int = ${r.revision}`)
      ).rows;
      expect(Number(audit.ms)).toBe(r.created_ms);
    }
    // The sand-source revision: after the new level's first four weeks were tested, the same morning for both flow charts.
    const sandMs = Date.parse(cause('sand-source').start);
    const revised = revisions.filter((r) => r.revision === 2);
    expect(revised.map((r) => r.characteristic_id).sort()).toEqual([await idOf('HVL25-FLOW'), await idOf('HVL25-FLOW30')].sort());
    expect(new Set(revised.map((r) => r.created_ms)).size).toBe(1);
    expect(revised[0].created_ms).toBeGreaterThan(sandMs + 28 * DAY);
  });

  it('logs each process event when it happened, by the person on hand', async () => {
    const events = (
      await db.execute<{ id: number; title: string; occurred_ms: number; created_ms: number; email: string }>(sql`
        select e.id, e.title, (extract(epoch from e.occurred_at) * 1000)::float8 as occurred_ms, (extract(epoch from e.created_at) * 1000)::float8 as created_ms, u.email
        from process_events e join users u on u.id = e.created_by order by e.occurred_at`)
    ).rows;
    const story = processEventsFor({ endDate: new Date(endMs) });
    expect(events.map((e) => [e.title, Number(e.occurred_ms), Number(e.created_ms), e.email])).toEqual(
      story.map((e) => [e.title, Date.parse(e.at), Date.parse(e.at), e.recordedBy === 'technician' ? 'technician@harrowvale.example' : 'manager@harrowvale.example']),
    );
    const audited = (await db.execute<{ entity_id: string; ms: number }>(sql`
      select entity_id, (extract(epoch from at) * 1000)::float8 as ms from audit_events where action = 'record event' order by at`)).rows;
    expect(audited.map((a) => [Number(a.entity_id), Number(a.ms)])).toEqual(events.map((e) => [e.id, Number(e.occurred_ms)]));
  });

  it('closes alarms and excludes the press sets on working mornings after the results were in', async () => {
    const closedByManager = rows.filter((a) => a.resolution === 'by-user');
    expect(closedByManager.length).toBeGreaterThan(100);
    const closed = new Map(
      (await db.execute<{ id: number; ms: number }>(sql`select id, (extract(epoch from closed_at) * 1000)::float8 as ms from alarms where resolution = 'by-user'`)).rows.map((r) => [r.id, Number(r.ms)]),
    );
    for (const a of closedByManager) {
      const at = closed.get(a.id)!;
      expect(at, `alarm ${a.id}`).toBeGreaterThan(a.tested_ms);
      // The last working morning may lie after the history's end: such a closing is dated at the end.
      expect(at).toBeLessThanOrEqual(endMs);
      expect(isWorkingMorning(at) || at === endMs, `alarm ${a.id} closed ${new Date(at).toISOString()}`).toBe(true);
    }
    const audited = await db.execute<{ n: number }>(sql`
      select count(*)::int as n from audit_events e join alarms a on a.id::text = e.entity_id
      where e.entity = 'alarm' and e.action = 'close' and e.at = a.closed_at`);
    expect(audited.rows[0].n).toBe(closedByManager.length);
    const pressDone = Date.parse(cause('press-miscalibration').end!);
    const exclusions = (await db.execute<{ ms: number }>(sql`select (extract(epoch from created_at) * 1000)::float8 as ms from point_exclusions`)).rows.map((r) => Number(r.ms));
    expect(exclusions.length).toBeGreaterThan(0);
    for (const ms of exclusions) expect(ms).toBe(nextWorkingMorning(pressDone));
  });
});
