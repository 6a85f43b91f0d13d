// The API server as one JavaScript file: our TypeScript bundled by esbuild, packages left to
// node_modules. Plain Node runs it, with no TypeScript loader in the server process (the loader's
// own thread and compiler cost about 45 MB of memory and a slower start).
import type { ChildProcess } from 'node:child_process';
import { renameSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { build } from 'esbuild';
import { dataRoot } from '@api/paths';

const root = resolve(import.meta.dirname, '..', '..');
export const serverBundle = join(dataRoot, 'build', 'server.mjs');

/**
 * Node options of the server process. The old generation grows by half at a time instead of V8's
 * default of up to four times, so the garbage of one large upload is collected before the next one
 * piles on it: peak memory over several 100,000-row uploads drops by about a third for a few more
 * milliseconds of collection (npm run bench -- ingest).
 */
export const serverNodeOptions = ['--heap-growing-percent=50'];

/** Bundles api/server.ts; written under another name and renamed, so a server already running is never handed half a file. */
export async function buildServer(): Promise<string> {
  const partial = `${serverBundle}.${process.pid}.partial.mjs`;
  await build({
    entryPoints: [join(root, 'api', 'server.ts')],
    outfile: partial,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    packages: 'external',
    logLevel: 'warning',
  });
  renameSync(partial, serverBundle);
  return serverBundle;
}

/** The command that runs the bundled server. */
export function serverCommand(): { command: string; args: string[] } {
  return { command: process.execPath, args: [...serverNodeOptions, serverBundle] };
}

/** Waits until a started server answers /api/health; throws when it exits first or the time runs out. */
export async function waitForServer(url: string, server: ChildProcess, seconds = 120): Promise<void> {
  const deadline = Date.now() + seconds * 1000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null || server.signalCode !== null) throw new Error(`The server at ${url} stopped (${server.signalCode ?? `exit code ${server.exitCode}`})`);
    if (await fetch(`${url}/api/health`).then((r) => r.ok, () => false)) return;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`The server at ${url} did not answer /api/health within ${seconds} s`);
}
