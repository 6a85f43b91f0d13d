// An in-process API with the SPC follow-up (resultsChanged) and queue, as the server wires them. Jobs it enqueues are
// worked by the test server's workers (scripts/run-tests.ts), which share the database.
import request from 'supertest';
import { createApp } from '@api/app';
import { createDatabase } from '@api/db/client';
import { databaseUrl, demoTokens, TEST_JWT_SECRET } from './api';
import type { Role } from '@shared/schemas/users';
import { resultsChanged } from '@api/spc/results-changed';
import { lazyQueue } from '@api/spc/queue';

export const TEST_PUBLIC_URL = 'http://prismline.test';

export function createSpcTestApi() {
  const db = createDatabase(databaseUrl(), 4);
  const queue = lazyQueue(db.$client);
  const app = createApp({
    db,
    config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 },
    serveWeb: false,
    resultsChanged: (change) => resultsChanged({ db, queue, publicUrl: TEST_PUBLIC_URL }, change),
    spcQueue: queue,
    publicUrl: TEST_PUBLIC_URL,
  });
  const tokenFor = demoTokens(app);
  const as = async (role: Role) => ({ authorization: `Bearer ${await tokenFor(role)}` });

  /** Polls the run until it has finished; the run as last seen. */
  async function waitForRun(id: number, timeoutMs = 25_000) {
    const deadline = Date.now() + timeoutMs;
    const h = await as('auditor');
    for (;;) {
      const res = await request(app).get(`/api/v1/spc-runs/${id}`).set(h);
      if (res.body.status === 'succeeded' || res.body.status === 'failed') return res.body;
      if (Date.now() > deadline) throw new Error(`run ${id} did not finish: ${JSON.stringify(res.body)}`);
      await new Promise((r) => setTimeout(r, 150));
    }
  }

  return {
    app,
    db,
    as,
    tokenFor,
    waitForRun,
    async close() {
      await queue.stop();
      await db.$client.end();
    },
  };
}

/** Polls until `check` returns a value other than undefined. */
export async function eventually<T>(check: () => Promise<T | undefined>, timeoutMs = 15_000, what = 'condition'): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v !== undefined) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
