import type { Server } from 'node:http';
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

/** Migrates, seeds the demo plant in demo mode, and listens. */
export async function startServer(config: Config = loadConfig()): Promise<RunningServer> {
  const db = createDatabase(config.databaseUrl);
  await migrateDatabase(db.$client);
  if (config.mode === 'demo') await seedDemo(db, { publicUrl: config.publicUrl });
  const background = await startBackground(db, { databaseUrl: config.databaseUrl, publicUrl: config.publicUrl });
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
  startServer()
    .then((running) => {
      const stop = async (signal: string) => {
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
