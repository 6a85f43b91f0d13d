// The audit pack read back by independent tools: Info-ZIP's `unzip` tests and extracts the archive, GNU coreutils'
// `sha256sum -c` checks every file against SHA256SUMS, poppler's `pdfinfo`/`pdftotext` read the PDF and papaparse
// (an RFC 4180 reader) reads the CSV files.
import { execFile } from 'node:child_process';
import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import Papa from 'papaparse';
import request from 'supertest';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import type { Role } from '@shared/schemas/users';

const run = promisify(execFile);
const api = createTestApi();
const dirs: string[] = [];
afterAll(async () => {
  await Promise.all(dirs.map((d) => rm(d, { recursive: true, force: true })));
  await api.close();
});
const as = async (role: Role) => ({ Authorization: `Bearer ${await api.tokenFor(role)}` });

const binary = (res: request.Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
};

type DemoProduct = {
  id: number;
  code: string;
  characteristics: string[];
  time_zone: string;
  last_day: string;
};
let product: DemoProduct;

beforeAll(async () => {
  // The demo product with the most lots, and the plant day of its newest lot.
  [product] = (
    await api.db.execute<DemoProduct>(sql`
      select p.id, p.code, pl.time_zone,
             array(select c.code from characteristics c where c.product_id = p.id and c.active order by c.code) as characteristics,
             to_char(max(l.produced_at) at time zone pl.time_zone, 'YYYY-MM-DD') as last_day
      from products p join plants pl on pl.id = p.plant_id join lots l on l.product_id = p.id
      group by p.id, pl.time_zone order by count(l.*) desc limit 1`)
  ).rows;
});

async function downloadPack(query: string, role: Role = 'auditor'): Promise<{ dir: string; zip: string; res: request.Response }> {
  const res = await request(api.app).get(`/api/v1/reports/audit-pack.zip?${query}`).set(await as(role)).buffer(true).parse(binary);
  const dir = await mkdtemp(join(tmpdir(), 'audit-pack-'));
  dirs.push(dir);
  const zip = join(dir, 'pack.zip');
  await writeFile(zip, res.body as Buffer);
  return { dir, zip, res };
}

describe('GET /api/v1/reports/audit-pack.zip', () => {
  it('holds the product report, each characteristic, the NCRs and the audit trail, each matching SHA256SUMS', async () => {
    const from = new Date(Date.parse(`${product.last_day}T00:00:00Z`) - 60 * 86_400_000).toISOString().slice(0, 10);
    const eventsInPeriod = async () =>
      (
        await api.db.execute<{ n: number }>(sql`
          select count(*)::int as n from audit_events
          where at >= (${from}::date)::timestamp at time zone ${product.time_zone}
            and at < (${product.last_day}::date + 1)::timestamp at time zone ${product.time_zone}`)
      ).rows[0].n;
    const before = await eventsInPeriod();
    const { dir, zip, res } = await downloadPack(`product=${product.id}&from=${from}&to=${product.last_day}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/zip');
    expect(res.headers['content-disposition']).toContain(`audit-pack-${product.code}-${from}-${product.last_day}.zip`);

    // Info-ZIP tests every entry's CRC; then extract and let sha256sum check each file against the manifest.
    await run('unzip', ['-tq', zip]);
    const out = join(dir, 'x');
    await run('unzip', ['-q', zip, '-d', out]);
    const { stdout } = await run('sha256sum', ['-c', 'SHA256SUMS'], { cwd: out });
    const checked = stdout.trim().split('\n');
    expect(checked.every((line) => line.endsWith(': OK'))).toBe(true);
    const names = checked.map((line) => line.replace(/: OK$/, '')).sort();
    expect(names).toEqual(
      ['README.txt', `${product.code}-capability-report.pdf`, 'ncrs.csv', 'audit-trail.csv', ...product.characteristics.map((c) => `characteristics/${c}.csv`)].sort(),
    );
    expect((await readdir(join(out, 'characteristics'))).length).toBe(product.characteristics.length);

    const readme = await readFile(join(out, 'README.txt'), 'utf8');
    expect(readme).toContain(`Product:      ${product.code}`);
    expect(readme).toMatch(/Audit chain:\s+intact: \d+ events checked/);

    // The report is a real PDF about the product (poppler-utils reads it).
    const pdf = join(out, `${product.code}-capability-report.pdf`);
    const info = await run('pdfinfo', [pdf]);
    expect(Number(/Pages:\s+(\d+)/.exec(info.stdout)?.[1])).toBeGreaterThan(product.characteristics.length);
    expect((await run('pdftotext', ['-layout', pdf, '-'])).stdout).toContain(product.code);

    // Each CSV opens with the BOM and reads as RFC 4180; the audit trail holds only events of the period.
    const trail = await readFile(join(out, 'audit-trail.csv'), 'utf8');
    expect(trail.startsWith('\uFEFF')).toBe(true);
    const events = Papa.parse<Record<string, string>>(trail.slice(1), { header: true, skipEmptyLines: true }).data;
    // Tests running beside this one may add events to the period while the pack is made; none may be missing.
    expect(before).toBeGreaterThan(0);
    expect(events.length).toBeGreaterThanOrEqual(before);
    expect(events.length).toBeLessThanOrEqual(await eventsInPeriod());
    for (const e of events) {
      // ISO 8601 with the plant's offset: its first ten characters are the plant day.
      expect(e.at.slice(0, 10) >= from && e.at.slice(0, 10) <= product.last_day, e.at).toBe(true);
    }
    const ncrs = await readFile(join(out, 'ncrs.csv'), 'utf8');
    expect(ncrs.startsWith('\uFEFFncr,title,')).toBe(true);
  });

  it('makes a pack that says so for a period without results', async () => {
    const { zip, res, dir } = await downloadPack(`product=${product.id}&from=2001-01-01&to=2001-01-31`);
    expect(res.status).toBe(200);
    await run('unzip', ['-q', zip, '-d', join(dir, 'x')]);
    await run('sha256sum', ['-c', '--quiet', 'SHA256SUMS'], { cwd: join(dir, 'x') });
    const text = (await run('pdftotext', [join(dir, 'x', `${product.code}-capability-report.pdf`), '-'])).stdout;
    expect(text).toMatch(/no results/i);
  });

  it('answers a plain 400 for a bad period or product, and 404 for an unknown product', async () => {
    const cases: [string, RegExp][] = [
      ['from=2026-01-01&to=2026-02-01', /product/i],
      [`product=${product.id}&from=2026-03-01&to=2026-02-01`, /must not end before it starts/],
      [`product=${product.id}&from=2026-02-30&to=2026-03-01`, /YYYY-MM-DD/],
      [`product=${product.id}&from=2000-01-01&to=2026-01-01`, /at most/],
      [`product=99999999999&from=2026-01-01&to=2026-02-01`, /No such product/],
      [`product=1%00&from=2026-01-01&to=2026-02-01`, /number/],
    ];
    for (const [query, message] of cases) {
      const res = await request(api.app).get(`/api/v1/reports/audit-pack.zip?${query}`).set(await as('auditor'));
      expect(res.status, query).toBe(400);
      expect(res.body.error, query).toMatch(message);
    }
    const missing = await request(api.app).get('/api/v1/reports/audit-pack.zip?product=2147483647&from=2026-01-01&to=2026-02-01').set(await as('auditor'));
    expect(missing.status).toBe(404);
  });

  it('is the auditor\'s and the administrator\'s: the quality manager and the technician are refused', async () => {
    const query = `product=${product.id}&from=2001-01-01&to=2001-01-02`;
    for (const role of ['technician', 'quality_manager'] as const) {
      expect((await request(api.app).get(`/api/v1/reports/audit-pack.zip?${query}`).set(await as(role))).status).toBe(403);
    }
    expect((await downloadPack(query, 'admin')).res.status).toBe(200);
  });
});
