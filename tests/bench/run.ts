// npm run bench: a throw-away PostgreSQL cluster, then every tests/bench/*.bench.ts in turn; each
// exports run(): Promise<BenchRow[]> whose ratios compare with a baseline measured in the same run.
// Arguments filter the files by name: `npm run bench -- nightly spc`.
import { readdirSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { dataRoot } from '@api/paths';
import { destroyCluster, ensureDatabase, freePort, initCluster, startCluster, type Cluster } from '@scripts/lib/cluster';
import { runCommand } from '@scripts/lib/command';

interface BenchRow {
  name: string;
  ratio: number;
  target: string;
  detail: string;
}

const here = import.meta.dirname;
const cluster: Cluster = { root: resolve(dataRoot, 'bench-postgres', String(process.pid)), port: 0 };

function table(rows: (BenchRow & { file: string })[]): string {
  const head = ['benchmark', 'ratio', 'target', 'detail'];
  const body = rows.map((r) => [r.name, Number.isFinite(r.ratio) ? r.ratio.toFixed(2) : 'n/a', r.target, r.detail]);
  const widths = head.map((h, i) => Math.max(h.length, ...body.map((b) => b[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' │ ');
  return [line(head), widths.map((w) => '─'.repeat(w)).join('─┼─'), ...body.map(line)].join('\n');
}

async function main(): Promise<number> {
  const filters = process.argv.slice(2);
  const files = readdirSync(here)
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => filters.length === 0 || filters.some((x) => f.includes(x)))
    .sort();
  cluster.port = await freePort();
  destroyCluster(cluster);
  initCluster(cluster);
  startCluster(cluster);
  process.env.DATABASE_URL = await ensureDatabase(cluster, 'prismline_bench');
  const rows: (BenchRow & { file: string })[] = [];
  let failures = 0;
  for (const file of files) {
    const started = performance.now();
    console.log(`▶ ${file}`);
    try {
      const mod = (await import(pathToFileURL(resolve(here, file)).href)) as { run: () => Promise<BenchRow[]> };
      for (const r of await mod.run()) rows.push({ ...r, file });
      console.log(`  done in ${((performance.now() - started) / 1000).toFixed(1)} s`);
    } catch (err) {
      failures++;
      console.error(`  ${file} failed: ${(err as Error).stack ?? err}`);
      rows.push({ file, name: `${file}: failed`, ratio: NaN, target: '', detail: (err as Error).message.split('\n')[0] });
    }
  }
  console.log(`\n${table(rows)}\n`);
  return failures ? 1 : 0;
}

runCommand(main, {
  cleanUp: () => destroyCluster(cluster),
  onError: (err) => console.error(err),
});
