// npm start: PostgreSQL on loopback in .data/postgres, migrations, the demo plant, the web app and the API.
import { resolve } from 'node:path';
import { dataRoot } from '../api/config';
import { ensureDatabase, initCluster, isInitialised, startCluster, stopCluster, type Cluster } from './lib/cluster';
import { buildWebIfStale } from './lib/web-build';

const cluster: Cluster = { root: resolve(dataRoot, 'postgres'), port: Number(process.env.PRISMLINE_PG_PORT ?? 54329) };

async function main() {
  if (!isInitialised(cluster)) {
    console.log(`Creating a PostgreSQL cluster in ${cluster.root}…`);
    initCluster(cluster);
  }
  startCluster(cluster);
  console.log(`PostgreSQL is running on 127.0.0.1:${cluster.port}`);
  const databaseUrl = process.env.DATABASE_URL ?? (await ensureDatabase(cluster, 'prismline'));
  buildWebIfStale();

  process.env.DATABASE_URL = databaseUrl;
  process.env.PRISMLINE_MODE ??= 'demo';
  // The demo plant's first SPC run starts at once, so the alarms are there before the first night.
  if (process.env.PRISMLINE_MODE === 'demo') process.env.PRISMLINE_INITIAL_RUN ??= '1';
  const { startServer } = await import('../api/server');
  const running = await startServer();
  console.log(`\nPrismline: open ${running.url} (demo users are listed in README.md). Ctrl-C stops it.\n`);

  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    console.log('\nStopping Prismline and PostgreSQL…');
    await running.close().catch(() => undefined);
    stopCluster(cluster);
    process.exit(0);
  };
  process.on('SIGINT', () => void stop());
  process.on('SIGTERM', () => void stop());
}

main().catch((err) => {
  console.error(`\nPrismline could not start: ${err.message}`);
  stopCluster(cluster);
  process.exit(1);
});
