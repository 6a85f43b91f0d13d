// The demo plant as its quality manager finds it on the first morning: a database of its own in the
// test cluster, seeded as the demo server seeds it, so that other test files' changes to the shared
// demo database cannot move the counts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { ensureDatabase, type Cluster } from '@scripts/lib/cluster';
import { createDatabase, type Database } from '../client';
import { migrateDatabase } from '../migrate';
import { computeCharacteristicChart, limitRevisions } from '@api/spc/chart-load';
import { DATA_CHANGED_NOTE } from '@api/spc/alarms';
import { causeOf, causeNotes, HELD_LOT_DAYS, OPEN_DAYS } from './decisions';
import { demoEndDate, seedDemo } from './index';
import { plantedCausesFor, type PlantedCause } from './scenario';

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
