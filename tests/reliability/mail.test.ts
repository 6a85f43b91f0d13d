// The outbox sender on a private cluster (the test server's own sender would take the messages).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { startPrivateCluster, type PrivateCluster } from '@tests/support/private-cluster';
import { startFakeSmtp, type FakeSmtp } from '@api/mail/fake-smtp';
import { createTransport, sendDue } from '@api/mail/outbox';

let cluster: PrivateCluster;
let fake: FakeSmtp;
beforeAll(async () => {
  cluster = await startPrivateCluster('mail');
  fake = await startFakeSmtp();
});
afterAll(async () => {
  await fake?.close();
  await cluster?.destroy();
});

const rows = () =>
  cluster.db.execute<{ id: number; status: string; attempts: number; last_error: string | null; wait_s: number }>(sql`
    select id, status, attempts, last_error, extract(epoch from next_attempt_at - now())::float8 as wait_s from mail_outbox order by id`);

describe('sending the outbox', () => {
  it('keeps a message whose send failed, retries it after a growing pause, and sends it exactly once when the relay answers', async () => {
    await cluster.db.execute(sql`
      insert into mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body)
      select 'k' || g, 'alarm', 'manager@harrowvale.example', 'Alarm ' || g, 'Text ' || g, '<p>' || g || '</p>' from generate_series(1, 3) g`);
    const down = { sendMail: async () => Promise.reject(new Error('connect ECONNREFUSED 127.0.0.1:2525')) };

    expect(await sendDue(cluster.db, down, 'prismline@localhost')).toEqual({ sent: 0, failed: 3 });
    let r = (await rows()).rows;
    expect(r.map((m) => [m.status, m.attempts, m.last_error])).toEqual(Array(3).fill(['pending', 1, 'connect ECONNREFUSED 127.0.0.1:2525']));
    for (const m of r) {
      expect(m.wait_s).toBeGreaterThan(3);
      expect(m.wait_s).toBeLessThanOrEqual(5);
    }
    // Not due yet: nothing is tried again before the pause is over.
    expect(await sendDue(cluster.db, down, 'prismline@localhost')).toEqual({ sent: 0, failed: 0 });

    await cluster.db.execute(sql`update mail_outbox set next_attempt_at = now()`);
    await sendDue(cluster.db, down, 'prismline@localhost');
    r = (await rows()).rows;
    for (const m of r) {
      expect(m.attempts).toBe(2);
      expect(m.wait_s).toBeGreaterThan(8);
      expect(m.wait_s).toBeLessThanOrEqual(10);
    }

    await cluster.db.execute(sql`update mail_outbox set next_attempt_at = now()`);
    const up = createTransport(fake.url);
    expect(await sendDue(cluster.db, up, 'prismline@localhost')).toEqual({ sent: 3, failed: 0 });
    expect(await sendDue(cluster.db, up, 'prismline@localhost')).toEqual({ sent: 0, failed: 0 });
    up.close();
    expect((await rows()).rows.map((m) => [m.status, m.attempts, m.last_error])).toEqual(Array(3).fill(['sent', 3, null]));
    expect(fake.messages().map((m) => m.subject).sort()).toEqual(['Alarm 1', 'Alarm 2', 'Alarm 3']);
  });

  it('takes over a message that a sender claimed and never finished (it died), once the claim has run out', async () => {
    await cluster.db.execute(sql`
      insert into mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body, attempts, locked_until)
      values ('claimed', 'alarm', 'lead@harrowvale.example', 'Claimed', 'Text', '<p>x</p>', 1, now() + interval '1 minute'),
             ('abandoned', 'alarm', 'lead@harrowvale.example', 'Abandoned', 'Text', '<p>x</p>', 1, now() - interval '1 second')`);
    const up = createTransport(fake.url);
    expect(await sendDue(cluster.db, up, 'prismline@localhost')).toEqual({ sent: 1, failed: 0 });
    up.close();
    expect(fake.messages().map((m) => m.subject)).toContain('Abandoned');
    expect(fake.messages().map((m) => m.subject)).not.toContain('Claimed');
  });
});
