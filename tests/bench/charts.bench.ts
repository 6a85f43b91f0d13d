// Chart speed, each figure a ratio to a baseline measured on the same machine in the same run:
// - the chart endpoint for a 5,000-point characteristic under 20 concurrent clients (autocannon)
//   against the same server sending a static JSON file of the same size: p95 latency;
// - a 10,000-point chart in Chromium: frame times while zooming, against the same chart of 500 points
//   (the 60 Hz frame budget is given beside it: on a busy machine it says more about the machine);
// - the app's initial JavaScript, gzipped, against its 350 kB budget.
import { spawn } from 'node:child_process';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { freePort } from '@scripts/lib/cluster';
import { resolve } from 'node:path';
import { gzipSync } from 'node:zlib';
import autocannon from 'autocannon';
import { sql } from 'drizzle-orm';
import { createDatabase, type Database } from '@api/db/client';
import { buildServer, serverCommand, waitForServer } from '@scripts/lib/server-build';
import { buildWebIfStale } from '@scripts/lib/web-build';
import { launchBrowser } from '../support/browser';

interface BenchRow {
  name: string;
  ratio: number;
  target: string;
  detail: string;
}

const root = resolve(import.meta.dirname, '..', '..');
const dist = resolve(root, 'web', 'dist');
const CLIENTS = 20;
const SECONDS = 8;
const ROUNDS = 3;
const FRAME_MS = 1000 / 60;
const INITIAL_JS_BUDGET = 350 * 1024;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
function percentile(xs: number[], p: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)];
}

/**
 * An invented X̄–R characteristic (two flow readings per lot) with `points` lots in production order
 * and a step in the last fifth, so the chart has rule signals to mark. Codes are unique to the run.
 */
async function seedCharacteristic(db: Database, tag: string, points: number): Promise<number> {
  return db.transaction(async (tx) => {
    const [where] = (await tx.execute<{ plant_id: number; line_id: number; method_id: number }>(sql`
      select p.id as plant_id, l.id as line_id, (select id from test_methods where code = 'FLOW') as method_id
      from plants p join production_lines l on l.plant_id = p.id order by p.id, l.id limit 1`)).rows;
    await tx.execute(sql`select setseed(0.25)`);
    const [product] = (await tx.execute<{ id: number }>(sql`
      insert into products (plant_id, code, name, family, line_id)
      values (${where.plant_id}, ${tag}, ${`Bench compound ${tag}`}, 'bench', ${where.line_id}) returning id`)).rows;
    const [ch] = (await tx.execute<{ id: number }>(sql`
      insert into characteristics (code, product_id, test_method_id, name, unit, subgroup_size, chart_type, rule_set, active)
      values (${`${tag}-FLOW`}, ${product.id}, ${where.method_id}, ${`Bench compound ${tag} · flow diameter`}, 'mm', 2, 'xbar-r', 'extended', false)
      returning id`)).rows;
    await tx.execute(sql`
      insert into spec_limits (characteristic_id, revision, lsl, usl, target, effective_from)
      values (${ch.id}, 1, 135, 155, 145, '2020-01-01T00:00:00Z')`);
    await tx.execute(sql`
      insert into lots (lot_number, product_id, line_id, produced_at, shift)
      select ${tag} || '-' || lpad(g::text, 6, '0'), ${product.id}, ${where.line_id}, timestamptz '2021-01-01T06:00:00Z' + g * interval '3 hours', 'early'
      from generate_series(1, ${points}) g`);
    await tx.execute(sql`
      insert into measurements (lot_id, characteristic_id, replicate, value, source)
      select l.id, ${ch.id}, r,
             round((145 + 2 * (random() + random() + random() + random() + random() + random() - 3)
                    - case when split_part(l.lot_number, '-', 2)::int > ${Math.floor(points * 0.8)} then 4 else 0 end)::numeric)::float8,
             'upload'
      from lots l, generate_series(1, 2) r where l.product_id = ${product.id}`);
    return ch.id;
  });
}

async function removeCharacteristic(db: Database, id: number): Promise<void> {
  await db.transaction(async (tx) => {
    const [{ product_id }] = (await tx.execute<{ product_id: number }>(sql`select product_id from characteristics where id = ${id}`)).rows;
    await tx.execute(sql`delete from measurements where characteristic_id = ${id}`);
    await tx.execute(sql`delete from spec_limits where characteristic_id = ${id}`);
    await tx.execute(sql`delete from spc_snapshots where characteristic_id = ${id}`);
    await tx.execute(sql`delete from characteristics where id = ${id}`);
    await tx.execute(sql`delete from lots where product_id = ${product_id}`);
    await tx.execute(sql`delete from products where id = ${product_id}`);
  });
}

/** p95 of every response time of one autocannon run, in ms, and the requests done. */
function load(url: string, headers: Record<string, string>): Promise<{ p95: number; requests: number; errors: number }> {
  return new Promise((res, rej) => {
    const times: number[] = [];
    let errors = 0;
    const instance = autocannon({ url, connections: CLIENTS, duration: SECONDS, headers }, (err) => {
      if (err) rej(err);
      else res({ p95: percentile(times, 95), requests: times.length, errors });
    });
    instance.on('response', (_client: unknown, status: number, _bytes: number, responseTime: number) => {
      if (status === 200) times.push(responseTime);
      else errors++;
    });
  });
}

/** The scripts the built index.html loads at once (entry and module preloads), gzipped. */
function initialJsBytes(): { gzipped: number; files: string[] } {
  const html = readFileSync(resolve(dist, 'index.html'), 'utf8');
  const files = [...html.matchAll(/<(?:script[^>]+src|link[^>]+rel="modulepreload"[^>]+href)="([^"]+\.js)"/g)].map((m) => m[1]);
  let gzipped = 0;
  for (const f of files) gzipped += gzipSync(readFileSync(resolve(dist, f.replace(/^\//, '')))).length;
  return { gzipped, files };
}

/** Frame intervals in Chromium while the wheel zooms a chart in and out, per chart, alternating rounds. */
async function zoomFrames(base: string, ids: number[], rounds: number): Promise<Map<number, { p95: number[]; frames: number; drawnMs: number[] }>> {
  const browser = await launchBrowser({ viewport: { width: 1600, height: 1000 } });
  const out = new Map(ids.map((id) => [id, { p95: [] as number[], frames: 0, drawnMs: [] as number[] }]));
  try {
    const page = await browser.context.newPage();
    page.setDefaultTimeout(60_000);
    await page.goto(`${base}/sign-in`);
    await page.getByLabel('E-mail').fill('auditor@harrowvale.example');
    await page.getByLabel('Password').fill('prismline-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { level: 1, name: 'Plant overview' }).waitFor();
    for (let round = 0; round < rounds; round++) {
      for (const id of ids) {
        const t0 = Date.now();
        await page.goto(`${base}/charts/${id}`);
        await page.getByTestId('control-chart').locator('canvas').first().waitFor();
        const drawnMs = Date.now() - t0;
        // Settle: the page has finished its first layout and drawing before the wheel starts.
        await page.waitForTimeout(1000);
        const box = (await page.getByTestId('control-chart').boundingBox())!;
        await page.mouse.move(box.x + box.width / 2, box.y + box.height * 0.3);
        // A string, so the bundler's helpers for named functions do not reach the page.
        await page.evaluate(`(() => {
          window.frameGaps = [];
          window.frameRun = true;
          let last = performance.now();
          const tick = (now) => {
            window.frameGaps.push(now - last);
            last = now;
            if (window.frameRun) requestAnimationFrame(tick);
          };
          requestAnimationFrame(tick);
        })()`);
        for (let i = 0; i < 40; i++) {
          await page.mouse.wheel(0, i < 20 ? -240 : 240);
          await page.waitForTimeout(30);
        }
        const gaps = (await page.evaluate('(() => { window.frameRun = false; return window.frameGaps.slice(1); })()')) as number[];
        const entry = out.get(id)!;
        entry.p95.push(percentile(gaps, 95));
        entry.frames += gaps.length;
        entry.drawnMs.push(drawnMs);
      }
    }
    return out;
  } finally {
    await browser.close();
  }
}

export async function run(): Promise<BenchRow[]> {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is not set: run through npm run bench');
  buildWebIfStale();
  const rows: BenchRow[] = [];

  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  await buildServer();
  const { command, args } = serverCommand();
  const server = spawn(command, args, {
    cwd: root,
    // No SPC workers or scheduler in the measured server: only the requests under test run there.
    env: { ...process.env, PORT: String(port), PRISMLINE_MODE: 'demo', LOG_LEVEL: 'warn', JWT_SECRET: 'bench-secret-bench-secret-bench-secret-42', SPC_WORKER_CONCURRENCY: '0', PRISMLINE_SCHEDULER: '0' },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const db = createDatabase(databaseUrl, 2);
  const tag = `BCH${Date.now().toString(36).toUpperCase()}`;
  const staticName = `bench-chart-${tag.toLowerCase()}.json`;
  const seeded: number[] = [];
  try {
    await waitForServer(base, server);
    const five = await seedCharacteristic(db, `${tag}A`, 5000);
    seeded.push(five);
    const ten = await seedCharacteristic(db, `${tag}B`, 10_000);
    seeded.push(ten);
    const small = await seedCharacteristic(db, `${tag}C`, 500);
    seeded.push(small);

    const login = await fetch(`${base}/api/v1/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'auditor@harrowvale.example', password: 'prismline-demo' }),
    }).then((r) => r.json() as Promise<{ token: string }>);
    const headers = { authorization: `Bearer ${login.token}` };
    const chartUrl = `${base}/api/v1/characteristics/${five}/chart`;

    // The first request computes the chart (a cache miss); later ones find it cached.
    const coldStart = performance.now();
    const body = Buffer.from(await (await fetch(chartUrl, { headers })).arrayBuffer());
    const coldMs = performance.now() - coldStart;
    const points = (JSON.parse(body.toString('utf8')) as { points: unknown[] }).points.length;
    if (points !== 5000) throw new Error(`The bench chart has ${points} points, not 5000`);
    writeFileSync(resolve(dist, staticName), body);
    const staticUrl = `${base}/${staticName}`;
    const staticBytes = Number((await fetch(staticUrl)).headers.get('content-length'));
    if (staticBytes !== body.length) throw new Error(`The static copy is ${staticBytes} bytes, the chart ${body.length}`);

    const chartP95: number[] = [];
    const staticP95: number[] = [];
    let chartRequests = 0;
    let staticRequests = 0;
    let errors = 0;
    // Alternating rounds, medians reported: both sides see the same state of the machine.
    for (let round = 0; round < ROUNDS; round++) {
      const c = await load(chartUrl, headers);
      const s = await load(staticUrl, headers);
      chartP95.push(c.p95);
      staticP95.push(s.p95);
      chartRequests += c.requests;
      staticRequests += s.requests;
      errors += c.errors + s.errors;
    }
    if (errors > 0) throw new Error(`${errors} requests of the chart benchmark did not answer 200`);
    const chart = median(chartP95);
    const plain = median(staticP95);
    rows.push({
      name: `charts: GET chart, 5,000 points, ${CLIENTS} clients, p95 latency`,
      ratio: chart / plain,
      target: '≤ 3 (vs the same bytes as a static file)',
      detail: `p95 ${chart.toFixed(1)} ms vs ${plain.toFixed(1)} ms static; ${(body.length / 1e6).toFixed(2)} MB; ${Math.round(chartRequests / (ROUNDS * SECONDS))} vs ${Math.round(staticRequests / (ROUNDS * SECONDS))} req/s; first, uncached request ${coldMs.toFixed(0)} ms`,
    });

    const frames = await zoomFrames(base, [small, ten], 3);
    const large = frames.get(ten)!;
    const few = frames.get(small)!;
    const largeP95 = median(large.p95);
    const fewP95 = median(few.p95);
    rows.push({
      name: 'charts: zooming a 10,000-point chart in Chromium, p95 frame time',
      ratio: largeP95 / fewP95,
      target: '≤ 2 (vs the same chart of 500 points)',
      detail: `p95 ${largeP95.toFixed(1)} ms vs ${fewP95.toFixed(1)} ms (${(largeP95 / FRAME_MS).toFixed(1)} × the 16.7 ms frame of 60 Hz), ${large.frames} frames of 40 wheel steps; page to drawn chart ${median(large.drawnMs)} vs ${median(few.drawnMs)} ms`,
    });

    const js = initialJsBytes();
    rows.push({
      name: 'charts: initial JavaScript of the app, gzipped',
      ratio: js.gzipped / INITIAL_JS_BUDGET,
      target: '≤ 1 (vs 350 kB)',
      detail: `${(js.gzipped / 1024).toFixed(1)} kB in ${js.files.length} file(s); the chart page and echarts load with the chart route`,
    });
    return rows;
  } finally {
    rmSync(resolve(dist, staticName), { force: true });
    for (const id of seeded) await removeCharacteristic(db, id).catch(() => undefined);
    await db.$client.end().catch(() => undefined);
    server.kill('SIGTERM');
  }
}
