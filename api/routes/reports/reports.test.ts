// Capability reports against the seeded demo plant. The figures themselves are tested against published
// sources in shared/spc; here a report must say what the chart endpoint says for the same window (one
// computation). The PDF is read back with Debian's poppler-utils (pdftotext -layout, pdfinfo), the CSV
// with papaparse (an RFC 4180 reader outside the project).
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import Papa from 'papaparse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { createTestApi, demoEmail } from '@tests/support/api';
import { createTestCharacteristic, removeTestCharacteristics, testDay } from '@tests/support/plant';
import { characteristics, products, users } from '@api/db/schema';
import { csvFigure, formatFigure } from '@shared/figures';
import type { CharacteristicChart } from '@shared/schemas/charts';
import type { CapabilityReportPreview } from '@shared/schemas/reports';
import { plantDay } from '@shared/time';
import type { Role } from '@shared/schemas/users';

const run = promisify(execFile);
const api = createTestApi();
const dir = mkdtempSync(join(tmpdir(), 'prismline-reports-'));
afterAll(async () => {
  rmSync(dir, { recursive: true, force: true });
  await removeTestCharacteristics(api.db);
  await api.close();
});

const as = async (role: Role = 'auditor') => ({ authorization: `Bearer ${await api.tokenFor(role)}` });

/** A binary answer's bytes. */
async function download(path: string, role: Role = 'auditor') {
  const res = await request(api.app)
    .get(path)
    .set(await as(role))
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
  return { status: res.status, headers: res.headers, body: res.body as Buffer };
}

let fileNo = 0;
/** The PDF's text as poppler's pdftotext lays it out, and its page count from pdfinfo. */
async function readPdf(bytes: Buffer): Promise<{ file: string; text: string; pages: string[]; pageCount: number }> {
  const file = join(dir, `report-${++fileNo}.pdf`);
  writeFileSync(file, bytes);
  const { stdout: text } = await run('pdftotext', ['-layout', file, '-'], { maxBuffer: 64 * 1024 * 1024 });
  const { stdout: info } = await run('pdfinfo', [file]);
  return { file, text, pages: text.split('\f').filter((p) => p.trim()), pageCount: Number(/^Pages:\s+(\d+)/m.exec(info)?.[1]) };
}

/** The CSV parsed by papaparse, after checking and removing the UTF-8 byte-order mark. */
function readCsv(bytes: Buffer): string[][] {
  expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
  const parsed = Papa.parse<string[]>(bytes.subarray(3).toString('utf8'), { skipEmptyLines: false });
  expect(parsed.errors).toEqual([]);
  return parsed.data;
}

/** The value beside a label in the CSV's header block. */
const headerValue = (rows: string[][], label: string, nth = 0) => rows.filter((r) => r[0] === label)[nth]?.[1];

const zone = 'Europe/London';
const today = plantDay(new Date(), zone);
const daysBefore = (n: number) => plantDay(new Date(Date.now() - n * 86_400_000), zone);
const period = { from: daysBefore(120), to: today };

let product: { id: number; code: string };
let demoChars: { id: number; code: string }[];
let auditorName: string;
beforeAll(async () => {
  [{ name: auditorName }] = await api.db.select({ name: users.name }).from(users).where(eq(users.email, demoEmail.auditor));
  [product] = await api.db.select({ id: products.id, code: products.code }).from(products).where(eq(products.code, 'HVL25'));
  demoChars = await api.db
    .select({ id: characteristics.id, code: characteristics.code })
    .from(characteristics)
    .where(sql`${characteristics.productId} = ${product.id} and ${characteristics.active}`)
    .orderBy(sql`${characteristics.code} collate "C"`);
});

async function previewOf(query: string): Promise<CapabilityReportPreview> {
  const res = await request(api.app).get(`/api/v1/reports/capability?${query}`).set(await as());
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as CapabilityReportPreview;
}

async function chartOf(id: number, preview: CapabilityReportPreview): Promise<CharacteristicChart> {
  const q = `from=${encodeURIComponent(preview.period.fromInstant)}&to=${encodeURIComponent(preview.period.toInstant)}`;
  const res = await request(api.app).get(`/api/v1/characteristics/${id}/chart?${q}`).set(await as());
  expect(res.status).toBe(200);
  return res.body as CharacteristicChart;
}

describe('one characteristic', () => {
  let id: number;
  let query: string;
  let preview: CapabilityReportPreview;
  let chart: CharacteristicChart;
  beforeAll(async () => {
    id = demoChars[0].id;
    query = `characteristic=${id}&from=${period.from}&to=${period.to}`;
    preview = await previewOf(query);
    chart = await chartOf(id, preview);
  });

  it('previews the figures of the chart endpoint for the same window (one computation)', () => {
    expect(chart.points.length).toBeGreaterThan(25);
    const [c] = preview.characteristics;
    expect(c.code).toBe(demoChars[0].code);
    expect(c.capability).toEqual(chart.capability);
    expect(c.subgroups).toBe(chart.points.length);
    expect(c.spec).toEqual(chart.spec);
    expect(c.warnings).toEqual(chart.reasons);
    // The window's plant days in the plant's zone: its first instant is midnight in Europe/London.
    expect(plantDay(preview.period.fromInstant, zone)).toBe(period.from);
    expect(plantDay(preview.period.toInstant, zone)).toBe(period.to);
    expect(plantDay(new Date(Date.parse(preview.period.toInstant) + 1), zone)).not.toBe(period.to);
  });

  it('prints the chart endpoint’s Cpk, specification limits and n in the PDF, with page N of M and the input hash on every page (pdftotext, pdfinfo)', async () => {
    const res = await download(`/api/v1/reports/capability.pdf?${query}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toBe(`attachment; filename="capability-${demoChars[0].code}-${period.from}-to-${period.to}.pdf"`);
    expect(res.body.subarray(0, 5).toString()).toBe('%PDF-');
    const pdf = await readPdf(res.body);
    const cap = chart.capability!;
    const d = chart.characteristic.decimals;
    const flat = pdf.text.replace(/\s+/g, ' ');
    expect(flat).toMatch(new RegExp(`Cpk ${formatFigure(cap.cpk, 2).replace('.', '\\.')} `));
    expect(flat).toMatch(new RegExp(`Results \\(n\\) ${cap.n}\\b`));
    expect(flat).toContain(`Subgroups ${chart.points.length}`);
    if (chart.spec?.lsl !== null) expect(flat).toContain(`LSL ${formatFigure(chart.spec!.lsl, d)} ${chart.characteristic.unit}`);
    if (chart.spec?.usl !== null) expect(flat).toContain(`USL ${formatFigure(chart.spec!.usl, d)} ${chart.characteristic.unit}`);
    expect(flat).toContain(demoChars[0].code);
    // The frozen limits are named by the revision number the limit-revision history gives them, not by a row id.
    expect(chart.limits.source).toBe('frozen');
    const history = await request(api.app).get(`/api/v1/characteristics/${id}/limit-revisions`).set(await as());
    const inForce = (history.body.items as { id: number; revision: number }[]).find((r) => r.id === chart.limits.revisionId)!;
    expect(flat).toContain(`Control limits frozen, revision ${inForce.revision} by`);
    // poppler's pdffonts: the app's typefaces, every one embedded (no reader substitutes a font on another machine).
    const { stdout: fontList } = await run('pdffonts', [pdf.file]);
    const fontRows = fontList.split('\n').slice(2).filter((l) => l.trim());
    expect(fontRows.map((l) => l.split(/\s+/)[0].replace(/^[A-Z]{6}\+/, '')).sort()).toEqual(['Inter-Bold', 'Inter-Regular', 'RobotoMono-Regular']);
    for (const row of fontRows) expect(row).toMatch(/\byes\s+yes\s+yes\s+\d+\s+\d+$/);
    // pdfinfo's page count is the M of every footer, and page k says "Page k of M".
    expect(pdf.pageCount).toBeGreaterThanOrEqual(2);
    expect(pdf.pages).toHaveLength(pdf.pageCount);
    pdf.pages.forEach((page, k) => {
      expect(page).toContain(`Page ${k + 1} of ${pdf.pageCount}`);
      expect(/Input data SHA-256 ([0-9a-f]{64})/.exec(page)?.[1]).toBe(preview.inputHash);
      expect(page).toContain(`Generated by ${auditorName} on `);
    });
  });

  it('gives the same input hash to two generations of the same input, and a CSV that carries it', async () => {
    const first = await readPdf((await download(`/api/v1/reports/capability.pdf?${query}`)).body);
    const second = await readPdf((await download(`/api/v1/reports/capability.pdf?${query}`, 'quality_manager')).body);
    const hashOf = (t: string) => /Input data SHA-256 ([0-9a-f]{64})/.exec(t)?.[1];
    expect(hashOf(first.text)).toBe(preview.inputHash);
    expect(hashOf(second.text)).toBe(preview.inputHash);
    const csv = readCsv((await download(`/api/v1/reports/capability.csv?${query}`)).body);
    expect(headerValue(csv, 'Input SHA-256')).toBe(preview.inputHash);
  });

  it('writes a CSV with a BOM, one row per subgroup of the chart and header figures equal to the chart endpoint’s (papaparse)', async () => {
    const res = await download(`/api/v1/reports/capability.csv?${query}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="capability-.+\.csv"$/);
    // RFC 4180 lines end in CRLF.
    expect(res.body.toString('utf8')).toMatch(/\r\n/);
    expect(res.body.toString('utf8').replace(/\r\n/g, '')).not.toMatch(/\n/);
    const rows = readCsv(res.body);
    const cap = chart.capability!;
    const d = chart.characteristic.decimals;
    expect(headerValue(rows, 'Cpk')).toBe(csvFigure(cap.cpk, 3));
    expect(headerValue(rows, 'Ppk')).toBe(csvFigure(cap.ppk, 3));
    expect(headerValue(rows, 'Results (n)')).toBe(String(cap.n));
    expect(headerValue(rows, 'Subgroups')).toBe(String(chart.points.length));
    expect(headerValue(rows, 'LSL')).toBe(csvFigure(chart.spec?.lsl, d));
    expect(headerValue(rows, 'USL')).toBe(csvFigure(chart.spec?.usl, d));
    const head = rows.findIndex((r) => r[0] === 'lot');
    const body = rows.slice(head + 1).filter((r) => r.length > 1);
    expect(body).toHaveLength(chart.points.length);
    expect(body.map((r) => r[0])).toEqual(chart.points.map((p) => p.lotNumber));
    // Each row's values are the chart point's, to the characteristic's decimals.
    const p = chart.points[0];
    expect(body[0].slice(4, 4 + p.values.length)).toEqual(p.values.map((v) => csvFigure(v, d)));
  });
});

describe('a product', () => {
  it('has a summary then one section per characteristic, each with the chart endpoint’s Cpk (pdftotext, pdfinfo)', async () => {
    const query = `product=${product.id}&from=${period.from}&to=${period.to}`;
    const preview = await previewOf(query);
    expect(preview.characteristics.map((c) => c.code)).toEqual(demoChars.map((c) => c.code));
    const pdf = await readPdf((await download(`/api/v1/reports/capability.pdf?${query}`)).body);
    expect(pdf.pages[0]).toContain('Summary');
    expect(pdf.pageCount).toBeGreaterThan(demoChars.length);
    for (const c of preview.characteristics) {
      const chart = await chartOf(c.id, preview);
      expect(c.capability).toEqual(chart.capability);
      const section = pdf.pages.find((page) => page.includes(`${c.code} — `));
      expect(section, c.code).toBeDefined();
      if (chart.capability?.cpk !== null && chart.capability?.cpk !== undefined) expect(section!.replace(/\s+/g, ' ')).toContain(`Cpk ${formatFigure(chart.capability.cpk, 2)}`);
    }
    expect(/Input data SHA-256 ([0-9a-f]{64})/.exec(pdf.text)?.[1]).toBe(preview.inputHash);
    const csv = readCsv((await download(`/api/v1/reports/capability.csv?${query}`)).body);
    expect(headerValue(csv, 'Input SHA-256')).toBe(preview.inputHash);
    expect(csv.filter((r) => r[0] === 'Characteristic').map((r) => r[1])).toEqual(demoChars.map((c) => c.code));
  });

  it('takes only the characteristics asked for, and refuses one of another product', async () => {
    const two = demoChars.slice(0, 2).map((c) => c.id);
    const preview = await previewOf(`product=${product.id}&characteristics=${two.join(',')}&from=${period.from}&to=${period.to}`);
    expect(preview.characteristics.map((c) => c.id)).toEqual(two);
    const [other] = await api.db.select({ id: characteristics.id }).from(characteristics).where(sql`${characteristics.productId} <> ${product.id}`).limit(1);
    const res = await request(api.app).get(`/api/v1/reports/capability?product=${product.id}&characteristics=${other.id}&from=${period.from}&to=${period.to}`).set(await as());
    expect(res.status).toBe(400);
    expect(res.body.details[0].path).toBe('characteristics');
  });
});

describe('an empty period', () => {
  it('is a report that says there were no results, not an error', async () => {
    const query = `characteristic=${demoChars[0].id}&from=2020-01-01&to=2020-01-31`;
    const preview = await previewOf(query);
    expect(preview.characteristics[0].subgroups).toBe(0);
    expect(preview.characteristics[0].capability).toBeNull();
    const pdf = await download(`/api/v1/reports/capability.pdf?${query}`);
    expect(pdf.status).toBe(200);
    expect((await readPdf(pdf.body)).text).toContain('No results in this period');
    const csv = readCsv((await download(`/api/v1/reports/capability.csv?${query}`)).body);
    expect(csv.some((r) => r[0] === 'No results in this period')).toBe(true);
    expect(headerValue(csv, 'Subgroups')).toBe('0');
  });
});

describe('CSV injection', () => {
  // OWASP "CSV Injection": a cell starting with = + - @, tab or carriage return is run by a spreadsheet.
  it('neutralises lot texts and exclusion reasons that a spreadsheet would run as formulas (papaparse)', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 120, usl: 170, effectiveFrom: testDay(0) }] });
    for (let i = 0; i < 6; i++) await t.addLot(`L${i}`, testDay(i + 1), [145 + (i % 3), 146 - (i % 2)]);
    const lots = await api.db.execute<{ id: number; lot_number: string }>(sql`select id, lot_number from lots where product_id = ${t.productId} order by produced_at`);
    const query = `characteristic=${t.characteristicId}&from=2025-01-01&to=2025-01-31`;
    const before = (await previewOf(query)).inputHash;
    const reasons = ['=HYPERLINK("http://x.example")', '+1+2', '-3+4', '@SUM(A1:A2)'];
    for (const [i, reason] of reasons.entries()) {
      const res = await request(api.app).post(`/api/v1/characteristics/${t.characteristicId}/exclusions`).set(await as('quality_manager')).send({ lotId: lots.rows[i].id, reason });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
    }
    // A reason is trimmed at the edge, so a leading tab or carriage return is planted in the test characteristic's own name.
    await api.db.update(characteristics).set({ name: '\tcmd\r' }).where(eq(characteristics.id, t.characteristicId));
    // The exclusions are part of the input: the hash that lets two copies be compared changes with them.
    expect((await previewOf(query)).inputHash).not.toBe(before);
    const bytes = (await download(`/api/v1/reports/capability.csv?${query}`)).body;
    const rows = readCsv(bytes);
    const cells = rows.flat();
    for (const reason of reasons) {
      expect(cells).toContain(`'${reason}`);
      expect(cells).not.toContain(reason);
    }
    expect(cells).toContain("'\tcmd\r");
    // No cell of the file starts with a formula character unless it is a plain number.
    expect(cells.filter((c) => /^[=+\-@\t\r]/.test(c) && !/^[+-]?\d+(\.\d+)?$/.test(c))).toEqual([]);
  });
});

describe('refused requests', () => {
  const cases: [string, string, number][] = [
    ['neither a characteristic nor a product', 'from=2026-01-01&to=2026-02-01', 400],
    ['both a characteristic and a product', 'characteristic=1&product=1&from=2026-01-01&to=2026-02-01', 400],
    ['a list of characteristics without a product', 'characteristic=1&characteristics=1,2&from=2026-01-01&to=2026-02-01', 400],
    ['an id beyond int32', 'characteristic=2147483648&from=2026-01-01&to=2026-02-01', 400],
    ['an id that is no number', 'product=abc&from=2026-01-01&to=2026-02-01', 400],
    ['a NUL in a day', 'product=1&from=2026-01-01%00&to=2026-02-01', 400],
    ['a day that does not exist', 'product=1&from=2026-02-30&to=2026-03-01', 400],
    ['a missing period', 'product=1', 400],
    ['an end before the start', 'product=1&from=2026-02-01&to=2026-01-01', 400],
    ['more than five years', 'product=1&from=2019-01-01&to=2026-01-01', 400],
    ['a malformed list', 'product=1&characteristics=1,,x&from=2026-01-01&to=2026-02-01', 400],
    ['an unknown characteristic', 'characteristic=2147483647&from=2026-01-01&to=2026-02-01', 404],
    ['an unknown product', 'product=2147483647&from=2026-01-01&to=2026-02-01', 404],
  ];
  it.each(cases)('refuses %s with a plain message in the one error shape', async (_what, query, status) => {
    for (const path of ['capability', 'capability.pdf', 'capability.csv']) {
      const res = await request(api.app).get(`/api/v1/reports/${path}?${query}`).set(await as());
      expect(res.status, `${path}?${query}`).toBe(status);
      expect(res.headers['content-type']).toMatch(/^application\/json/);
      expect(typeof res.body.error).toBe('string');
      expect(res.body.error).not.toMatch(/zod|invalid_type|NaN/i);
    }
  });
});
