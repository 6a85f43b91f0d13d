// npm test: a throw-away PostgreSQL cluster and database, the demo seed, a real server, then every test.
// Ends with one line "N passed, N failed".
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { dataRoot } from '@api/paths';
import { buildServer, serverCommand, waitForServer } from './lib/server-build';
import { destroyCluster, ensureDatabase, freePort, initCluster, startCluster, type Cluster } from './lib/cluster';
import { buildWebIfStale } from './lib/web-build';

const root = resolve(import.meta.dirname, '..');
// Each run gets its own cluster folder and port, so runs started side by side never meet.
const testClusters = resolve(dataRoot, 'test-postgres');
const cluster: Cluster = { root: resolve(testClusters, String(process.pid)), port: 0 };
const resultsFile = resolve(cluster.root, 'test-results.json');
const JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-signing';

let server: ChildProcess | undefined;
function cleanUp() {
  // The server runs in its own process group so that tsx's child goes down with it.
  if (server?.pid && server.exitCode === null) {
    try {
      process.kill(-server.pid, 'SIGTERM');
    } catch {
      // already gone
    }
  }
  destroyCluster(cluster);
}

/** Removes clusters left by runs that were killed. */
function removeStaleClusters() {
  if (!existsSync(testClusters)) return;
  for (const pid of readdirSync(testClusters)) {
    let alive = false;
    try {
      process.kill(Number(pid), 0);
      alive = true;
    } catch {
      // no such process
    }
    if (!alive) destroyCluster({ root: resolve(testClusters, pid), port: 0 });
  }
}

async function main(): Promise<number> {
  removeStaleClusters();
  cluster.port = Number(process.env.PRISMLINE_TEST_PG_PORT ?? (await freePort()));
  initCluster(cluster);
  startCluster(cluster);
  const databaseUrl = await ensureDatabase(cluster, 'prismline_test');
  buildWebIfStale();

  const port = await freePort();
  const baseUrl = `http://127.0.0.1:${port}`;
  const env = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    PRISMLINE_MODE: 'demo',
    JWT_SECRET,
    LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn',
    PRISMLINE_BASE_URL: baseUrl,
    PRISMLINE_TEST_PG_ROOT: cluster.root,
    PRISMLINE_TEST_PG_PORT: String(cluster.port),
    // SPC runs and e-mail: the local fake SMTP server, quick retries, no nightly schedule firing mid-suite.
    SMTP_URL: '',
    MAIL_POLL_MS: '250',
    SPC_JOB_RETRY_LIMIT: '1',
    SPC_JOB_RETRY_DELAY_SECONDS: '1',
    PRISMLINE_SCHEDULER: '0',
  };
  mkdirSync(resolve(root, 'test-artifacts'), { recursive: true });
  // The suite runs against the server as npm start runs it: the bundle, under plain Node.
  await buildServer();
  const { command, args } = serverCommand();
  server = spawn(command, args, {
    cwd: root,
    env: { ...env, PORT: String(port) },
    stdio: ['ignore', 'inherit', 'inherit'],
    detached: true,
  });
  await waitForServer(baseUrl, server);

  const vitest = spawnSync(
    'npx',
    ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${resultsFile}`, ...process.argv.slice(2)],
    { cwd: root, env, stdio: 'inherit' },
  );

  let passed = 0;
  let failed = 0;
  if (existsSync(resultsFile)) {
    const r = JSON.parse(readFileSync(resultsFile, 'utf8'));
    passed = r.numPassedTests ?? 0;
    // A file that fails to load has no tests of its own but is a failure all the same.
    const brokenFiles = (r.testResults ?? []).filter((f: { status: string; assertionResults: unknown[] }) => f.status === 'failed' && f.assertionResults.length === 0).length;
    failed = (r.numFailedTests ?? 0) + brokenFiles;
  } else {
    failed = 1;
  }
  if (vitest.status !== 0 && failed === 0) failed = 1;
  console.log(`\n${passed} passed, ${failed} failed`);
  return failed === 0 && passed > 0 ? 0 : 1;
}

process.on('SIGINT', () => {
  cleanUp();
  process.exit(130);
});
main()
  .then((code) => {
    cleanUp();
    process.exit(code);
  })
  .catch((err) => {
    console.error(`\nThe test set-up failed: ${err.message}`);
    cleanUp();
    console.log('\n0 passed, 1 failed');
    process.exit(1);
  });
