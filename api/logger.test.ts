// Where the server's log goes: with PRISMLINE_LOG_FILE (npm start) everything from info up goes to
// the file and the terminal gets LOG_LEVEL and above; the file is moved aside past its cap.
import { once } from 'node:events';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, describe, expect, it } from 'vitest';
import { createLogger, openLogFile } from './logger';

const dir = mkdtempSync(join(tmpdir(), 'prismline-log-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function terminal() {
  const lines: string[] = [];
  const stream = new Writable({ write: (chunk, _enc, done) => (lines.push(String(chunk)), done()) });
  return { stream, lines };
}

describe('the server log', () => {
  it('keeps info lines in the file and off a terminal at warn, and shows them at LOG_LEVEL=info', async () => {
    const file = join(dir, 'a.log');
    const quiet = terminal();
    const log = createLogger({ LOG_LEVEL: 'warn', PRISMLINE_LOG_FILE: file }, quiet.stream);
    log.info({ req: { url: '/api/v1/overview' } }, 'request completed');
    log.warn('database unavailable');
    log.flush();
    await new Promise((r) => setTimeout(r, 100));
    expect(quiet.lines.join('')).not.toContain('request completed');
    expect(quiet.lines.join('')).toContain('database unavailable');
    const written = readFileSync(file, 'utf8');
    expect(written).toContain('request completed');
    expect(written).toContain('database unavailable');

    const loud = terminal();
    createLogger({ LOG_LEVEL: 'info', PRISMLINE_LOG_FILE: join(dir, 'b.log') }, loud.stream).info('request completed');
    await new Promise((r) => setTimeout(r, 100));
    expect(loud.lines.join('')).toContain('request completed');
  });

  it('moves the file aside once it passes its cap and goes on in a new one', async () => {
    const file = join(dir, 'c.log');
    writeFileSync(file, 'x'.repeat(2000));
    const log = openLogFile(file, 1000);
    await once(log.stream, 'ready');
    // Over the cap when opened: already moved aside.
    expect(statSync(`${file}.1`).size).toBe(2000);
    log.stream.write('y'.repeat(1500) + '\n');
    log.stream.flushSync();
    const reopened = once(log.stream, 'ready');
    expect(log.rotateIfFull()).toBe(true);
    await reopened;
    expect(statSync(`${file}.1`).size).toBe(1501);
    log.stream.write('after\n');
    log.stream.flushSync();
    expect(existsSync(file) && readFileSync(file, 'utf8')).toBe('after\n');
    expect(log.rotateIfFull()).toBe(false);
  });
});
