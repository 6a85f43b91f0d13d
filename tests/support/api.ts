// In-process API for integration tests, against the real test database started by scripts/run-tests.ts.
import type { Express } from 'express';
import request from 'supertest';
import { createApp } from '@api/app';
import { createDatabase, type Database } from '@api/db/client';
import { DEMO_PASSWORD } from '@api/db/seed';
import type { Role } from '@shared/schemas/users';

export const demoEmail: Record<Role, string> = {
  admin: 'admin@harrowvale.example',
  quality_manager: 'manager@harrowvale.example',
  technician: 'technician@harrowvale.example',
  auditor: 'auditor@harrowvale.example',
};

export const TEST_JWT_SECRET = process.env.JWT_SECRET ?? 'test-secret-that-is-long-enough-for-hs256-signing';

export interface TestApi {
  app: Express;
  db: Database;
  /** A bearer token of the demo user with that role. */
  tokenFor(role: Role): Promise<string>;
  close(): Promise<void>;
}

export function databaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the suite with npm test');
  return url;
}

/** Signs the demo users in to an app, once a role: their bearer tokens. */
export function demoTokens(app: Express): (role: Role) => Promise<string> {
  const tokens = new Map<Role, string>();
  return async (role) => {
    const cached = tokens.get(role);
    if (cached) return cached;
    const res = await request(app).post('/api/v1/auth/login').send({ email: demoEmail[role], password: DEMO_PASSWORD });
    if (res.status !== 200) throw new Error(`Sign-in as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
    tokens.set(role, res.body.token);
    return res.body.token;
  };
}

export function createTestApi(): TestApi {
  const db = createDatabase(databaseUrl(), 4);
  const app = createApp({ db, config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 10 }, serveWeb: false });
  return { app, db, tokenFor: demoTokens(app), close: () => db.$client.end() };
}
