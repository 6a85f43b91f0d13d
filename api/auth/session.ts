import type { CookieOptions, Request, RequestHandler } from 'express';
import jwt from 'jsonwebtoken';
import passport from 'passport';
import { ExtractJwt, Strategy as JwtStrategy } from 'passport-jwt';
import { eq } from 'drizzle-orm';
import type { Role } from '@shared/schemas/users';
import { may, type Permission } from '@shared/permissions';
import type { Database } from '../db/client';
import { users } from '../db/schema';
import { HttpError } from '../http/errors';

export const SESSION_COOKIE = 'prismline_session';
export const SESSION_HOURS = 8;

/** What a signed-in request carries: the user as stored now, not as when the token was issued. */
export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface User extends SessionUser {}
  }
}

export function issueToken(user: SessionUser, secret: string): string {
  return jwt.sign({ sub: String(user.id), role: user.role }, secret, { algorithm: 'HS256', expiresIn: `${SESSION_HOURS}h` });
}

export function sessionCookieOptions(): CookieOptions {
  return { httpOnly: true, sameSite: 'strict', path: '/', maxAge: SESSION_HOURS * 3600 * 1000, secure: process.env.COOKIE_SECURE === '1' };
}

const fromCookie = (req: Request): string | null => req.cookies?.[SESSION_COOKIE] ?? null;

/** Registers the JWT strategy: cookie first (browser), then `Authorization: Bearer` (scripts). */
export function configurePassport(db: Database, secret: string): passport.PassportStatic {
  passport.use(
    new JwtStrategy(
      {
        jwtFromRequest: ExtractJwt.fromExtractors([fromCookie, ExtractJwt.fromAuthHeaderAsBearerToken()]),
        secretOrKey: secret,
        algorithms: ['HS256'],
      },
      (payload: { sub?: string }, done: (err: unknown, user?: Express.User | false) => void) => {
        const id = Number(payload.sub);
        if (!Number.isInteger(id)) return done(null, false);
        db.select({ id: users.id, email: users.email, name: users.name, role: users.role, active: users.active })
          .from(users)
          .where(eq(users.id, id))
          .then(([row]) => done(null, row && row.active ? { id: row.id, email: row.email, name: row.name, role: row.role } : false))
          .catch((err) => done(err));
      },
    ),
  );
  return passport;
}

/** Rejects with 401 unless the request carries a valid token of an active user. */
export const requireSession: RequestHandler = (req, res, next) => {
  passport.authenticate('jwt', { session: false }, (err: unknown, user: Express.User | false) => {
    if (err) return next(err);
    if (!user) return next(new HttpError(401, 'Sign in to continue: the session is missing, expired or no longer valid'));
    req.user = user;
    next();
  })(req, res, next);
};

/** Sets req.user when the request carries a valid session and goes on either way (sign-out records who left). */
export const readSession: RequestHandler = (req, res, next) => {
  passport.authenticate('jwt', { session: false }, (err: unknown, user: Express.User | false) => {
    if (err) return next(err);
    if (user) req.user = user;
    next();
  })(req, res, next);
};

/** Allows the action to the roles the permissions map gives it; a signed-in user with another role gets 403. */
export function requirePermission(action: Permission): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) return next(new HttpError(401, 'Sign in to continue'));
    if (!may(req.user.role, action)) return next(new HttpError(403, 'Your role does not allow this action'));
    next();
  };
}
