import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { z } from 'zod';
import { dataRoot } from './paths';

const envSchema = z.object({
  /** PostgreSQL connection string. */
  DATABASE_URL: z.string().default('postgres://postgres@127.0.0.1:54329/prismline'),
  /** Interface the HTTP server binds to; loopback unless deliberately opened. */
  HOST: z.string().default('127.0.0.1'),
  /** HTTP port for API and web app. */
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  /** demo seeds the invented plant and may invent a JWT secret; production needs JWT_SECRET. */
  PRISMLINE_MODE: z.enum(['demo', 'production']).default('production'),
  /** HMAC secret for session tokens. */
  JWT_SECRET: z.string().min(32, 'JWT_SECRET must be at least 32 characters').optional(),
  /** Failed sign-in attempts allowed per e-mail and address in 15 minutes. */
  LOGIN_ATTEMPTS_PER_15_MIN: z.coerce.number().int().min(1).default(10),
  /** pino level. */
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /** Public address of the app, used in e-mail links. */
  PUBLIC_URL: z.string().optional(),
});

export interface Config {
  databaseUrl: string;
  host: string;
  port: number;
  mode: 'demo' | 'production';
  jwtSecret: string;
  loginAttemptsPer15Min: number;
  logLevel: string;
  publicUrl: string;
}

/** In demo mode a random secret is kept in .data so sessions survive a restart. */
function demoSecret(): string {
  const file = resolve(dataRoot, 'demo-jwt-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  const secret = randomBytes(48).toString('hex');
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
    throw new Error(`Invalid configuration:\n${lines}`);
  }
  const e = parsed.data;
  if (e.PRISMLINE_MODE === 'production' && !e.JWT_SECRET) {
    throw new Error('JWT_SECRET is required outside demo mode (set PRISMLINE_MODE=demo for the demo plant).');
  }
  return {
    databaseUrl: e.DATABASE_URL,
    host: e.HOST,
    port: e.PORT,
    mode: e.PRISMLINE_MODE,
    jwtSecret: e.JWT_SECRET ?? demoSecret(),
    loginAttemptsPer15Min: e.LOGIN_ATTEMPTS_PER_15_MIN,
    logLevel: e.LOG_LEVEL,
    publicUrl: e.PUBLIC_URL ?? `http://${e.HOST}:${e.PORT}`,
  };
}
