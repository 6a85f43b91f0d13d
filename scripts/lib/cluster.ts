// A PostgreSQL cluster in a project folder, on loopback only. initdb and postgres refuse to run as
// root, so as root every server command runs as the `postgres` OS user.
import { execFileSync, spawnSync } from 'node:child_process';
import { chownSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { join } from 'node:path';
import pg from 'pg';

export interface Cluster {
  /** Folder holding the cluster's data directory and its log. */
  root: string;
  port: number;
}

const dataDir = (c: Cluster) => join(c.root, 'cluster');
const logFile = (c: Cluster) => join(c.root, 'server.log');
const isRoot = () => process.getuid?.() === 0;

function pgBin(name: string): string {
  const base = '/usr/lib/postgresql';
  if (existsSync(base)) {
    const versions = readdirSync(base).filter((v) => existsSync(join(base, v, 'bin', name))).sort((a, b) => Number(b) - Number(a));
    if (versions[0]) return join(base, versions[0], 'bin', name);
  }
  return name;
}

function run(name: string, args: string[], opts: { allowFail?: boolean } = {}): { ok: boolean; output: string } {
  const [cmd, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', pgBin(name), ...args]] : [pgBin(name), args];
  const r = spawnSync(cmd, argv, { encoding: 'utf8', cwd: '/tmp' });
  const output = `${r.stdout ?? ''}${r.stderr ?? ''}`;
  if (r.status !== 0 && !opts.allowFail) throw new Error(`${name} ${args.join(' ')} failed:\n${output}`);
  return { ok: r.status === 0, output };
}

/** A TCP port free on loopback now, for a server about to start. */
export function freePort(): Promise<number> {
  return new Promise((res, rej) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => res(port));
    });
    s.on('error', rej);
  });
}

export function isInitialised(c: Cluster): boolean {
  return existsSync(join(dataDir(c), 'PG_VERSION'));
}

export function initCluster(c: Cluster): void {
  mkdirSync(c.root, { recursive: true });
  if (isRoot()) {
    const uid = Number(execFileSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).trim());
    const gid = Number(execFileSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).trim());
    chownSync(c.root, uid, gid);
  }
  run('initdb', ['-D', dataDir(c), '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--locale=C', '--no-sync']);
}

export function isRunning(c: Cluster): boolean {
  return isInitialised(c) && run('pg_ctl', ['-D', dataDir(c), 'status'], { allowFail: true }).ok;
}

export function startCluster(c: Cluster): void {
  if (isRunning(c)) return;
  const options = `-p ${c.port} -k /tmp -c listen_addresses=127.0.0.1 -c max_connections=100 -c fsync=${process.env.PRISMLINE_PG_FSYNC ?? 'on'}`;
  const r = run('pg_ctl', ['-D', dataDir(c), '-o', options, '-l', logFile(c), '-w', '-t', '60', 'start'], { allowFail: true });
  if (!r.ok) {
    const log = spawnSync('tail', ['-n', '20', logFile(c)], { encoding: 'utf8' }).stdout;
    throw new Error(`PostgreSQL did not start on 127.0.0.1:${c.port}.\n${r.output}\n${log}`);
  }
}

export function stopCluster(c: Cluster): void {
  if (isRunning(c)) run('pg_ctl', ['-D', dataDir(c), '-m', 'fast', '-w', '-t', '60', 'stop'], { allowFail: true });
}

export function destroyCluster(c: Cluster): void {
  stopCluster(c);
  rmSync(c.root, { recursive: true, force: true });
}

export const adminUrl = (c: Cluster, database = 'postgres') => `postgres://postgres@127.0.0.1:${c.port}/${database}`;

/** Creates the database when it does not exist yet. */
export async function ensureDatabase(c: Cluster, name: string): Promise<string> {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`Unsafe database name: ${name}`);
  const client = new pg.Client({ connectionString: adminUrl(c) });
  await client.connect();
  try {
    const { rowCount } = await client.query('select 1 from pg_database where datname = $1', [name]);
    if (!rowCount) await client.query(`create database ${name}`);
  } finally {
    await client.end();
  }
  return adminUrl(c, name);
}
