// The alarm side of the demo as the first morning shows it: dated detections, the manager's
// subscriptions, a few immediate e-mails and the morning digest — not hundreds of messages.
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { databaseUrl } from '@tests/support/api';
import { formatPlantTime } from '@shared/time';
import { createDatabase } from '../client';
import { nextNightlyRun } from './alarm-story';

const db = createDatabase(databaseUrl(), 2);
afterAll(() => db.$client.end());

describe('the nightly run after a result', () => {
  it('is the next 02:00 plant time, across the change to and from summer time', () => {
    // Europe/London: GMT (UTC+0) in winter, BST (UTC+1) from the last Sunday of March (EU summer-time
    // directive 2000/84/EC): 02:00 BST on 1 July is 01:00 UTC.
    expect(nextNightlyRun(new Date('2026-07-01T00:30:00Z'), '0 2 * * *', 'Europe/London')?.toISOString()).toBe('2026-07-01T01:00:00.000Z');
    expect(nextNightlyRun(new Date('2026-07-01T09:00:00Z'), '0 2 * * *', 'Europe/London')?.toISOString()).toBe('2026-07-02T01:00:00.000Z');
    expect(nextNightlyRun(new Date('2026-12-01T09:00:00Z'), '30 2 * * *', 'Europe/London')?.toISOString()).toBe('2026-12-02T02:30:00.000Z');
    expect(nextNightlyRun(new Date('2026-12-01T09:00:00Z'), '0 */4 * * *', 'Europe/London')).toBeNull();
  });
});

describe('the demo on its first morning', () => {
  it('has the quality manager subscribed to both lines, at once and in the digest', async () => {
    const res = await db.execute<{ line: string; immediate: boolean; digest: boolean }>(sql`
      select pl.code as line, s.immediate, s.digest from alarm_subscriptions s join users u on u.id = s.user_id join production_lines pl on pl.id = s.line_id
      where u.email = 'manager@harrowvale.example' order by pl.code`);
    const lines = await db.execute<{ code: string }>(sql`select code from production_lines order by code`);
    expect(res.rows.filter((r) => r.immediate && r.digest).map((r) => r.line)).toEqual(lines.rows.map((l) => l.code));
  });

  it('dates the alarms of the history at the nightly run that would have found them, not all at the first run', async () => {
    const res = await db.execute<{ detected_at: Date; time_zone: string; cron: string }>(sql`
      select a.detected_at, pt.time_zone, pt.nightly_run_cron as cron from alarms a join characteristics c on c.id = a.characteristic_id
      join products p on p.id = c.product_id join plants pt on pt.id = p.plant_id
      -- The demo history's own lots (its one upload): other test files add lots and runs to this database at the same time.
      where a.run_id is not null and exists (select from measurements m where m.lot_id = a.lot_id and m.upload_id = (select min(id) from uploads))`);
    expect(res.rows.length).toBeGreaterThan(50);
    const times = new Set(res.rows.map((r) => new Date(r.detected_at).toISOString()));
    expect(times.size).toBeGreaterThan(20);
    const atNightly = res.rows.filter((r) => {
      const [minute, hour] = r.cron.split(' ');
      return formatPlantTime(r.detected_at, r.time_zone) === `${hour.padStart(2, '0')}:${minute.padStart(2, '0')}`;
    });
    expect(atNightly.length / res.rows.length).toBeGreaterThan(0.9);
  });

  it('has mail in the outbox, but not a message per historical alarm', async () => {
    // The demo's own messages: to its people, about its products (codes HV…, api/db/seed/scenario/plant.ts);
    // other test files add mail about their own products to the same database meanwhile.
    const res = await db.execute<{ kind: string; n: number }>(sql`
      select kind, count(*)::int as n from mail_outbox m
      where m.to_address like '%@harrowvale.example'
        and (m.kind <> 'alarm' or exists (select from alarms a join characteristics c on c.id = a.characteristic_id join products p on p.id = c.product_id
                                          where a.id = (m.refs -> 'alarmIds' ->> 0)::int and p.code like 'HV%'))
      group by kind`);
    const n = Object.fromEntries(res.rows.map((r) => [r.kind, r.n]));
    expect(n.digest).toBeGreaterThanOrEqual(1);
    expect((n.alarm ?? 0) + n.digest).toBeLessThan(30);
    const subjects = await db.execute<{ subject: string; text_body: string }>(sql`select subject, text_body from mail_outbox`);
    for (const m of subjects.rows) expect(`${m.subject}\n${m.text_body}`).not.toMatch(/\bwe[1-4]\b|\bUTC\b/);
  });
});
