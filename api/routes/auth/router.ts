import bcrypt from 'bcryptjs';
import { Router, type Request } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { HttpError, parseBody } from '@api/http/errors';
import { issueToken, readSession, requireSession, SESSION_COOKIE, sessionCookieOptions } from '@api/auth/session';
import { loginSchema } from './schema';

/** Compared against when the e-mail is unknown, so both failures take the same time. */
const DUMMY_HASH = bcrypt.hashSync('not-a-real-password', 10);

/** Why a sign-in was refused, as the audit event's `after.refusal` says it. */
export type SignInRefusal = 'unknown e-mail' | 'wrong password' | 'deactivated' | 'too many attempts';

/** The longest e-mail address there is (RFC 5321 path limit); whatever else is typed is cut there. */
const TYPED_EMAIL_CHARS = 254;

/**
 * The e-mail as typed, for the audit trail: unvalidated when throttled, so cut to a bounded length and
 * rid of control characters (PostgreSQL's jsonb refuses NUL). Not a string: nothing was typed as one.
 */
function typedEmail(req: Request): string | null {
  const raw: unknown = req.body?.email;
  if (typeof raw !== 'string') return null;
  // eslint-disable-next-line no-control-regex
  return raw.replace(/[\u0000-\u001f\u007f]/g, '').slice(0, TYPED_EMAIL_CHARS);
}

export function authRouter(db: Database, opts: { jwtSecret: string; loginAttemptsPer15Min: number }): Router {
  const router = Router();

  const refused = (req: Request, refusal: SignInRefusal, userId: number | null) =>
    recordAudit(db, { actorId: userId, action: 'sign-in refused', entity: 'user', entityId: userId, after: { email: typedEmail(req), refusal } });

  const loginLimiter = rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: opts.loginAttemptsPer15Min,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String(req.body?.email ?? '').toLowerCase()}`,
    handler: async (req, res) => {
      // Only the first throttled attempt of a window is recorded: every attempt past the limit counts
      // (used = limit + 1, + 2, …), so someone hammering one e-mail adds one row a window, not one a request.
      if ((req as Request & { rateLimit?: { used: number } }).rateLimit?.used === opts.loginAttemptsPer15Min + 1) {
        const email = typedEmail(req);
        const [user] = email ? await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = ${email.trim().toLowerCase()}`) : [];
        await refused(req, 'too many attempts', user?.id ?? null);
      }
      res.status(429).json({ error: 'Too many failed sign-in attempts; wait 15 minutes or ask an administrator' });
    },
  });

  router.post('/login', loginLimiter, async (req, res) => {
    const input = parseBody(loginSchema, req.body);
    const [user] = await db.select().from(users).where(sql`lower(${users.email}) = ${input.email}`);
    const ok = await bcrypt.compare(input.password, user?.passwordHash ?? DUMMY_HASH);
    if (!user || !ok) {
      await refused(req, user ? 'wrong password' : 'unknown e-mail', user?.id ?? null);
      throw new HttpError(401, 'Wrong e-mail or password');
    }
    if (!user.active) {
      await refused(req, 'deactivated', user.id);
      throw new HttpError(401, 'This account is deactivated; ask an administrator');
    }
    const session = { id: user.id, email: user.email, name: user.name, role: user.role };
    const token = issueToken(session, opts.jwtSecret);
    await recordAudit(db, { actorId: user.id, action: 'sign-in', entity: 'user', entityId: user.id });
    res.cookie(SESSION_COOKIE, token, sessionCookieOptions());
    res.json({ token, user: session });
  });

  router.get('/me', requireSession, (req, res) => {
    res.json(req.user);
  });

  // Open without a session (a stale cookie is still cleared); only a valid session's sign-out is recorded, as its user's.
  router.post('/logout', readSession, async (req, res) => {
    if (req.user) await recordAudit(db, { actorId: req.user.id, action: 'sign-out', entity: 'user', entityId: req.user.id });
    const { maxAge: _maxAge, ...cookie } = sessionCookieOptions();
    res.clearCookie(SESSION_COOKIE, cookie);
    res.status(204).end();
  });

  return router;
}
