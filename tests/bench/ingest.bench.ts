// Ingest benchmark: a 100,000-row long-format CSV sent by curl through POST /api/v1/uploads, end to end, against
// `psql \copy` of the same rows into a bare table of the same columns on the same server. Two shapes of
// file: one like the plant's own results (the demo scenario's mix, the target's figure) and one of two
// readings a lot (50,000 new lots), heavy on the lots table, reported beside it.
import { spawn, spawnSync } from 'node:child_process';
import { once } from 'node:events';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { freePort } from '@scripts/lib/cluster';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import pg from 'pg';
import { buildServer, serverCommand, waitForServer } from '@scripts/lib/server-build';
import { canonicalCsvHeader, generateDemoResults, toCanonicalCsv } from '@api/db/seed/scenario';

const root = resolve(import.meta.dirname, '..', '..');
const ROWS = 100_000;
const ROUNDS = 5;

/**
 * A file shaped like the plant's own: the demo scenario's products, characteristics, replicates and
 * sampling plans (about 17 readings a lot), from a window of years before the seeded history so every
 * lot is new. `round` picks the window, so each round's file is new bytes with new lots.
 */
function plantShapedCsv(round: number): string {
  const rows = generateDemoResults({ endDate: new Date(Date.UTC(2022 - 2 * round, 0, 1, 6)), months: 24 });
  if (rows.length < ROWS) throw new Error(`The scenario gave ${rows.length} rows, fewer than ${ROWS}`);
  return toCanonicalCsv(rows.slice(0, ROWS));
}

/** The hardest shape for the lots table: 50,000 lots of HV Level 25 with two flow readings each. */
function twoReadingsPerLotCsv(): string {
  const tag = Date.now().toString(36).toUpperCase();
  const lines = [canonicalCsvHeader.join(',')];
  const start = Date.UTC(2024, 0, 1, 6);
  for (let i = 0; i < ROWS / 2; i++) {
    const produced = new Date(start + i * 600_000).toISOString();
    const tested = new Date(start + i * 600_000 + 1_800_000).toISOString();
    for (let r = 1; r <= 2; r++) lines.push(`B${tag}-${i},HVL25,L1,${produced},HVL25-FLOW,${140 + ((i * 7 + r * 3) % 11)},early,${r},${tested},AT,`);
  }
  return `${lines.join('\n')}\n`;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const peakRssMb = (pid: number) => {
  const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  return m ? Number(m[1]) / 1024 : NaN;
};

export async function run() {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is not set: run through npm run bench');
  const dir = mkdtempSync(join(tmpdir(), 'prismline-ingest-'));
  const file = join(dir, 'bench.csv');

  // No SPC workers in this process: the run the upload requests is the nightly benchmark's business.
  const env = { ...process.env, PRISMLINE_MODE: 'demo', LOG_LEVEL: 'warn', JWT_SECRET: 'bench-secret-bench-secret-bench-secret-42', SPC_WORKER_CONCURRENCY: '0', PRISMLINE_SCHEDULER: '0' };
  // The server as npm start runs it: the bundle under plain Node, with its memory settings.
  await buildServer();
  const startServer = async () => {
    const port = await freePort();
    const { command, args } = serverCommand();
    const child = spawn(command, args, { cwd: root, env: { ...env, PORT: String(port) }, stdio: ['ignore', 'inherit', 'inherit'] });
    const base = `http://127.0.0.1:${port}`;
    await waitForServer(base, child);
    return { child, base };
  };
  // The first server seeds the demo plant and stops; the measured one starts on the seeded database, as a
  // plant's server does every morning, so its memory is the uploads' and not the seed's leftovers.
  const seeding = await startServer();
  seeding.child.kill('SIGTERM');
  await once(seeding.child, 'exit');
  const { child: server, base } = await startServer();
  try {
    const login = await fetch(`${base}/api/v1/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'technician@harrowvale.example', password: 'prismline-demo' }),
    }).then((r) => r.json());
    const rssBefore = peakRssMb(server.pid!);
    // Restart the peak-RSS count (Linux clear_refs 5) so the figure is the uploads', not the start's.
    writeFileSync(`/proc/${server.pid}/clear_refs`, '5');
    const client = new pg.Client({ connectionString: databaseUrl });
    await client.connect();
    // Each timing starts on a quiet server: the autovacuum that 100,000 new rows set off would otherwise
    // land on whichever of the two runs next.
    const quiet = async () => {
      for (let i = 0; i < 600; i++) {
        const { rows } = await client.query<{ n: number }>(`select count(*)::int as n from pg_stat_activity where backend_type = 'autovacuum worker'`);
        if (rows[0].n === 0) return;
        await new Promise((r) => setTimeout(r, 100));
      }
    };
    /** Rounds of each shape, medians reported: one machine, other work on it, single runs are noisy. */
    const measure = async (makeCsv: (round: number) => string) => {
      const uploads: number[] = [];
      const copies: number[] = [];
      let lots = 0;
      for (let round = 0; round < ROUNDS; round++) {
        const csv = makeCsv(round);
        lots = new Set(csv.split('\n').slice(1, -1).map((line) => line.slice(0, line.indexOf(',')))).size;
        writeFileSync(file, csv);
        await quiet();
        const t0 = performance.now();
        // Sent by curl, a C client that streams the file from disk as psql streams its file to \copy.
        // (Node's own fetch spent 100–200 ms of its process's time on the 10 MB body, fresh memory on this
        // machine costing ~12 µs a page, while the server waited; "Expect:" drops curl's extra round trip.)
        const sent = spawnSync('curl', ['-sS', '-H', `authorization: Bearer ${login.token}`, '-H', 'Expect:', '-F', `file=@${file};type=text/csv;filename=bench.csv`, '-w', '\n%{http_code}', `${base}/api/v1/uploads`], {
          encoding: 'utf8',
        });
        uploads.push(performance.now() - t0);
        if (sent.status !== 0) throw new Error(`curl failed: ${sent.stderr}`);
        const status = Number(sent.stdout.slice(sent.stdout.lastIndexOf('\n') + 1));
        const answer = sent.stdout.slice(0, sent.stdout.lastIndexOf('\n'));
        if (status !== 201 || JSON.parse(answer).rowsImported !== ROWS) throw new Error(`Upload failed: ${status} ${answer.slice(0, 300)}`);

        await client.query(`drop table if exists bench_copy; create table bench_copy (lot text, product text, line text, produced_at timestamptz,
          characteristic text, value float8, shift text, replicate int, tested_at timestamptz, operator text, note text)`);
        await quiet();
        const t1 = performance.now();
        const copy = spawnSync('psql', [databaseUrl, '-v', 'ON_ERROR_STOP=1', '-c', `\\copy bench_copy from '${file}' csv header`], { encoding: 'utf8' });
        copies.push(performance.now() - t1);
        if (copy.status !== 0) throw new Error(`psql \\copy failed: ${copy.stderr}`);
      }
      return { uploadMs: median(uploads), copyMs: median(copies), lots };
    };
    const plantShaped = await measure(plantShapedCsv);
    const twoPerLot = await measure(twoReadingsPerLotCsv);
    await client.query('drop table if exists bench_copy');
    await client.end();
    const rssPeak = peakRssMb(server.pid!);

    return [
      {
        name: 'ingest: 100,000-row upload vs psql \\copy (plant-shaped file)',
        ratio: plantShaped.uploadMs / plantShaped.copyMs,
        target: '≤ 3',
        detail: `${plantShaped.lots.toLocaleString('en')} lots (${(ROWS / plantShaped.lots).toFixed(0)} readings a lot); median of ${ROUNDS}: upload ${plantShaped.uploadMs.toFixed(0)} ms, \\copy ${plantShaped.copyMs.toFixed(0)} ms`,
      },
      {
        name: 'ingest: 100,000-row upload vs psql \\copy (2 readings a lot)',
        ratio: twoPerLot.uploadMs / twoPerLot.copyMs,
        target: 'reported',
        detail: `${twoPerLot.lots.toLocaleString('en')} lots; median of ${ROUNDS}: upload ${twoPerLot.uploadMs.toFixed(0)} ms, \\copy ${twoPerLot.copyMs.toFixed(0)} ms`,
      },
      {
        name: 'ingest: server peak memory (MB)',
        ratio: rssPeak / 300,
        target: '≤ 1 (300 MB)',
        detail: `peak RSS during the ${2 * ROUNDS} uploads ${rssPeak.toFixed(0)} MB (peak while starting, before them: ${rssBefore.toFixed(0)} MB)`,
      },
    ];
  } finally {
    server.kill('SIGTERM');
  }
}
