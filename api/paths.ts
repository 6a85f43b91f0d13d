// Where the project's folders are, whether this code runs from its TypeScript source (tests, tools) or
// from the server bundle that npm start builds into .data/build.
import { existsSync } from 'node:fs';
import { dirname, resolve } from 'node:path';

function findProjectRoot(from: string): string {
  for (let dir = from; ; dir = dirname(dir)) {
    if (existsSync(resolve(dir, 'api', 'db', 'migrations'))) return dir;
    if (dirname(dir) === dir) throw new Error(`No Prismline project folder (with api/db/migrations) above ${from}`);
  }
}

export const projectRoot = findProjectRoot(import.meta.dirname);
/** Git-ignored runtime state: database clusters, the demo secret, the server bundle. */
export const dataRoot = resolve(projectRoot, '.data');
export const migrationsFolder = resolve(projectRoot, 'api', 'db', 'migrations');
export const webDist = resolve(projectRoot, 'web', 'dist');
