// Capability reports in a real browser against the real server started by scripts/run-tests.ts: an
// auditor picks a product and a period, reads the preview and takes the PDF, the CSV and the audit pack away. The PDF is
// read back with Debian's poppler-utils (pdftotext), the CSV with papaparse.
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import Papa from 'papaparse';
import { describe, expect } from 'vitest';
import { browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import type { CapabilityReportPreview } from '@shared/schemas/reports';

const it = browserTest({ viewport: { width: 1400, height: 1000 } });
const run = promisify(execFile);

describe('capability reports', () => {
  it('lets an auditor preview a product’s report for a period and download it as PDF and CSV, and the audit pack', async ({ page }) => {
    await signIn(page, 'auditor', '/reports');
    await pageHeading(page, 'Capability reports').waitFor();
    await screenshot(page, 'reports-empty');

    // A choice is needed before anything is computed.
    await page.getByRole('button', { name: 'Show the figures' }).click();
    await page.getByText('Choose a product', { exact: true }).waitFor();

    await page.getByLabel('Product').selectOption({ label: 'HVL25 · HV Level 25' });
    await page.getByLabel('From').fill('01/09/2026');
    await page.getByLabel('To').fill('30/11/2026');
    const answer = page.waitForResponse((r) => r.url().includes('/api/v1/reports/capability?') && r.status() === 200);
    await page.getByRole('button', { name: 'Show the figures' }).click();
    const preview = (await (await answer).json()) as CapabilityReportPreview;
    // The typed plant days are the period the API was asked for (dd/MM/yyyy, the demo plant's format).
    expect(preview.period).toMatchObject({ from: '2026-09-01', to: '2026-11-30' });
    const table = page.getByRole('table', { name: "The report's figures per characteristic" });
    await table.waitFor();
    expect(await table.getByRole('rowheader').count()).toBe(preview.characteristics.length);
    const first = preview.characteristics[0];
    const row = table.getByRole('row').filter({ has: page.getByRole('rowheader', { name: new RegExp(`^${first.code}`) }) });
    await expect.poll(() => row.textContent()).toContain(String(first.capability?.n ?? 0));
    await page.getByText(preview.inputHash).waitFor();
    // An auditor may take the audit pack of the same product and period.
    expect(await page.getByRole('link', { name: 'Download audit pack (ZIP)' }).getAttribute('href')).toBe(
      `/api/v1/reports/audit-pack.zip?product=${preview.product.id}&from=2026-09-01&to=2026-11-30`,
    );
    await screenshot(page, 'reports-preview');

    const pdfDownload = page.waitForEvent('download');
    await page.getByRole('link', { name: 'Download PDF' }).click();
    const pdf = await pdfDownload;
    expect(pdf.suggestedFilename()).toBe('capability-HVL25-2026-09-01-to-2026-11-30.pdf');
    const pdfPath = (await pdf.path())!;
    expect(readFileSync(pdfPath).subarray(0, 5).toString()).toBe('%PDF-');
    const { stdout: text } = await run('pdftotext', ['-layout', pdfPath, '-'], { maxBuffer: 64 * 1024 * 1024 });
    expect(text).toContain('HVL25');
    expect(text).toContain(preview.inputHash);

    const csvDownload = page.waitForEvent('download');
    await page.getByRole('link', { name: 'Download CSV' }).click();
    const csv = await csvDownload;
    expect(csv.suggestedFilename()).toBe('capability-HVL25-2026-09-01-to-2026-11-30.csv');
    const bytes = readFileSync((await csv.path())!);
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const rows = Papa.parse<string[]>(bytes.subarray(3).toString('utf8')).data;
    expect(rows.find((r) => r[0] === 'Input SHA-256')?.[1]).toBe(preview.inputHash);

    // The audit pack of the same product and period: Info-ZIP's unzip tests it and lists its files, and GNU
    // sha256sum checks every file against the pack's SHA256SUMS.
    const packDownload = page.waitForEvent('download');
    await page.getByRole('link', { name: 'Download audit pack (ZIP)' }).click();
    const pack = await packDownload;
    expect(pack.suggestedFilename()).toBe('audit-pack-HVL25-2026-09-01-2026-11-30.zip');
    const dir = mkdtempSync(join(tmpdir(), 'e2e-pack-'));
    try {
      await run('unzip', ['-q', (await pack.path())!, '-d', dir]);
      const { stdout: checked } = await run('sha256sum', ['-c', 'SHA256SUMS'], { cwd: dir });
      const names = checked.trim().split('\n').map((line) => line.replace(/: OK$/, ''));
      expect(names).toEqual(expect.arrayContaining(['README.txt', 'HVL25-capability-report.pdf', 'ncrs.csv', 'audit-trail.csv']));
      expect(names.filter((n) => n.startsWith('characteristics/'))).toHaveLength(preview.characteristics.length);
      // The pack's report is the one the page previewed: same input data, same hash.
      const { stdout: packText } = await run('pdftotext', ['-layout', join(dir, 'HVL25-capability-report.pdf'), '-'], { maxBuffer: 64 * 1024 * 1024 });
      expect(packText).toContain(preview.inputHash);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('refuses a period that ends before it starts under the field, and hides the audit pack from a quality manager', async ({ page }) => {
    await signIn(page, 'quality_manager', '/reports');
    await pageHeading(page, 'Capability reports').waitFor();
    await page.getByLabel('Product').selectOption({ label: 'HVL25 · HV Level 25' });
    await page.getByLabel('From').fill('30/11/2026');
    await page.getByLabel('To').fill('01/11/2026');
    await page.getByRole('button', { name: 'Show the figures' }).click();
    await page.getByText('The period must not end before it starts').waitFor();
    await page.getByLabel('To').fill('31/13/2026');
    await page.getByRole('button', { name: 'Show the figures' }).click();
    await page.getByText('Type the date as dd/mm/yyyy').waitFor();
    await page.getByLabel('To').fill('30/11/2026');
    await page.getByRole('button', { name: 'Show the figures' }).click();
    await page.getByRole('table', { name: "The report's figures per characteristic" }).waitFor();
    expect(await page.getByRole('link', { name: 'Download PDF' }).count()).toBe(1);
    expect(await page.getByRole('link', { name: 'Download audit pack (ZIP)' }).count()).toBe(0);
  });
});
