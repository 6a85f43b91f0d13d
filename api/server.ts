import type { Server } from 'node:http';
import { sql } from 'drizzle-orm';
import { formatFigure } from '@shared/figures';
import { loadConfig, type Config } from './config';
import { createDatabase, type Database } from './db/client';
import { migrateDatabase } from './db/migrate';
import { seedDemo } from './db/seed';
import { createApp } from './app';
import { logger } from './logger';
import { startBackground } from '@jobs/background';

export interface RunningServer {
  server: Server;
  db: Database;
  config: Config;
  url: string;
  close(): Promise<void>;
}

/** One step of the start-up: `busy` when a long one begins, `done` with what came of it. npm start prints them. */
export interface StartupStep {
  step: 'migrations' | 'demo data' | 'first run' | 'e-mail';
  state: 'busy' | 'done';
  detail: string;
}
export type ReportStep = (step: StartupStep) => void;

/** Without npm start to print them, the finished steps go to the log. */
const logStep: ReportStep = (s) => {
  if (s.state === 'done') logger.info({ step: s.step }, s.detail);
};

const count = (n: number, one: string, many = `${one}s`) => `${formatFigure(n, 0)} ${n === 1 ? one : many}`;

/** What the demo plant holds, in one line; `seeded` says whether it was seeded now. */
async function demoContents(db: Database, seeded: boolean): Promise<string> {
  const [c] = (
    await db.execute<{ plant: string; lines: number; products: number; characteristics: number; lots: number; results: number; alarms: number; open: number }>(sql`
      select (select name from plants order by id limit 1) as plant, (select count(*)::int from production_lines) as lines, (select count(*)::int from products) as products,
             (select count(*)::int from characteristics) as characteristics, (select count(*)::int from lots) as lots,
             (select count(*)::int from measurements where voided_at is null) as results,
             (select count(*)::int from alarms) as alarms, (select count(*)::int from alarms where status <> 'closed') as open`)
  ).rows;
  return `${c.plant} (${seeded ? 'seeded now' : 'kept from an earlier start'}): ${count(c.lines, 'line')}, ${count(c.products, 'product')}, ${count(c.characteristics, 'characteristic')}, ${count(c.lots, 'lot')}, ${count(c.results, 'result')}, ${count(c.alarms, 'alarm')} (${formatFigure(c.open, 0)} open)`;
}

/** The first SPC run: whether it has run, and what it found. */
async function firstRun(db: Database): Promise<string> {
  const [run] = (
    await db.execute<{ id: number; status: string; characteristics: number; raised: number }>(sql`
      select r.id, r.status, r.characteristics, (select count(*)::int from alarms a where a.run_id = r.id) as raised
      from spc_runs r order by r.id limit 1`)
  ).rows;
  if (!run) return 'none yet: the nightly run makes it (PRISMLINE_INITIAL_RUN=1 starts it at once)';
  const what = `run ${run.id} over ${count(run.characteristics, 'characteristic')}`;
  if (run.status === 'succeeded') return `${what} finished, ${count(run.raised, 'alarm')} raised`;
  if (run.status === 'failed') return `${what} failed; see the runs page`;
  return `${what} ${run.status === 'queued' ? 'queued' : 'running'} in the background`;
}

/** Migrates, seeds the demo plant in demo mode, and listens; `report` hears each step. */
export async function startServer(config: Config = loadConfig(), report: ReportStep = logStep): Promise<RunningServer> {
  const db = createDatabase(config.databaseUrl);
  const migrations = await migrateDatabase(db.$client);
  report({
    step: 'migrations',
    state: 'done',
    detail: migrations.applied ? `${count(migrations.applied, 'migration')} applied (${formatFigure(migrations.total, 0)} in all)` : `none pending (${count(migrations.total, 'migration')} applied before)`,
  });
  if (config.mode === 'demo') {
    const [{ empty }] = (await db.execute<{ empty: boolean }>(sql`select not exists (select 1 from plants) as empty`)).rows;
    if (empty) report({ step: 'demo data', state: 'busy', detail: 'seeding six months of the demo plant, with its first SPC run' });
    const seeded = await seedDemo(db, { publicUrl: config.publicUrl });
    report({ step: 'demo data', state: 'done', detail: await demoContents(db, seeded) });
  }
  const background = await startBackground(db, { databaseUrl: config.databaseUrl, publicUrl: config.publicUrl });
  report({ step: 'first run', state: 'done', detail: await firstRun(db) });
  report({
    step: 'e-mail',
    state: 'done',
    detail: background.fakeSmtp ? `no SMTP_URL: messages go to a local fake SMTP server (${background.fakeSmtp.url}) and the administrator's outbox page` : 'sent through SMTP_URL',
  });
  const app = createApp({ db, config, resultsChanged: background.resultsChanged, spcQueue: background.queue, fakeSmtp: background.fakeSmtp, publicUrl: config.publicUrl });
  const server = await new Promise<Server>((resolvePromise, reject) => {
    const s = app.listen(config.port, config.host, () => resolvePromise(s));
    s.on('error', reject);
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : config.port;
  const url = `http://${config.host}:${port}`;
  logger.info({ url, mode: config.mode }, 'Prismline is serving');
  return {
    server,
    db,
    config,
    url,
    async close() {
      await new Promise<void>((r) => server.close(() => r()));
      server.closeAllConnections();
      await background.stop();
      await db.$client.end();
    },
  };
}

if (import.meta.filename === process.argv[1]) {
  // Started by npm start (with a message channel), the steps go to it to be printed as progress lines.
  const send = process.send?.bind(process);
  const report: ReportStep = send ? (step) => void send({ startup: step }) : logStep;
  startServer(loadConfig(), report)
    .then((running) => {
      // The channel must not keep the server alive on its own.
      process.channel?.unref();
      let stopping = false;
      // Ctrl-C reaches this process and npm start's both; the one that follows is not a second stop.
      const stop = async (signal: string) => {
        if (stopping) return;
        stopping = true;
        logger.info({ signal }, 'stopping');
        await running.close();
        process.exit(0);
      };
      process.once('SIGINT', () => void stop('SIGINT'));
      process.once('SIGTERM', () => void stop('SIGTERM'));
    })
    .catch((err) => {
      logger.fatal(err.message);
      process.exit(1);
    });
}
