import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { auditEvents } from '@api/db/schema';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });
const unique = () => `user-${Date.now()}-${Math.floor(Math.random() * 1e6)}@harrowvale.example`;

describe('role access to /api/v1/users', () => {
  it('lets the administrator list users', async () => {
    const res = await request(api.app).get('/api/v1/users').set(await as('admin'));
    expect(res.status).toBe(200);
    expect(res.body.items.length).toBeGreaterThanOrEqual(4);
    expect(res.body.items[0]).not.toHaveProperty('passwordHash');
  });

  for (const role of ['technician', 'quality_manager', 'auditor'] as const) {
    it(`forbids ${role} to list, create or change users (403)`, async () => {
      const headers = await as(role);
      expect((await request(api.app).get('/api/v1/users').set(headers)).status).toBe(403);
      const create = await request(api.app).post('/api/v1/users').set(headers).send({ email: unique(), name: 'Someone', role: 'admin', password: 'long-enough-password' });
      expect(create.status).toBe(403);
      expect((await request(api.app).patch('/api/v1/users/1').set(headers).send({ role: 'admin' })).status).toBe(403);
    });
  }

  it('answers 401 without a session', async () => {
    expect((await request(api.app).get('/api/v1/users')).status).toBe(401);
  });
});

describe('user administration', () => {
  it('creates, changes the role of and deactivates a user, with an audit trail', async () => {
    const headers = await as('admin');
    const email = unique();
    const created = await request(api.app).post('/api/v1/users').set(headers).send({ email, name: 'Night Shift Tester', role: 'technician', password: 'a-long-password-1' });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email, name: 'Night Shift Tester', role: 'technician', active: true });
    const id = created.body.id;

    const login = await request(api.app).post('/api/v1/auth/login').send({ email, password: 'a-long-password-1' });
    expect(login.status).toBe(200);
    const token = login.body.token;

    const promoted = await request(api.app).patch(`/api/v1/users/${id}`).set(headers).send({ role: 'quality_manager' });
    expect(promoted.status).toBe(200);
    expect(promoted.body.role).toBe('quality_manager');
    const me = await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${token}`);
    expect(me.body.role).toBe('quality_manager');

    const deactivated = await request(api.app).patch(`/api/v1/users/${id}`).set(headers).send({ active: false });
    expect(deactivated.body.active).toBe(false);
    const refused = await request(api.app).post('/api/v1/auth/login').send({ email, password: 'a-long-password-1' });
    expect(refused.status).toBe(401);
    expect(refused.body.error).toMatch(/deactivated/);
    expect((await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${token}`)).status).toBe(401);

    const trail = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'user'), eq(auditEvents.entityId, String(id))));
    expect(trail.map((e) => e.action)).toEqual(expect.arrayContaining(['create', 'update']));
    expect(trail.find((e) => e.action === 'update' && (e.after as { active: boolean }).active === false)).toBeTruthy();
    expect(JSON.stringify(trail)).not.toMatch(/a-long-password-1/);
  });

  it('refuses a second user with the same e-mail (409), whatever the letter case', async () => {
    const headers = await as('admin');
    const email = unique();
    await request(api.app).post('/api/v1/users').set(headers).send({ email, name: 'First', role: 'auditor', password: 'a-long-password-2' }).expect(201);
    const again = await request(api.app).post('/api/v1/users').set(headers).send({ email: email.toUpperCase(), name: 'Second', role: 'auditor', password: 'a-long-password-2' });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatch(/already exists/);
  });

  it('explains invalid input field by field', async () => {
    const res = await request(api.app).post('/api/v1/users').set(await as('admin')).send({ email: 'x', name: '', role: 'boss', password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.details.map((d: { path: string }) => d.path).sort()).toEqual(['email', 'name', 'password', 'role']);
    const empty = await request(api.app).patch('/api/v1/users/1').set(await as('admin')).send({});
    expect(empty.status).toBe(400);
    expect(empty.body.error).toMatch(/Nothing to change/);
  });

  it('answers 404 for an unknown user and 400 for a bad id', async () => {
    const headers = await as('admin');
    expect((await request(api.app).patch('/api/v1/users/999999').set(headers).send({ name: 'Ghost User' })).status).toBe(404);
    expect((await request(api.app).patch('/api/v1/users/abc').set(headers).send({ name: 'Ghost User' })).status).toBe(400);
  });

  it('does not let an administrator lock themselves out', async () => {
    const headers = await as('admin');
    const me = await request(api.app).get('/api/v1/auth/me').set(headers);
    const res = await request(api.app).patch(`/api/v1/users/${me.body.id}`).set(headers).send({ active: false });
    expect(res.status).toBe(400);
  });
});
