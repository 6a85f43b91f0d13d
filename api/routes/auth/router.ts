import bcrypt from 'bcryptjs';
import { Router } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { HttpError, parseBody } from '@api/http/errors';
import { issueToken, requireSession, SESSION_COOKIE, sessionCookieOptions } from '@api/auth/session';
import { loginSchema } from './schema';

/** Compared against when the e-mail is unknown, so both failures take the same time. */
const DUMMY_HASH = bcrypt.hashSync('not-a-real-password', 10);

export function authRouter(db: Database, opts: { jwtSecret: string; loginAttemptsPer15Min: number }): Router {
  const router = Router();

  const loginLimiter = rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: opts.loginAttemptsPer15Min,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String(req.body?.email ?? '').toLowerCase()}`,
    handler: (_req, res) => {
      res.status(429).json({ error: 'Too many failed sign-in attempts; wait 15 minutes or ask an administrator' });
    },
  });

  router.post('/login', loginLimiter, async (req, res) => {
    const input = parseBody(loginSchema, req.body);
    const [user] = await db.select().from(users).where(sql`lower(${users.email}) = ${input.email}`);
    const ok = await bcrypt.compare(input.password, user?.passwordHash ?? DUMMY_HASH);
    if (!user || !ok) throw new HttpError(401, 'Wrong e-mail or password');
    if (!user.active) throw new HttpError(401, 'This account is deactivated; ask an administrator');
    const session = { id: user.id, email: user.email, name: user.name, role: user.role };
    const token = issueToken(session, opts.jwtSecret);
    await recordAudit(db, { actorId: user.id, action: 'sign-in', entity: 'user', entityId: user.id });
    res.cookie(SESSION_COOKIE, token, sessionCookieOptions());
    res.json({ token, user: session });
  });

  router.get('/me', requireSession, (req, res) => {
    res.json(req.user);
  });

  router.post('/logout', (_req, res) => {
    const { maxAge: _maxAge, ...cookie } = sessionCookieOptions();
    res.clearCookie(SESSION_COOKIE, cookie);
    res.status(204).end();
  });

  return router;
}
