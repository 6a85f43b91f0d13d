import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, gt, sql } from 'drizzle-orm';
import { createTestApi, demoEmail, TEST_JWT_SECRET } from '@tests/support/api';
import { userIdByEmail } from '@tests/support/plant';
import { DEMO_PASSWORD } from '@api/db/seed';
import { auditEvents } from '@api/db/schema';
import type { SignInRefusal } from './router';

const api = createTestApi();
afterAll(() => api.close());

describe('POST /api/v1/auth/login', () => {
  it('signs in a demo user and sets an httpOnly, SameSite=Strict cookie', async () => {
    const res = await request(api.app).post('/api/v1/auth/login').send({ email: demoEmail.quality_manager, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: demoEmail.quality_manager, role: 'quality_manager' });
    expect(Object.keys(res.body.user).sort()).toEqual(['email', 'id', 'name', 'role']);
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/prismline_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Strict/i);
    const decoded = jwt.verify(res.body.token, TEST_JWT_SECRET) as jwt.JwtPayload;
    expect(decoded.exp! - decoded.iat!).toBe(8 * 3600);
  });

  it('accepts the e-mail in any letter case', async () => {
    const res = await request(api.app).post('/api/v1/auth/login').send({ email: demoEmail.auditor.toUpperCase(), password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
  });

  it('refuses a wrong password with 401 and a clear message', async () => {
    const res = await request(api.app).post('/api/v1/auth/login').send({ email: demoEmail.technician, password: 'wrong-password' });
    expect(res.status).toBe(401);
    expect(res.body.error).toBe('Wrong e-mail or password');
    expect(res.headers['set-cookie']).toBeUndefined();
  });

  it('refuses an unknown e-mail with the same message', async () => {
    const res = await request(api.app).post('/api/v1/auth/login').send({ email: 'nobody@harrowvale.example', password: 'whatever-it-is' });
    expect(res.status).toBe(401);
    expect(res.body.error).toBe('Wrong e-mail or password');
  });

  it('answers 400 naming the field for a malformed body', async () => {
    const res = await request(api.app).post('/api/v1/auth/login').send({ email: 'not-an-email' });
    expect(res.status).toBe(400);
    expect(res.body.details.map((d: { path: string }) => d.path)).toEqual(expect.arrayContaining(['email', 'password']));
    const broken = await request(api.app).post('/api/v1/auth/login').set('content-type', 'application/json').send('{"email":');
    expect(broken.status).toBe(400);
    expect(JSON.stringify(broken.body)).not.toMatch(/at .*\.js|SyntaxError/);
  });

  it('limits repeated failed attempts for one e-mail to 10 in 15 minutes', async () => {
    const email = 'rate-limit-probe@harrowvale.example';
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) {
      statuses.push((await request(api.app).post('/api/v1/auth/login').send({ email, password: 'wrong-password' })).status);
    }
    expect(statuses.slice(0, 10).every((s) => s === 401)).toBe(true);
    expect(statuses[10]).toBe(429);
  });
});

describe('GET /api/v1/auth/me', () => {
  it('returns the user for a bearer token', async () => {
    const res = await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${await api.tokenFor('technician')}`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ email: demoEmail.technician, role: 'technician' });
  });

  it('returns the user for the session cookie', async () => {
    const agent = request.agent(api.app);
    await agent.post('/api/v1/auth/login').send({ email: demoEmail.admin, password: DEMO_PASSWORD }).expect(200);
    const res = await agent.get('/api/v1/auth/me');
    expect(res.status).toBe(200);
    expect(res.body.role).toBe('admin');
  });

  it('answers 401 without a token', async () => {
    expect((await request(api.app).get('/api/v1/auth/me')).status).toBe(401);
  });

  it('answers 401 for an expired token', async () => {
    const token = await api.tokenFor('technician');
    const { sub, role } = jwt.decode(token) as jwt.JwtPayload;
    const expired = jwt.sign({ sub, role, iat: Math.floor(Date.now() / 1000) - 9 * 3600, exp: Math.floor(Date.now() / 1000) - 3600 }, TEST_JWT_SECRET);
    const res = await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${expired}`);
    expect(res.status).toBe(401);
  });

  it('answers 401 for a tampered token (role changed in the payload)', async () => {
    const token = await api.tokenFor('technician');
    const [header, payload, signature] = token.split('.');
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString());
    const forged = Buffer.from(JSON.stringify({ ...claims, role: 'admin', sub: '1' })).toString('base64url');
    const res = await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${header}.${forged}.${signature}`);
    expect(res.status).toBe(401);
  });

  it('answers 401 for a token signed with another secret', async () => {
    const token = jwt.sign({ sub: '1', role: 'admin' }, 'some-other-secret-some-other-secret-xx');
    expect((await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${token}`)).status).toBe(401);
  });

  it('answers 401 for an unsigned token (alg none)', async () => {
    const none = `${Buffer.from('{"alg":"none","typ":"JWT"}').toString('base64url')}.${Buffer.from('{"sub":"1","role":"admin"}').toString('base64url')}.`;
    expect((await request(api.app).get('/api/v1/auth/me').set('authorization', `Bearer ${none}`)).status).toBe(401);
  });
});

describe('POST /api/v1/auth/logout', () => {
  it('clears the session cookie', async () => {
    const agent = request.agent(api.app);
    await agent.post('/api/v1/auth/login').send({ email: demoEmail.auditor, password: DEMO_PASSWORD }).expect(200);
    const out = await agent.post('/api/v1/auth/logout');
    expect(out.status).toBe(204);
    expect(String(out.headers['set-cookie'])).toMatch(/prismline_session=;/);
    expect((await agent.get('/api/v1/auth/me')).status).toBe(401);
  });
});

// What a sign-in leaves in the audit trail. Sources: 21 CFR 11.10(e) (time-stamped audit trails of operator
// actions) and 11.300(d) (detect and report attempts at unauthorised use of passwords); the OWASP Logging
// Cheat Sheet lists authentication successes and failures among the events to record (from memory).
describe('the audit trail of signing in and out', () => {
  const login = (email: string, password: string) => request(api.app).post('/api/v1/auth/login').send({ email, password });
  /** The newest id of the trail, to read only what a test adds after it. */
  const mark = async () => (await api.db.select({ id: sql<number>`coalesce(max(${auditEvents.id}), 0)::int` }).from(auditEvents))[0].id;
  const since = (from: number, action: string) =>
    api.db
      .select()
      .from(auditEvents)
      .where(and(gt(auditEvents.id, from), eq(auditEvents.entity, 'user'), eq(auditEvents.action, action)))
      .orderBy(auditEvents.id);
  const ofEmail = (typed: string) => (e: { after: unknown }) => (e.after as { email?: string } | null)?.email === typed;
  const refusal = (typed: string, kind: SignInRefusal, userId: number | null) => ({
    actorId: userId,
    entityId: userId === null ? null : String(userId),
    after: { email: typed, refusal: kind },
  });

  it('records a successful sign-in as the user, sealed in the chain', async () => {
    const from = await mark();
    const id = await userIdByEmail(api.db, demoEmail.technician);
    expect((await login(demoEmail.technician, DEMO_PASSWORD)).status).toBe(200);
    const rows = (await since(from, 'sign-in')).filter((e) => e.actorId === id);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ entityId: String(id), reason: null });
    expect(rows[0].seq).not.toBeNull();
  });

  it('records a wrong password against the known user, with the e-mail as typed', async () => {
    const from = await mark();
    const typed = demoEmail.quality_manager.toUpperCase();
    const id = await userIdByEmail(api.db, demoEmail.quality_manager);
    expect((await login(typed, 'not-the-password')).status).toBe(401);
    const rows = (await since(from, 'sign-in refused')).filter(ofEmail(typed));
    expect(rows).toEqual([expect.objectContaining(refusal(typed, 'wrong password', id))]);
    expect(rows[0].seq).not.toBeNull();
  });

  it('records an unknown e-mail with nobody as the actor', async () => {
    const from = await mark();
    const typed = `Nobody-${Date.now()}@Harrowvale.example`;
    expect((await login(typed, 'whatever-it-is')).status).toBe(401);
    expect((await since(from, 'sign-in refused')).filter(ofEmail(typed))).toEqual([expect.objectContaining(refusal(typed, 'unknown e-mail', null))]);
  });

  it('records the right password of a deactivated account as refused, not as a sign-in', async () => {
    const admin = { authorization: `Bearer ${await api.tokenFor('admin')}` };
    const email = `left-${Date.now()}@harrowvale.example`;
    const password = 'a-long-enough-password';
    const created = await request(api.app).post('/api/v1/users').set(admin).send({ email, name: 'Former Technician', role: 'technician', password });
    expect(created.status).toBe(201);
    expect((await request(api.app).patch(`/api/v1/users/${created.body.id}`).set(admin).send({ active: false })).status).toBe(200);
    const from = await mark();
    expect((await login(email, password)).status).toBe(401);
    expect((await since(from, 'sign-in refused')).filter(ofEmail(email))).toEqual([expect.objectContaining(refusal(email, 'deactivated', created.body.id))]);
    expect((await since(from, 'sign-in')).filter((e) => e.actorId === created.body.id)).toEqual([]);
  });

  it('records each refusal up to the limit, then only the first throttled attempt of the window', async () => {
    // The limit of the test app is 10 failed attempts per e-mail and address in 15 minutes (tests/support/api.ts).
    const from = await mark();
    const typed = `throttle-${Date.now()}@harrowvale.example`;
    const statuses: number[] = [];
    for (let i = 0; i < 14; i++) statuses.push((await login(typed, 'wrong-password')).status);
    expect(statuses).toEqual([...Array(10).fill(401), ...Array(4).fill(429)]);
    const kinds = (await since(from, 'sign-in refused')).filter(ofEmail(typed)).map((e) => (e.after as { refusal: string }).refusal);
    expect(kinds).toEqual([...Array(10).fill('unknown e-mail'), 'too many attempts']);
  });

  it('keeps a throttled e-mail bounded and free of control characters', async () => {
    const from = await mark();
    // Not a valid address, so each attempt is a 400 that the limiter counts as failed; 257 characters with a NUL.
    const typed = `${'x'.repeat(252)}\u0000@a.b`;
    for (let i = 0; i < 11; i++) await login(typed, 'wrong-password');
    const rows = (await since(from, 'sign-in refused')).filter((e) => (e.after as { refusal?: string }).refusal === 'too many attempts' && String((e.after as { email?: string }).email).startsWith('xxxx'));
    expect(rows).toHaveLength(1);
    // RFC 5321 §4.5.3.1.3: a path is at most 256 octets with its angle brackets, so an address at most 254.
    expect((rows[0].after as { email: string }).email).toBe(`${'x'.repeat(252)}@a`);
  });

  it('records a sign-out with a valid session as its user, and nothing for one without', async () => {
    const agent = request.agent(api.app);
    const signedIn = await agent.post('/api/v1/auth/login').send({ email: demoEmail.auditor, password: DEMO_PASSWORD });
    expect(signedIn.status).toBe(200);
    const from = await mark();
    expect((await agent.post('/api/v1/auth/logout')).status).toBe(204);
    const mine = (await since(from, 'sign-out')).filter((e) => e.actorId === signedIn.body.user.id);
    expect(mine).toHaveLength(1);
    expect(mine[0]).toMatchObject({ entityId: String(signedIn.body.user.id) });
    expect(mine[0].seq).not.toBeNull();
    const again = await mark();
    expect((await request(api.app).post('/api/v1/auth/logout')).status).toBe(204);
    expect((await since(again, 'sign-out')).filter((e) => e.actorId === null)).toEqual([]);
  });
});
