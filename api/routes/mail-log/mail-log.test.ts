import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';

const api = createTestApi();
afterAll(() => api.close());

describe('GET /api/v1/mail-log', () => {
  it('shows the quality manager every message newest first, a page at a time, and the text of one', async () => {
    const tag = `log-${Date.now()}`;
    await api.db.execute(sql`
      insert into mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body, status, created_at, sent_at)
      values (${`${tag}:a`}, 'alarm', 'manager@harrowvale.example', ${`${tag} older`}, 'Older text', '<p>x</p>', 'sent', now() + interval '1 day', now() + interval '1 day'),
             (${`${tag}:b`}, 'digest', 'manager@harrowvale.example', ${`${tag} newer`}, 'Newer text', '<p>x</p>', 'pending', now() + interval '2 days', null)`);
    const h = { authorization: `Bearer ${await api.tokenFor('quality_manager')}` };
    const first = await request(api.app).get('/api/v1/mail-log?pageSize=2').set(h);
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ page: 1, pageSize: 2 });
    expect(first.body.total).toBeGreaterThanOrEqual(2);
    expect(first.body.items.map((m: { subject: string }) => m.subject)).toEqual([`${tag} newer`, `${tag} older`]);
    expect(first.body.items[1]).toMatchObject({ kind: 'alarm', to: 'manager@harrowvale.example', status: 'sent' });
    expect(first.body.items[0]).not.toHaveProperty('text');
    const second = await request(api.app).get('/api/v1/mail-log?pageSize=2&page=2').set(h);
    expect(second.body.items.map((m: { subject: string }) => m.subject)).not.toContain(`${tag} newer`);
    const sentOnly = await request(api.app).get('/api/v1/mail-log?status=sent&pageSize=100').set(h);
    expect(sentOnly.body.items.every((m: { status: string }) => m.status === 'sent')).toBe(true);

    const one = await request(api.app).get(`/api/v1/mail-log/${first.body.items[1].id}`).set(h);
    expect(one.body).toMatchObject({ subject: `${tag} older`, text: 'Older text' });
  });

  it('refuses pages and ids out of range with a plain message, never a server error', async () => {
    const h = { authorization: `Bearer ${await api.tokenFor('quality_manager')}` };
    for (const q of ['pageSize=101', 'pageSize=0', 'page=0', 'page=abc', 'status=lost']) {
      const res = await request(api.app).get(`/api/v1/mail-log?${q}`).set(h);
      expect(res.status, q).toBe(400);
      expect(res.body.error, q).toEqual(expect.any(String));
    }
    expect((await request(api.app).get('/api/v1/mail-log/99999999999').set(h)).status).toBe(400);
    expect((await request(api.app).get('/api/v1/mail-log/2147483647').set(h)).status).toBe(404);
  });
});
