// The production build of the web app as npm start makes it (vite build, log level warn), into a
// folder of its own so that web/dist, which the test server serves, is left alone. NODE_ENV is set as
// outside the test runner (vitest sets it to test, which would build React's development code).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = resolve(import.meta.dirname, '..', '..');
const out = mkdtempSync(join(tmpdir(), 'prismline-web-'));
let output = '';
let status: number | null = null;

beforeAll(() => {
  const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn', '--outDir', out, '--emptyOutDir'], { cwd: root, encoding: 'utf8', env: { ...process.env, NODE_ENV: 'production' } });
  output = `${r.stdout}${r.stderr}`;
  status = r.status;
}, 120_000);
afterAll(() => rmSync(out, { recursive: true, force: true }));

describe('the web build', () => {
  it('prints nothing: no chunk-size warning', () => {
    expect(status).toBe(0);
    expect(output).not.toMatch(/larger than|\(!\)|warn/i);
    expect(output.trim()).toBe('');
  });

  it('puts echarts and zrender in chunks of their own, loaded with the chart page and not at the start of the app', () => {
    const assets = readdirSync(join(out, 'assets'));
    expect(assets.some((f) => /^echarts-.*\.js$/.test(f))).toBe(true);
    expect(assets.some((f) => /^zrender-.*\.js$/.test(f))).toBe(true);
    expect(readFileSync(join(out, 'index.html'), 'utf8')).not.toMatch(/echarts|zrender/);
  });
});
