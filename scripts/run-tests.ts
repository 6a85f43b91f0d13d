// npm test: lint and typecheck over the whole tree, a throw-away PostgreSQL cluster and database, the
// demo seed, a real server, then every test. Ends with one line "N passed, N failed", in which lint and
// typecheck count as one test each.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { dataRoot } from '@api/paths';
import { reportCheck, startCheck, type RunningCheck } from './lib/checks';
import { destroyCluster, ensureDatabase, freePort, initCluster, startCluster, type Cluster } from './lib/cluster';
import { runCommand } from './lib/command';
import { buildServer, serverCommand, waitForServer } from './lib/server-build';
import { buildWebIfStale } from './lib/web-build';

const root = resolve(import.meta.dirname, '..');
// Each run gets its own cluster folder and port, so runs started side by side never meet.
const testClusters = resolve(dataRoot, 'test-postgres');
const cluster: Cluster = { root: resolve(testClusters, String(process.pid)), port: 0 };
const resultsFile = resolve(cluster.root, 'test-results.json');
const JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-signing';

const vitestArgs = process.argv.slice(2);
// A run narrowed by arguments (`npm test -- api/routes/uploads`) answers for those tests alone; the
// whole-tree checks run in a full run, or when PRISMLINE_CHECKS=1 asks for them.
const runChecks = process.env.PRISMLINE_CHECKS ? process.env.PRISMLINE_CHECKS === '1' : vitestArgs.length === 0;
let checks: RunningCheck[] = [];

let server: ChildProcess | undefined;
function cleanUp() {
  for (const c of checks) c.stop();
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

/** vitest's counts from its JSON report; a file that fails to load is a failure though it has no tests. */
function vitestCounts(exitStatus: number | null): { passed: number; failed: number } {
  if (!existsSync(resultsFile)) return { passed: 0, failed: 1 };
  const r = JSON.parse(readFileSync(resultsFile, 'utf8')) as {
    numPassedTests?: number;
    numFailedTests?: number;
    testResults?: { status: string; assertionResults: unknown[] }[];
  };
  const brokenFiles = (r.testResults ?? []).filter((f) => f.status === 'failed' && f.assertionResults.length === 0).length;
  const passed = r.numPassedTests ?? 0;
  const failed = (r.numFailedTests ?? 0) + brokenFiles;
  return { passed, failed: exitStatus !== 0 && failed === 0 ? 1 : failed };
}

async function main(): Promise<number> {
  // Lint and typecheck need no database: they run while the cluster, the web app and the server are made.
  if (runChecks) checks = ['lint', 'typecheck'].map(startCheck);
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

  const checked = await Promise.all(checks.map((c) => c.result));
  if (checked.length) console.log(`\n${checked.map(reportCheck).join('\n')}\n`);
  else console.log('\nlint and typecheck skipped: a run narrowed by arguments (PRISMLINE_CHECKS=1 runs them)\n');

  const vitest = spawnSync(
    'npx',
    ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${resultsFile}`, ...vitestArgs],
    { cwd: root, env, stdio: 'inherit' },
  );
  const tests = vitestCounts(vitest.status);
  const passed = tests.passed + checked.filter((c) => c.ok).length;
  const failed = tests.failed + checked.filter((c) => !c.ok).length;
  console.log(`\n${passed} passed, ${failed} failed`);
  return failed === 0 && tests.passed > 0 ? 0 : 1;
}

runCommand(main, {
  cleanUp,
  onError(err) {
    console.error(`\nThe test set-up failed: ${err.message}`);
    console.log('\n0 passed, 1 failed');
  },
});
