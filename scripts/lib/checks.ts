// The checks over the whole tree that npm test runs beside the tests: lint and typecheck, each
// through its npm script (package.json holds their options) and each counted as one test.
import { spawn, type ChildProcess } from 'node:child_process';
import { resolve } from 'node:path';

const root = resolve(import.meta.dirname, '..', '..');

export interface CheckResult {
  script: string;
  ok: boolean;
  /** What the check printed, errors included. */
  output: string;
  seconds: number;
}

export interface RunningCheck {
  result: Promise<CheckResult>;
  stop(): void;
}

/** Starts `npm run <script>` with its output kept for the report. */
export function startCheck(script: string): RunningCheck {
  const started = performance.now();
  let output = '';
  const child: ChildProcess = spawn('npm', ['run', '--silent', script], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
  child.stdout!.on('data', (d) => (output += d));
  child.stderr!.on('data', (d) => (output += d));
  const result = new Promise<CheckResult>((res) => {
    const end = (ok: boolean, extra = '') => res({ script, ok, output: output + extra, seconds: (performance.now() - started) / 1000 });
    child.once('error', (err) => end(false, `\n${err.message}`));
    child.once('close', (code, signal) => end(code === 0, signal ? `\nstopped by ${signal}` : ''));
  });
  return {
    result,
    stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
    },
  };
}

/** One line for a passed check; the check's own output under a heading for a failed one. */
export function reportCheck(r: CheckResult): string {
  const took = `${r.seconds.toFixed(0)} s`;
  if (r.ok) return `✓ npm run ${r.script} (${took})`;
  return `✗ npm run ${r.script} failed (${took}):\n${r.output.trimEnd()}\n`;
}
