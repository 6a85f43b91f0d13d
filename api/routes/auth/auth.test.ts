import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi, demoEmail, TEST_JWT_SECRET } from '@tests/support/api';
import { DEMO_PASSWORD } from '@api/db/seed';

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
