// What the server process runs beside the HTTP API: the queue and its workers, the nightly
// schedules, the outbox sender and — without SMTP_URL — the local fake SMTP server.
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { logger } from '@api/logger';
import { startFakeSmtp, type FakeSmtp } from '@api/mail/fake-smtp';
import { createTransport, startMailSender, type MailSender } from '@api/mail/outbox';
import { mailSettings } from '@api/mail/settings';
import { fixedQueue, startBoss, workerName, type SpcQueue } from '@api/spc/queue';
import { resultsChanged, type ResultsChanged } from '@api/spc/results-changed';
import { startRun } from '@api/spc/runs';
import { startScheduler, type Scheduler } from './scheduler';
import { startSpcWorkers, workerSettings, type SpcWorkers } from './spc-worker';

export interface Background {
  queue: SpcQueue;
  resultsChanged: ResultsChanged;
  fakeSmtp: FakeSmtp | null;
  mail: MailSender;
  stop(): Promise<void>;
}

const off = (v: string | undefined) => v === '0' || v === 'false';

export async function startBackground(db: Database, opts: { databaseUrl: string; publicUrl: string; env?: NodeJS.ProcessEnv }): Promise<Background> {
  const env = opts.env ?? process.env;
  const settings = mailSettings(env);
  const boss = await startBoss({ connectionString: opts.databaseUrl, supervise: true, env });
  const queue = fixedQueue(boss);

  const fakeSmtp = settings.smtpUrl ? null : await startFakeSmtp();
  if (fakeSmtp) logger.info({ url: fakeSmtp.url }, 'no SMTP_URL: e-mail goes to the local fake SMTP server (admin outbox page)');
  const mail = startMailSender(db, createTransport(settings.smtpUrl ?? fakeSmtp!.url), { from: settings.from, pollMs: settings.pollMs });

  const w = workerSettings(env);
  const workers: SpcWorkers | null = w.concurrency > 0 ? startSpcWorkers(boss, db, { ...w, worker: workerName(), publicUrl: opts.publicUrl }) : null;
  const scheduler: Scheduler | null = off(env.PRISMLINE_SCHEDULER) ? null : startScheduler(db, queue, { digestCron: settings.digestCron, publicUrl: opts.publicUrl });

  if (env.PRISMLINE_INITIAL_RUN === '1') {
    const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from spc_runs`)).rows;
    if (n === 0) {
      const id = await startRun(db, queue, { trigger: 'first' });
      logger.info({ runId: id }, 'first SPC run of the demo plant started');
    }
  }

  return {
    queue,
    resultsChanged: (change) => resultsChanged({ db, queue, publicUrl: opts.publicUrl }, change),
    fakeSmtp,
    mail,
    async stop() {
      scheduler?.stop();
      await workers?.stop();
      await mail.stop();
      await boss.stop({ graceful: true, timeout: 5000 }).catch(() => undefined);
      await fakeSmtp?.close();
    },
  };
}
