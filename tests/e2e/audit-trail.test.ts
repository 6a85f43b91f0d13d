// The auditor's audit trail in a real browser against the real server started by scripts/run-tests.ts:
// filter by kind of record and period, open an event's before and after, export the CSV, check the chain.
// Outside references: ECMA-402 Intl.DateTimeFormat (IANA zone data) writes the plant days typed into the
// period fields; the Unicode byte-order mark U+FEFF is EF BB BF in UTF-8; RFC 4180 ends CSV lines CRLF.
import { readFileSync } from 'node:fs';
import { describe, expect } from 'vitest';
import { baseUrl, browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import type { AuditEventPage } from '@shared/schemas/audit-events';

const it = browserTest({ timeout: 20_000 });

/** A day on the demo plant's calendar (Europe/London) as it types dates, dd/mm/yyyy, written by Intl rather than the app. */
function plantDayTyped(iso: string, shiftDays = 0): string {
  const at = new Date(Date.parse(iso) + shiftDays * 86_400_000);
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(at);
  const get = (type: string) => parts.find((p) => p.type === type)!.value;
  return `${get('day')}/${get('month')}/${get('year')}`;
}

describe('Audit trail', () => {
  it('lets the auditor filter, open an event, export the CSV and check the chain', async ({ page }) => {
    await signIn(page, 'auditor', '/audit-trail');
    await pageHeading(page, 'Audit trail').waitFor({ timeout: 30_000 });

    // The newest release of a lot: it has a before (the hold) and an after, so some fields change.
    const res = await page.request.get(`${baseUrl()}/api/v1/audit-events?entity=lot&action=release&limit=1`);
    expect(res.status()).toBe(200);
    const [release] = ((await res.json()) as AuditEventPage).items;
    expect(release).toBeDefined();

    await page.getByLabel('Kind of record').selectOption('lot');
    await page.getByLabel('From (plant day)').fill(plantDayTyped(release.at, -1));
    await page.getByLabel('To (plant day, included)').fill(plantDayTyped(release.at));
    await page.getByRole('button', { name: 'Show events' }).click();
    await page.waitForURL(/entity=lot/);

    const events = page.getByRole('list', { name: 'Audit events, newest first' }).locator(':scope > li');
    const item = page.locator(`li[data-seq="${release.seq}"]`);
    await item.waitFor();
    const count = await events.count();
    expect(count).toBeGreaterThan(0);
    for (let i = 0; i < count; i++) await expect(events.nth(i).textContent()).resolves.toMatch(/· lot /);
    await expect(item.getByRole('link', { name: 'Open the lot' }).getAttribute('href')).resolves.toBe(`/results/lots/${encodeURIComponent(release.entityId!)}`);

    await item.getByRole('button', { name: 'Before and after' }).click();
    const table = item.getByRole('table');
    await table.waitFor();
    const before = await table.getByRole('columnheader', { name: 'Before' }).boundingBox();
    const after = await table.getByRole('columnheader', { name: 'After' }).boundingBox();
    // Side by side: one row of headings, Before left of After.
    expect(before && after && Math.abs(before.y - after.y) < 2 && before.x + before.width <= after.x + 1).toBe(true);
    const changed = table.locator('tr[data-changed]');
    expect(await changed.count()).toBeGreaterThan(0);
    // A changed field says so in words, not by its tint alone.
    await expect(changed.first().textContent()).resolves.toContain('changed');
    await expect(table.getByRole('row', { name: /^status/ }).textContent()).resolves.toMatch(/on-hold.*released/);
    await screenshot(page, 'audit-trail-event-open');

    const download = page.waitForEvent('download');
    await page.getByRole('link', { name: /^Export CSV/ }).click();
    const file = await download;
    expect(file.suggestedFilename()).toMatch(/^audit-trail-from-\d{4}-\d\d-\d\d-to-\d{4}-\d\d-\d\d\.csv$/);
    const bytes = readFileSync((await file.path())!);
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const lines = bytes.toString('utf8').slice(1).split('\r\n');
    expect(lines[0]).toBe('seq,at,actor,role,entity,entity_id,action,reason,before,after,hash,prev_hash');
    expect(lines.some((l) => l.startsWith(`${release.seq},`))).toBe(true);

    await page.getByRole('button', { name: 'Check the chain' }).click();
    const verdict = page.getByTestId('chain-check').getByRole('status');
    await verdict.waitFor({ timeout: 60_000 });
    await expect(verdict.textContent()).resolves.toMatch(/^Intact: [\d,]+ events, every link holds\./);
    await screenshot(page, 'audit-trail-chain-intact');
  });

  it('shows a period typed the wrong way round under its field and keeps the list', async ({ page }) => {
    await signIn(page, 'auditor', '/audit-trail');
    await pageHeading(page, 'Audit trail').waitFor({ timeout: 30_000 });
    await page.getByLabel('From (plant day)').fill('02/03/2026');
    await page.getByLabel('To (plant day, included)').fill('01/03/2026');
    await page.getByRole('button', { name: 'Show events' }).click();
    await page.getByText('The last day comes before the first day').waitFor();
    await page.getByLabel('From (plant day)').fill('31/02/2026');
    await page.getByRole('button', { name: 'Show events' }).click();
    await page.getByText(/^Type the date as dd\/mm\/yyyy/).waitFor();
    expect(page.url()).not.toMatch(/from=/);
  });
});
