// Speed of the nightly SPC run on a scaled plant (200 characteristics × 5,000 individual values =
// 1,000,000 values) in a private cluster, against a baseline measured in the same run: reading the
// same measurements, in the same order, with one SELECT through the same driver.
// - full run with 1 worker process and with 2 (each with its default two job loops): time from start to the run's
//   finish, as a ratio to the baseline read; target ≤ 5; the 2-worker speed-up is reported;
// - incremental run after one new lot (its 10 characteristics): upload through the ingest path,
//   out-of-spec check and run, until the run has finished; target under 2 s.
import { sql } from 'drizzle-orm';
import { importResults } from '@api/ingest/import';
import { resultsChanged } from '@api/spc/results-changed';
import { startPrivateCluster } from '@tests/support/private-cluster';
import { seedScaledPlant } from '@tests/support/scaled-plant';
import { fixedQueue, startBoss } from '@api/spc/queue';
import { getRun, startRun } from '@api/spc/runs';
import { spawnWorker, stopWorkers, type WorkerProcess } from '../reliability/support';

interface BenchRow {
  name: string;
  ratio: number;
  target: string;
  detail: string;
}

const CHARACTERISTICS = 200;
const POINTS = 5000;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;

async function ready(w: WorkerProcess): Promise<void> {
  const deadline = Date.now() + 60_000;
  while (!w.output().includes('SPC worker ready')) {
    if (w.child.exitCode !== null || Date.now() > deadline) throw new Error(`worker did not start: ${w.output()}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export async function run(): Promise<BenchRow[]> {
  const cluster = await startPrivateCluster('bench-nightly');
  let workers: WorkerProcess[] = [];
  const boss = await startBoss({ connectionString: cluster.databaseUrl, supervise: false });
  const queue = fixedQueue(boss);
  const db = cluster.db;
  try {
    const plant = await seedScaledPlant(db, { characteristics: CHARACTERISTICS, points: POINTS, perProduct: 10 });
    await db.execute(sql`vacuum analyze`);
    const [{ n: values }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from measurements`)).rows;

    // The columns a characteristic's job reads, for every characteristic at once, in chart order.
    const baselineRead = async () => {
      const t = performance.now();
      const r = await db.$client.query(`
        select m.characteristic_id, m.lot_id, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms, l.shift, m.value,
               (extract(epoch from m.created_at) * 1000)::float8 as entered_ms
        from measurements m join lots l on l.id = m.lot_id where m.voided_at is null
        order by m.characteristic_id, l.produced_at, l.lot_number collate "C", m.replicate`);
      if (r.rows.length !== values) throw new Error('baseline read the wrong number of rows');
      return performance.now() - t;
    };

    /** A full run from nothing stored: the time between the run's creation and its finish. */
    const fullRun = async (workerCount: number) => {
      await db.execute(sql`truncate spc_snapshots, mail_outbox, alarms restart identity cascade`);
      await stopWorkers(workers);
      workers = Array.from({ length: workerCount }, () => spawnWorker(cluster.databaseUrl, { LOG_LEVEL: 'info', SPC_POLL_MS: '50' }));
      await Promise.all(workers.map(ready));
      // Baseline reads just before and just after the run, so that both see the machine's load of the moment.
      const reads = [await baselineRead(), await baselineRead()];
      const id = (await startRun(db, queue, { trigger: 'manual' }))!;
      for (;;) {
        const r = await getRun(db, id);
        if (r!.status === 'succeeded' || r!.status === 'failed') {
          if (r!.status !== 'succeeded' || r!.done !== CHARACTERISTICS) throw new Error(`the run did not succeed: ${JSON.stringify(r)}`);
          reads.push(await baselineRead(), await baselineRead());
          return { ms: Date.parse(r!.finishedAt!) - Date.parse(r!.createdAt), base: median(reads), alarms: r!.alarmsRaised };
        }
        await new Promise((res) => setTimeout(res, 50));
      }
    };

    const one = await fullRun(1);
    const two = await fullRun(2);
    const rows: BenchRow[] = [
      {
        name: `nightly: full run, ${CHARACTERISTICS} × ${POINTS.toLocaleString('en')} values, 1 worker`,
        ratio: one.ms / one.base,
        target: '≤ 5 × one SELECT of the same values',
        detail: `${s(one.ms)} vs ${s(one.base)} reading ${values.toLocaleString('en')} values; ${one.alarms} alarms raised`,
      },
      {
        name: `nightly: full run, ${CHARACTERISTICS} × ${POINTS.toLocaleString('en')} values, 2 workers`,
        ratio: two.ms / two.base,
        target: '≤ 5 × one SELECT of the same values',
        detail: `${s(two.ms)} vs ${s(two.base)}; speed-up over 1 worker ${(one.ms / two.ms).toFixed(2)} ×`,
      },
    ];

    // One new lot of one product: 10 characteristics, through the ingest path and resultsChanged (workers stay at 2).
    const [product] = (await db.execute<{ code: string; line: string }>(sql`
      select p.code, pl.code as line from products p join production_lines pl on pl.id = p.line_id where p.id = ${plant.productIds[0]}`)).rows;
    const chars = (await db.execute<{ code: string }>(sql`select code from characteristics where product_id = ${plant.productIds[0]} order by code`)).rows;
    // The newest lot of the chart, made an hour ago: the import refuses production times later than now.
    const madeAnHourAgo = new Date(Date.now() - 3_600_000).toISOString();
    const csv = ['lot,product,line,produced_at,characteristic,value,replicate', ...chars.map((c, i) => `${product.code}-NEW,${product.code},${product.line},${madeAnHourAgo},${c.code},${145 + i / 10},1`)].join('\n');
    const t0 = performance.now();
    const outcome = await importResults(db, { fileName: 'new-lot.csv', content: Buffer.from(csv), actorId: null, source: 'upload' });
    if (outcome.kind !== 'imported') throw new Error(`the new lot did not import: ${outcome.kind}`);
    await resultsChanged({ db, queue, publicUrl: 'http://prismline.bench' }, { characteristicIds: outcome.characteristicIds, because: 'upload', by: null, judge: outcome.toJudge });
    const incId = (await db.execute<{ id: number }>(sql`select max(id)::int as id from spc_runs where trigger = 'upload'`)).rows[0].id;
    for (;;) {
      const r = await getRun(db, incId);
      if (r!.status === 'succeeded') break;
      if (r!.status === 'failed') throw new Error('the incremental run failed');
      await new Promise((res) => setTimeout(res, 10));
    }
    const incMs = performance.now() - t0;
    rows.push({
      name: 'nightly: incremental run after one new lot (10 characteristics × 5,001 values)',
      ratio: incMs / 2000,
      target: '≤ 1 (under 2 s)',
      detail: `${Math.round(incMs)} ms from the upload to the finished run, 2 workers`,
    });
    return rows;
  } finally {
    await stopWorkers(workers);
    await boss.stop({ graceful: false }).catch(() => undefined);
    await cluster.destroy();
  }
}
