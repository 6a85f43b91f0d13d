import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createSpcTestApi, eventually } from '@tests/support/spc-api';

// The test server (scripts/run-tests.ts) runs without SMTP_URL, so it uses the local fake SMTP server.
const api = createSpcTestApi();
afterAll(() => api.close());
const base = process.env.PRISMLINE_BASE_URL!;

describe('GET /api/v1/dev/outbox', () => {
  it('lists what the fake SMTP server received from the outbox: recipients, subject, text and HTML', async () => {
    const key = `dev-test:${Date.now()}`;
    await api.db.execute(sql`
      insert into mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body)
      values (${key}, 'alarm', 'manager@harrowvale.example', ${`Prismline alarm: Beyond a control limit — ${key}`}, ${'Lot L1-1: X̄ = 158.5 mm is above the UCL 151.2 mm.\nChart: http://x/charts/1?point=3'},
              ${'<p>Lot L1-1: X̄ = 158.5 mm</p>'})`);
    const h = { authorization: `Bearer ${await api.tokenFor('admin')}` };
    const message = await eventually(async () => {
      const res = await request(base).get('/api/v1/dev/outbox').set(h);
      return res.body.items.find((m: { subject: string }) => m.subject.endsWith(key));
    }, 15_000, 'the message to reach the fake SMTP server');
    expect(message).toMatchObject({ recipients: ['manager@harrowvale.example'], to: ['manager@harrowvale.example'], subject: `Prismline alarm: Beyond a control limit — ${key}` });
    expect(message.text).toBe('Lot L1-1: X̄ = 158.5 mm is above the UCL 151.2 mm.\nChart: http://x/charts/1?point=3');
    expect(message.html).toBe('<p>Lot L1-1: X̄ = 158.5 mm</p>');
    // The sender marks the row after the relay has answered, a moment after the message arrives there.
    const row = await eventually(async () => {
      const res = await api.db.execute<{ status: string; attempts: number }>(sql`select status, attempts from mail_outbox where dedupe_key = ${key}`);
      return res.rows[0]?.status === 'sent' ? res.rows[0] : undefined;
    }, 15_000, 'the outbox row to be marked sent');
    expect(row).toEqual({ status: 'sent', attempts: 1 });
  });

  it('is for administrators only, and absent where no fake SMTP server is in use', async () => {
    const res = await request(base).get('/api/v1/dev/outbox').set({ authorization: `Bearer ${await api.tokenFor('quality_manager')}` });
    expect(res.status).toBe(403);
    const inProcess = await request(api.app).get('/api/v1/dev/outbox').set(await api.as('admin'));
    expect(inProcess.status).toBe(404);
  });
});
