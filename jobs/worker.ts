// npm run worker: an extra worker process of the SPC queue, on this machine or another one that
// shares the database. Sends e-mail from the outbox too when SMTP_URL names a relay.
//
// Settings (environment; the server reads the same ones for the workers it runs itself):
//   DATABASE_URL                  the shared PostgreSQL database
//   SPC_WORKER_CONCURRENCY        job loops in this process (default 2; 0 in the server: no workers)
//   SPC_POLL_MS                   pause when the queue is empty (default 500)
//   SPC_SWEEP_MS                  how often items of jobs that died on their last attempt are failed (default 10000)
//   SPC_JOB_RETRY_LIMIT, SPC_JOB_RETRY_DELAY_SECONDS   retries of a failed job, with doubling pauses (3, 5)
//   SPC_JOB_EXPIRE_SECONDS        a job still active after this long (its worker died) is retried (600)
//   PGBOSS_MAINTENANCE_SECONDS    how often expired jobs are looked for (30)
//   SMTP_URL, MAIL_FROM, MAIL_POLL_MS, PUBLIC_URL      e-mail (api/mail/settings.ts)
//   SPC_TEST_PAUSE_MS             reliability tests only: a pause inside each job's transaction
import { createDatabase } from '@api/db/client';
import { migrateDatabase } from '@api/db/migrate';
import { logger } from '@api/logger';
import { mailSettings } from '@api/mail/settings';
import { createTransport, startMailSender, type MailSender } from '@api/mail/outbox';
import { startBoss, workerName } from '@api/spc/queue';
import { startSpcWorkers, workerSettings } from './spc-worker';

async function main() {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error('DATABASE_URL is required');
  const db = createDatabase(databaseUrl, 6);
  await migrateDatabase(db.$client);
  const boss = await startBoss({ connectionString: databaseUrl, supervise: true });
  const settings = workerSettings();
  const mail = mailSettings();
  const workers = startSpcWorkers(boss, db, { ...settings, worker: workerName(), publicUrl: mail.publicUrl });
  let sender: MailSender | null = null;
  if (mail.smtpUrl) sender = startMailSender(db, createTransport(mail.smtpUrl), { from: mail.from, pollMs: mail.pollMs });
  logger.info({ worker: workerName(), concurrency: settings.concurrency, mail: Boolean(sender) }, 'SPC worker ready');

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'SPC worker stopping');
    await workers.stop();
    await sender?.stop();
    await boss.stop({ graceful: true, timeout: 10_000 }).catch(() => undefined);
    await db.$client.end();
    process.exit(0);
  };
  process.once('SIGINT', () => void stop('SIGINT'));
  process.once('SIGTERM', () => void stop('SIGTERM'));
}

if (import.meta.filename === process.argv[1]) {
  main().catch((err) => {
    logger.fatal(err.message);
    process.exit(1);
  });
}
