// npm start: PostgreSQL on loopback in .data/postgres, migrations, the demo plant, the web app and the API.
// The API runs as its own Node process from a bundle (scripts/lib/server-build.ts); this process
// keeps the database running while it does and stops both on Ctrl-C. It prints a progress line a
// step (the server sends its own steps over the message channel) and the address; the server's log
// goes to .data/logs/server.log, and the terminal shows only what goes wrong unless LOG_LEVEL asks for more.
// PRISMLINE_PG_ROOT puts the cluster in another folder (the start-up test runs it on a private one).
import { spawn } from 'node:child_process';
import { relative, resolve } from 'node:path';
import { loadConfig } from '@api/config';
import { dataRoot, projectRoot } from '@api/paths';
import type { StartupStep } from '@api/server';
import { ensureDatabase, initCluster, isInitialised, startCluster, stopCluster, type Cluster } from './lib/cluster';
import { stepLine } from './lib/progress';
import { buildServer, serverBundle, serverCommand, waitForServer } from './lib/server-build';
import { buildWebIfStale } from './lib/web-build';

const cluster: Cluster = {
  root: resolve(process.env.PRISMLINE_PG_ROOT ?? resolve(dataRoot, 'postgres')),
  port: Number(process.env.PRISMLINE_PG_PORT ?? 54329),
};
const shown = (path: string) => relative(projectRoot, path) || '.';
const step = (name: string, detail: string, state: StartupStep['state'] = 'done') => console.log(stepLine(name, detail, state));

async function main() {
  const created = !isInitialised(cluster);
  if (created) {
    step('database', `creating a PostgreSQL cluster in ${shown(cluster.root)}`, 'busy');
    initCluster(cluster);
  }
  startCluster(cluster);
  const databaseUrl = process.env.DATABASE_URL ?? (await ensureDatabase(cluster, 'prismline'));
  step('database', `PostgreSQL on 127.0.0.1:${cluster.port}, cluster in ${shown(cluster.root)}${created ? ' (created now)' : ''}; ${process.env.DATABASE_URL ? 'DATABASE_URL from the environment' : 'database prismline'}`);

  const web = buildWebIfStale(() => step('web app', 'building web/dist (vite)', 'busy'));
  step('web app', { built: 'web/dist built', 'up to date': 'web/dist is up to date', kept: 'web/dist kept as it is (PRISMLINE_SKIP_WEB_BUILD=1)' }[web]);
  await buildServer();
  step('server', `bundled into ${shown(serverBundle)}`);

  process.env.DATABASE_URL = databaseUrl;
  process.env.PRISMLINE_MODE ??= 'demo';
  // The demo plant's first SPC run starts at once, so the alarms are there before the first night.
  if (process.env.PRISMLINE_MODE === 'demo') process.env.PRISMLINE_INITIAL_RUN ??= '1';
  // The server's log, one line a request among it, goes to a file; the terminal keeps what goes wrong.
  process.env.PRISMLINE_LOG_FILE ??= resolve(dataRoot, 'logs', 'server.log');
  const terminalLevel = process.env.LOG_LEVEL;
  process.env.LOG_LEVEL ??= 'warn';
  const config = loadConfig();
  const url = `http://${config.host}:${config.port}`;

  const { command, args } = serverCommand();
  const server = spawn(command, args, { env: process.env, stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  server.on('message', (m: { startup?: StartupStep }) => {
    if (m.startup) step(m.startup.step, m.startup.detail, m.startup.state);
  });
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
    const log = shown(process.env.PRISMLINE_LOG_FILE);
    step('log', terminalLevel ? `${log}, and here from LOG_LEVEL=${terminalLevel} up` : `${log} (one line a request); LOG_LEVEL=info npm start shows it here too`);
    console.log(`\nPrismline: open ${url} (demo users are listed in README.md). Ctrl-C stops it.\n`);
  } catch (err) {
    // A server that stopped is reported by its exit handler.
    if (!exited) console.error(`\n${(err as Error).message}; its messages are above and in ${shown(process.env.PRISMLINE_LOG_FILE)}.`);
  }
}

main().catch((err) => {
  console.error(`\nPrismline could not start: ${err.message}`);
  stopCluster(cluster);
  process.exit(1);
});
