// npm start: PostgreSQL on loopback in .data/postgres, migrations, the demo plant, the web app and the API.
// The API runs as its own Node process from a bundle (scripts/lib/server-build.ts); this process
// keeps the database running while it does and stops both on Ctrl-C.
import { spawn } from 'node:child_process';
import { resolve } from 'node:path';
import { loadConfig } from '@api/config';
import { dataRoot } from '@api/paths';
import { ensureDatabase, initCluster, isInitialised, startCluster, stopCluster, type Cluster } from './lib/cluster';
import { buildServer, serverCommand, waitForServer } from './lib/server-build';
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
  await buildServer();

  process.env.DATABASE_URL = databaseUrl;
  process.env.PRISMLINE_MODE ??= 'demo';
  // The demo plant's first SPC run starts at once, so the alarms are there before the first night.
  if (process.env.PRISMLINE_MODE === 'demo') process.env.PRISMLINE_INITIAL_RUN ??= '1';
  const config = loadConfig();
  const url = `http://${config.host}:${config.port}`;

  const { command, args } = serverCommand();
  const server = spawn(command, args, { env: process.env, stdio: ['ignore', 'inherit', 'inherit'] });
  let exited = false;
  let stopping = false;
  server.on('exit', (code, signal) => {
    exited = true;
    if (stopping) return;
    console.error(`\nThe Prismline server stopped (${signal ?? `exit code ${code}`}); stopping PostgreSQL.`);
    stopCluster(cluster);
    process.exit(code || 1);
  });

  const stop = () => {
    if (stopping) return;
    stopping = true;
    console.log('\nStopping Prismline and PostgreSQL…');
    const done = () => {
      stopCluster(cluster);
      process.exit(0);
    };
    if (exited) return done();
    server.once('exit', done);
    server.kill('SIGTERM');
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);

  // The first start seeds six months of the demo plant and runs its first SPC run: give it time.
  try {
    await waitForServer(url, server, 300);
    console.log(`\nPrismline: open ${url} (demo users are listed in README.md). Ctrl-C stops it.\n`);
  } catch (err) {
    // A server that stopped is reported by its exit handler.
    if (!exited) console.error(`\n${(err as Error).message}; its messages are above.`);
  }
}

main().catch((err) => {
  console.error(`\nPrismline could not start: ${err.message}`);
  stopCluster(cluster);
  process.exit(1);
});
