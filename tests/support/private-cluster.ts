// A private throw-away PostgreSQL cluster for tests that stop the database or start their own
// workers (so that the test server's workers cannot take their jobs), and for the benchmark.
import { existsSync, mkdirSync, readdirSync } from 'node:fs';
import { resolve } from 'node:path';
import { dataRoot } from '@api/paths';
import { destroyCluster, ensureDatabase, freePort, initCluster, startCluster, stopCluster, type Cluster } from '@scripts/lib/cluster';
import { createDatabase, type Database } from '@api/db/client';
import { migrateDatabase } from '@api/db/migrate';

export interface PrivateCluster {
  cluster: Cluster;
  databaseUrl: string;
  db: Database;
  restart(): void;
  stop(): void;
  start(): void;
  destroy(): Promise<void>;
}

let counter = 0;
const clusters = resolve(dataRoot, 'private-postgres');

/** Stops and removes clusters left by test processes that were killed (the folder starts with their pid). */
function removeStale(): void {
  if (!existsSync(clusters)) return;
  for (const dir of readdirSync(clusters)) {
    const pid = Number(dir.split('-')[0]);
    let alive = false;
    try {
      process.kill(pid, 0);
      alive = true;
    } catch {
      // no such process
    }
    if (!alive) destroyCluster({ root: resolve(clusters, dir), port: 0 });
  }
}

export async function startPrivateCluster(name: string): Promise<PrivateCluster> {
  removeStale();
  const root = resolve(clusters, `${process.pid}-${++counter}-${name}`);
  mkdirSync(clusters, { recursive: true });
  const cluster: Cluster = { root, port: await freePort() };
  destroyCluster(cluster);
  initCluster(cluster);
  startCluster(cluster);
  const databaseUrl = await ensureDatabase(cluster, 'prismline_private');
  const db = createDatabase(databaseUrl, 6);
  await migrateDatabase(db.$client);
  return {
    cluster,
    databaseUrl,
    db,
    stop: () => stopCluster(cluster),
    start: () => startCluster(cluster),
    restart() {
      stopCluster(cluster);
      startCluster(cluster);
    },
    async destroy() {
      await db.$client.end().catch(() => undefined);
      destroyCluster(cluster);
    },
  };
}
