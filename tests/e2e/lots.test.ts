// Holding and releasing a lot in a real browser against the server started by scripts/run-tests.ts:
// a technician puts a released demo lot on hold from its page with a reason; a quality manager finds it
// on the overview and in the lot list narrowed to held lots, and releases it with a reason.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import { sql } from 'drizzle-orm';
import { browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { createDatabase } from '@api/db/client';
import { lotPath } from '@web/lib/lots';

const it = browserTest({ timeout: 15_000 });
const db = createDatabase(databaseUrl(), 1);
afterAll(() => db.$client.end());

const holdReason = `Bags of this lot found torn at the palletiser ${Date.now().toString(36)}`;
const releaseReason = 'Torn bags removed and replaced; the rest of the lot checked intact';
let lot: string;

beforeAll(async () => {
  // A released lot of line L2 (few demo holds there, so the overview lists it), a few lots back from the newest
  // so that tests entering new results do not meet it.
  const res = await db.execute<{ lot_number: string }>(sql`
    select l.lot_number from lots l join production_lines pl on pl.id = l.line_id
    where pl.code = 'L2'
      and not exists (select 1 from lot_holds h where h.lot_id = l.id and h.released_at is null)
      and not exists (select 1 from ncr_lots nl where nl.lot_id = l.id)
    order by l.produced_at desc offset 3 limit 1`);
  lot = res.rows[0].lot_number;
});

describe('a lot put on hold and released', () => {
  it('lets a technician put the lot on hold from its page, with a reason, and not release it', async ({ page }) => {
    await signIn(page, 'technician', lotPath(lot));
    await pageHeading(page, `Lot ${lot}`).waitFor();
    const status = page.getByTestId('lot-status');
    expect(await status.textContent()).toContain('Released');
    await page.getByRole('button', { name: 'Put on hold…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Reason').fill('torn');
    await dialog.getByRole('button', { name: 'Put on hold' }).click();
    await dialog.getByText('Write at least 5 characters for a reason').waitFor();
    await dialog.getByLabel('Reason').fill(holdReason);
    await dialog.getByRole('button', { name: 'Put on hold' }).click();
    await dialog.waitFor({ state: 'detached' });
    await status.getByText('On hold').waitFor();
    const history = page.getByRole('table', { name: `Holds of lot ${lot}, newest first` });
    expect(await history.textContent()).toContain(holdReason);
    expect(await history.textContent()).toContain('Demo Technician');
    // Only a quality manager releases a lot.
    expect(await page.getByRole('button', { name: 'Release lot…' }).count()).toBe(0);
    await screenshot(page, 'lot-on-hold');
  });

  it('shows the held lot to the quality manager on the overview and in the lot list, who releases it with a reason', async ({ page }) => {
    await signIn(page, 'quality_manager', '/?line=L2');
    await pageHeading(page, 'Plant overview').waitFor();
    const held = page.getByRole('region', { name: /Lots on hold/ });
    await held.getByRole('link', { name: lot }).waitFor();
    expect(await held.textContent()).toContain(holdReason);
    await screenshot(page, 'overview-held-lots');

    await held.getByRole('link', { name: /on hold/ }).click();
    await pageHeading(page, 'Lots').waitFor();
    expect(await page.getByLabel('Status').inputValue()).toBe('on-hold');
    const row = page.getByRole('row').filter({ hasText: lot });
    await row.waitFor();
    expect(await row.textContent()).toContain('On hold');
    await screenshot(page, 'lot-list-on-hold');

    await row.getByRole('link', { name: lot }).click();
    await pageHeading(page, `Lot ${lot}`).waitFor();
    await page.getByRole('button', { name: 'Release lot…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Reason').fill(releaseReason);
    await dialog.getByRole('button', { name: 'Release lot' }).click();
    await dialog.waitFor({ state: 'detached' });
    await page.getByTestId('lot-status').getByText('Released').waitFor();
    const history = page.getByRole('table', { name: `Holds of lot ${lot}, newest first` });
    expect(await history.textContent()).toContain(releaseReason);
    expect(await history.textContent()).toContain('Demo Quality Manager');
    await screenshot(page, 'lot-released');
  });
});
