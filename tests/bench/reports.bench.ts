// Capability report speed and memory, as ratios to a baseline measured in the same run:
// - the PDF of a product with 12 characteristics over one year of demo-sized data (1,400 lots of two
//   readings each, as the demo's flow characteristics have) against the chart endpoint asked for the same
//   12 characteristics and window — the computation the report is built on. Both are measured cold (each
//   round asks for a window no request has computed yet) and warm (the charts cached);
// - the server's peak memory while it writes those reports, against a 300 MB budget (the ingest one's).
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { readFileSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { sql } from 'drizzle-orm';
import { createDatabase, type Database } from '@api/db/client';
import { periodInstants } from '@api/reports/scope';
import { freePort } from '@scripts/lib/cluster';
import { buildServer, serverCommand, waitForServer } from '@scripts/lib/server-build';

interface BenchRow {
  name: string;
  ratio: number;
  target: string;
  detail: string;
}

const root = resolve(import.meta.dirname, '..', '..');
const CHARACTERISTICS = 12;
const LOTS = 1400;
const ROUNDS = 3;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const peakRssMb = (pid: number) => {
  const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  return m ? Number(m[1]) / 1024 : NaN;
};

/** An invented product with 12 X̄–R characteristics, one lot every 6¼ hours through 2021, two readings a lot per characteristic. */
async function seedProduct(db: Database, tag: string): Promise<{ productId: number; ids: number[] }> {
  return db.transaction(async (tx) => {
    const [where] = (
      await tx.execute<{ plant_id: number; line_id: number; method_id: number }>(sql`
        select p.id as plant_id, l.id as line_id, (select id from test_methods where code = 'FLOW') as method_id
        from plants p join production_lines l on l.plant_id = p.id order by p.id, l.id limit 1`)
    ).rows;
    await tx.execute(sql`select setseed(0.5)`);
    const [product] = (
      await tx.execute<{ id: number }>(sql`
        insert into products (plant_id, code, name, family, line_id) values (${where.plant_id}, ${tag}, ${`Bench compound ${tag}`}, 'bench', ${where.line_id}) returning id`)
    ).rows;
    const ids: number[] = [];
    for (let k = 1; k <= CHARACTERISTICS; k++) {
      const [ch] = (
        await tx.execute<{ id: number }>(sql`
          insert into characteristics (code, product_id, test_method_id, name, unit, subgroup_size, chart_type, rule_set)
          values (${`${tag}-F${String(k).padStart(2, '0')}`}, ${product.id}, ${where.method_id}, ${`Bench flow ${k}`}, 'mm', 2, 'xbar-r', 'extended') returning id`)
      ).rows;
      ids.push(ch.id);
      await tx.execute(sql`insert into spec_limits (characteristic_id, revision, lsl, usl, target, effective_from) values (${ch.id}, 1, 135, 155, 145, '2020-01-01T00:00:00Z')`);
    }
    await tx.execute(sql`
      insert into lots (lot_number, product_id, line_id, produced_at, shift)
      select ${tag} || '-' || lpad(g::text, 5, '0'), ${product.id}, ${where.line_id}, timestamptz '2021-01-01T06:00:00Z' + g * interval '375 minutes', 'early'
      from generate_series(1, ${LOTS}) g`);
    await tx.execute(sql`
      insert into measurements (lot_id, characteristic_id, replicate, value, source)
      select l.id, c.id, r, round((145 + 2 * (random() + random() + random() + random() + random() + random() - 3))::numeric)::float8, 'upload'
      from lots l cross join unnest(${sql.param(ids)}::int[]) c(id) cross join generate_series(1, 2) r
      where l.product_id = ${product.id}`);
    return { productId: product.id, ids };
  });
}

async function removeProduct(db: Database, productId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const ids = sql`(select id from characteristics where product_id = ${productId})`;
    for (const table of ['measurements', 'spec_limits', 'spc_snapshots', 'alarms', 'capability_watch']) await tx.execute(sql`delete from ${sql.identifier(table)} where characteristic_id in ${ids}`);
    await tx.execute(sql`delete from characteristics where product_id = ${productId}`);
    await tx.execute(sql`delete from lots where product_id = ${productId}`);
    await tx.execute(sql`delete from products where id = ${productId}`);
  });
}

export async function run(): Promise<BenchRow[]> {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is not set: run through npm run bench');
  await buildServer();
  // No SPC workers or scheduler in the measured server: only the requests under test run there.
  const env = { ...process.env, PRISMLINE_MODE: 'demo', LOG_LEVEL: 'warn', JWT_SECRET: 'bench-secret-bench-secret-bench-secret-42', SPC_WORKER_CONCURRENCY: '0', PRISMLINE_SCHEDULER: '0' };
  const startServer = async () => {
    const port = await freePort();
    const { command, args } = serverCommand();
    const child = spawn(command, args, { cwd: root, env: { ...env, PORT: String(port) }, stdio: ['ignore', 'inherit', 'inherit'] });
    const url = `http://127.0.0.1:${port}`;
    await waitForServer(url, child);
    return { child, url };
  };
  // The first server seeds the demo plant and stops; the measured one starts on the seeded database, so its
  // memory is the reports' and not the seed's leftovers.
  const seeding = await startServer();
  seeding.child.kill('SIGTERM');
  await once(seeding.child, 'exit');
  const { child: server, url: base } = await startServer();
  const db = createDatabase(databaseUrl, 2);
  let productId: number | null = null;
  try {
    const seeded = await seedProduct(db, `BRP${Date.now().toString(36).toUpperCase()}`);
    productId = seeded.productId;
    const login = (await fetch(`${base}/api/v1/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'auditor@harrowvale.example', password: 'prismline-demo' }),
    }).then((r) => r.json())) as { token: string };
    const headers = { authorization: `Bearer ${login.token}` };

    const timed = async (urls: string[]) => {
      const t0 = performance.now();
      let bytes = 0;
      for (const url of urls) {
        const res = await fetch(url, { headers });
        if (res.status !== 200) throw new Error(`${url} answered ${res.status}`);
        bytes += (await res.arrayBuffer()).byteLength;
      }
      return { ms: performance.now() - t0, bytes };
    };
    // A year of plant days; each round shifts the window by a day so that its charts are not cached yet.
    const windowOf = (round: number) => {
      const from = `2021-01-${String(1 + round).padStart(2, '0')}`;
      const to = `2021-12-${String(31 - round).padStart(2, '0')}`;
      return { from, to };
    };
    const reportUrl = (w: { from: string; to: string }) => `${base}/api/v1/reports/capability.pdf?product=${productId}&from=${w.from}&to=${w.to}`;
    // The chart endpoint for the report's window: the instants those plant days stand for in the demo plant's zone.
    const chartUrls = (w: { from: string; to: string }) => {
      const { fromInstant, toInstant } = periodInstants(w.from, w.to, 'Europe/London');
      const q = `from=${encodeURIComponent(fromInstant.toISOString())}&to=${encodeURIComponent(toInstant.toISOString())}`;
      return seeded.ids.map((id) => `${base}/api/v1/characteristics/${id}/chart?${q}`);
    };

    const rssBefore = peakRssMb(server.pid!);
    // Restart the peak-RSS count (Linux clear_refs 5) so the figure is the reports', not the start's.
    writeFileSync(`/proc/${server.pid}/clear_refs`, '5');
    const cold = { report: [] as number[], charts: [] as number[] };
    const warm = { report: [] as number[], charts: [] as number[] };
    let pdfBytes = 0;
    for (let round = 0; round < ROUNDS; round++) {
      // Cold: the report on one window, the charts on another no request has asked for (both compute every chart).
      const a = windowOf(2 * round);
      const b = windowOf(2 * round + 1);
      const report = await timed([reportUrl(a)]);
      pdfBytes = report.bytes;
      cold.report.push(report.ms);
      cold.charts.push((await timed(chartUrls(b))).ms);
      // Warm: the same windows again, every chart now cached.
      warm.report.push((await timed([reportUrl(b)])).ms);
      warm.charts.push((await timed(chartUrls(a))).ms);
    }
    const rss = peakRssMb(server.pid!);
    const points = (LOTS * 364) / 365;
    return [
      {
        name: `reports: product PDF, ${CHARACTERISTICS} characteristics × one year, vs the chart endpoint for them (not cached)`,
        ratio: median(cold.report) / median(cold.charts),
        target: '≤ 5',
        detail: `median of ${ROUNDS}: PDF ${median(cold.report).toFixed(0)} ms (${(pdfBytes / 1e6).toFixed(2)} MB) vs ${CHARACTERISTICS} charts ${median(cold.charts).toFixed(0)} ms; about ${Math.round(points)} lots a characteristic`,
      },
      {
        name: 'reports: the same, charts cached',
        ratio: median(warm.report) / median(warm.charts),
        target: 'reported',
        detail: `median of ${ROUNDS}: PDF ${median(warm.report).toFixed(0)} ms vs ${CHARACTERISTICS} charts ${median(warm.charts).toFixed(0)} ms`,
      },
      {
        name: 'reports: server peak memory (MB)',
        ratio: rss / 300,
        target: '≤ 1 (300 MB)',
        detail: `peak RSS while writing ${2 * ROUNDS} product PDFs and answering ${2 * ROUNDS * CHARACTERISTICS} charts: ${rss.toFixed(0)} MB (peak while starting, before them: ${rssBefore.toFixed(0)} MB)`,
      },
    ];
  } finally {
    if (productId !== null) await removeProduct(db, productId).catch(() => undefined);
    await db.$client.end().catch(() => undefined);
    server.kill('SIGTERM');
  }
}
