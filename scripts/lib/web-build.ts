import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..', '..');

function newestMtime(path: string): number {
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(path)) {
    if (entry === 'dist' || entry === 'node_modules') continue;
    newest = Math.max(newest, newestMtime(join(path, entry)));
  }
  return newest;
}

export type WebBuild = 'built' | 'up to date' | 'kept';

/**
 * Builds web/dist when it is missing or older than its sources; `onBuild` hears that a build begins.
 * Vite prints only what goes wrong (its log level is warn).
 */
export function buildWebIfStale(onBuild: () => void = () => console.log('Building the web app…')): WebBuild {
  // For API-only work: PRISMLINE_SKIP_WEB_BUILD=1 keeps whatever web/dist holds.
  if (process.env.PRISMLINE_SKIP_WEB_BUILD === '1') return 'kept';
  const index = join(root, 'web', 'dist', 'index.html');
  const sources = ['web', 'shared', 'vite.config.ts', 'package-lock.json'].map((p) => join(root, p)).filter(existsSync);
  if (existsSync(index) && statSync(index).mtimeMs >= Math.max(...sources.map(newestMtime))) return 'up to date';
  onBuild();
  const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) throw new Error('The web app did not build (see the messages above).');
  return 'built';
}
