import { afterAll, describe, expect, it } from 'vitest';
import { startCluster, stopCluster, type Cluster } from '@scripts/lib/cluster';

// Runs against the separate server process the harness started, so the real pool recovers by itself.
const baseUrl = process.env.PRISMLINE_BASE_URL;
const cluster: Cluster = { root: process.env.PRISMLINE_TEST_PG_ROOT ?? '', port: Number(process.env.PRISMLINE_TEST_PG_PORT) };

async function health() {
  const res = await fetch(`${baseUrl}/api/health`);
  return { status: res.status, body: await res.json() };
}

afterAll(() => startCluster(cluster));

describe('GET /api/health', () => {
  it('answers 200 while PostgreSQL runs, 503 with a reason while it is stopped, and 200 again after a restart', async () => {
    expect(await health()).toEqual({ status: 200, body: { status: 'ok' } });
    const login = await fetch(`${baseUrl}/api/v1/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'auditor@harrowvale.example', password: 'prismline-demo' }),
    }).then((r) => r.json());

    stopCluster(cluster);
    const down = await health();
    expect(down.status).toBe(503);
    expect(down.body.status).toBe('unavailable');
    expect(down.body.error).toMatch(/Database unavailable/);
    expect(down.body.error).not.toMatch(/\n\s+at /);
    // Any other request fails plainly too: no stack trace, no SQL, no connection string.
    const products = await fetch(`${baseUrl}/api/v1/products`, { headers: { authorization: `Bearer ${login.token}` } });
    expect(products.status).toBe(503);
    const text = await products.text();
    expect(JSON.parse(text).error).toMatch(/database is not answering/);
    expect(text).not.toMatch(/select|ECONNREFUSED|postgres:\/\/|\.ts:\d+/i);

    startCluster(cluster);
    let back = await health();
    for (let i = 0; i < 20 && back.status !== 200; i++) {
      await new Promise((r) => setTimeout(r, 250));
      back = await health();
    }
    expect(back).toEqual({ status: 200, body: { status: 'ok' } });
  });
});
