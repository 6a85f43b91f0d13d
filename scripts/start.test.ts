// npm start as a person sees it: scripts/start.sh run as a separate process on a private cluster and
// ports, its terminal output read line by line, stopped with SIGINT to its process group as Ctrl-C
// stops it. Then once more on the same data with LOG_LEVEL=info, which brings the request lines back.
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dataRoot } from '@api/paths';
import { destroyCluster, freePort, isRunning, type Cluster } from './lib/cluster';

const root = resolve(import.meta.dirname, '..');
const folder = resolve(dataRoot, 'private-postgres', `${process.pid}-start`);
const logFile = resolve(folder, 'server.log');
let cluster: Cluster;

interface Start {
  output(): string;
  url: string;
  /** Resolves with the exit code once the command has ended. */
  exited: Promise<number | null>;
  interrupt(): void;
}

/** Runs npm start's script with the user's environment minus what the test runner set for its own server. */
async function start(extra: Record<string, string> = {}): Promise<Start> {
  const port = await freePort();
  const env: NodeJS.ProcessEnv = {};
  for (const [k, v] of Object.entries(process.env)) {
    if (/^(DATABASE_URL|LOG_LEVEL|JWT_SECRET|SMTP_URL|MAIL_POLL_MS|PORT|HOST|PUBLIC_URL)$|^(PRISMLINE_|SPC_)/.test(k)) continue;
    env[k] = v;
  }
  Object.assign(env, {
    PORT: String(port),
    PRISMLINE_PG_PORT: String(cluster.port),
    PRISMLINE_PG_ROOT: cluster.root,
    PRISMLINE_LOG_FILE: logFile,
    // The web build's own output is checked in lib/web-build.test.ts; here web/dist stays as it is.
    PRISMLINE_SKIP_WEB_BUILD: '1',
    ...extra,
  });
  let output = '';
  const child = spawn('bash', ['scripts/start.sh'], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
  child.stdout!.on('data', (d) => (output += d));
  child.stderr!.on('data', (d) => (output += d));
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  const url = `http://127.0.0.1:${port}`;
  // Ready when the address is printed, or failed when the command ends first.
  await Promise.race([
    exited,
    (async () => {
      while (!output.includes('Prismline: open') && child.exitCode === null) await new Promise((r) => setTimeout(r, 200));
    })(),
  ]);
  return {
    output: () => output,
    url,
    exited,
    interrupt: () => {
      try {
        process.kill(-child.pid!, 'SIGINT');
      } catch {
        // already gone
      }
    },
  };
}

/** Waits until `check` holds, for output written by another process a moment later. */
async function eventually(check: () => boolean): Promise<boolean> {
  for (let i = 0; i < 100 && !check(); i++) await new Promise((r) => setTimeout(r, 100));
  return check();
}

const lines = (text: string) => text.split('\n').map((l) => l.trimEnd());

let first: Start;
let firstOutput = '';
let firstExit: number | null;
let firstRequestLogged = false;
let second: Start;
let secondOutput = '';
let secondExit: number | null;

beforeAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  cluster = { root: resolve(folder, 'postgres'), port: await freePort() };

  first = await start();
  // A request: its line goes to the log file, not to the terminal.
  expect((await fetch(`${first.url}/api/v1/overview`)).status).toBe(401);
  firstRequestLogged = await eventually(() => existsSync(logFile) && readFileSync(logFile, 'utf8').includes('"/api/v1/overview"'));
  first.interrupt();
  firstExit = await first.exited;
  firstOutput = first.output();

  second = await start({ LOG_LEVEL: 'info' });
  expect((await fetch(`${second.url}/api/v1/overview`)).status).toBe(401);
  await eventually(() => second.output().includes('"/api/v1/overview"'));
  second.interrupt();
  secondExit = await second.exited;
  secondOutput = second.output();
}, 240_000);

afterAll(() => {
  first?.interrupt();
  second?.interrupt();
  if (cluster) destroyCluster(cluster);
  rmSync(folder, { recursive: true, force: true });
});

describe('npm start', () => {
  it('prints a progress line for each step, in order, then the address', () => {
    const expected = [
      /^ {2}✓ packages {4}npm packages as in package-lock\.json; PostgreSQL \d+$/,
      /^ {2}… database {4}creating a PostgreSQL cluster in \.data\/private-postgres\/\d+-start\/postgres$/,
      /^ {2}✓ database {4}PostgreSQL on 127\.0\.0\.1:\d+, cluster in \.data\/private-postgres\/\d+-start\/postgres \(created now\); database prismline$/,
      /^ {2}✓ web app {5}web\/dist kept as it is \(PRISMLINE_SKIP_WEB_BUILD=1\)$/,
      /^ {2}✓ server {6}bundled into \.data\/build\/server\.mjs$/,
      /^ {2}✓ migrations {2}\d+ migrations applied \(\d+ in all\)$/,
      /^ {2}… demo data {3}seeding six months of the demo plant, with its first SPC run$/,
      /^ {2}✓ demo data {3}Harrow Vale Mortar Works \(seeded now\): 2 lines, 4 products, \d+ characteristics, [\d,]+ lots, [\d,]+ results, [\d,]+ alarms \(\d+ open\)$/,
      /^ {2}✓ first run {3}run \d+ over \d+ characteristics finished, [\d,]+ alarms raised$/,
      /^ {2}✓ e-mail {6}no SMTP_URL: messages go to a local fake SMTP server \(smtp:\/\/127\.0\.0\.1:\d+\) and the administrator's outbox page$/,
      /^ {2}✓ log {9}\.data\/private-postgres\/\d+-start\/server\.log \(one line a request\); LOG_LEVEL=info npm start shows it here too$/,
      new RegExp(`^Prismline: open ${first.url.replace(/\./g, '\\.')} \\(demo users are listed in README\\.md\\)\\. Ctrl-C stops it\\.$`),
      /^Stopping Prismline and PostgreSQL…$/,
    ];
    // Each expected line once, in this order.
    const printed = lines(firstOutput);
    let from = 0;
    for (const pattern of expected) {
      const at = printed.findIndex((l, i) => i >= from && pattern.test(l));
      expect(at, `${pattern} after line ${from} of:\n${firstOutput}`).toBeGreaterThanOrEqual(0);
      from = at + 1;
    }
    // Ctrl-C stops the server and the cluster, and the command ends cleanly.
    expect(firstExit).toBe(0);
    expect(isRunning(cluster)).toBe(false);
  });

  it('shows nothing alarming: no warnings, no deprecations, no log lines, nothing but the steps', () => {
    expect(firstOutput).not.toMatch(/warn|deprecat|error/i);
    expect(firstOutput).not.toContain('{"level"');
    const other = lines(firstOutput).filter((l) => l && !/^ {2}[✓…] /.test(l) && !/^Prismline: open /.test(l) && l !== 'Stopping Prismline and PostgreSQL…');
    expect(other).toEqual([]);
  });

  it('keeps the request lines in the log file, and LOG_LEVEL=info brings them back to the terminal', () => {
    expect(firstRequestLogged).toBe(true);
    const logged = readFileSync(logFile, 'utf8').split('\n').filter(Boolean).map((l) => JSON.parse(l) as { req?: { url: string }; res?: { statusCode: number } });
    expect(logged.filter((l) => l.req?.url === '/api/v1/overview')).toEqual(expect.arrayContaining([expect.objectContaining({ res: { statusCode: 401 } })]));
    expect(firstOutput).not.toContain('/api/v1/overview');

    expect(secondOutput).toMatch(/✓ demo data {3}Harrow Vale Mortar Works \(kept from an earlier start\): /);
    expect(secondOutput).toMatch(/✓ migrations {2}none pending \(\d+ migrations applied before\)/);
    expect(secondOutput).toMatch(/✓ log {9}\.data\/private-postgres\/\d+-start\/server\.log, and here from LOG_LEVEL=info up/);
    const requestLine = lines(secondOutput).find((l) => l.includes('"/api/v1/overview"'));
    expect(JSON.parse(requestLine!)).toMatchObject({ req: { method: 'GET', url: '/api/v1/overview' }, res: { statusCode: 401 }, msg: 'request completed' });
    expect(secondExit).toBe(0);
  });
});
