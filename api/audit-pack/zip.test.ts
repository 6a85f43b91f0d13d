// The checksummed ZIP read back by independent tools: Info-ZIP's `unzip -t` tests the archive, and GNU
// coreutils' `sha256sum -c` checks every file against SHA256SUMS.
import { execFile } from 'node:child_process';
import { createWriteStream } from 'node:fs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';
import { CHECKSUMS_NAME, writeZipWithChecksums } from './zip';

const run = promisify(execFile);
const dirs: string[] = [];
afterAll(() => Promise.all(dirs.map((d) => rm(d, { recursive: true, force: true }))));

describe('a ZIP with its checksums', () => {
  it('holds every part and a SHA256SUMS that sha256sum -c accepts', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'pack-'));
    dirs.push(dir);
    const zipPath = join(dir, 'pack.zip');
    const out = createWriteStream(zipPath);
    const big = 'x'.repeat(3_000_000);
    const files = await writeZipWithChecksums(
      [
        { name: 'a.txt', write: async (o) => void o.write('first file\n') },
        {
          name: 'folder/big.csv',
          write: async (o) => {
            for (let i = 0; i < 3; i++) if (!o.write(big)) await new Promise<void>((r) => o.once('drain', () => r()));
          },
        },
        { name: 'empty.txt', write: async () => undefined },
      ],
      out,
    );
    await new Promise<void>((r) => out.on('close', () => r()));
    expect(files.map((f) => f.name)).toEqual(['a.txt', 'folder/big.csv', 'empty.txt']);
    expect(files[1].bytes).toBe(9_000_000);
    const tested = await run('unzip', ['-t', zipPath]);
    expect(tested.stdout).toMatch(/No errors detected/);
    await run('unzip', ['-q', zipPath, '-d', join(dir, 'x')]);
    const sums = await readFile(join(dir, 'x', CHECKSUMS_NAME), 'utf8');
    expect(sums.trim().split('\n')).toHaveLength(3);
    const checked = await run('sha256sum', ['-c', CHECKSUMS_NAME], { cwd: join(dir, 'x') });
    expect(checked.stdout).toContain('folder/big.csv: OK');
    expect(checked.stdout.match(/: OK/g)).toHaveLength(3);
  });

  it('fails and aborts when a part fails', async () => {
    const chunks: Buffer[] = [];
    const { Writable } = await import('node:stream');
    const sink = new Writable({ write: (c: Buffer, _e, done) => (chunks.push(c), done()) });
    await expect(
      writeZipWithChecksums(
        [
          { name: 'ok.txt', write: async (o) => void o.write('fine') },
          { name: 'bad.txt', write: async () => Promise.reject(new Error('the database went away')) },
        ],
        sink,
      ),
    ).rejects.toThrow('the database went away');
  });
});
