// The alarms screen on a tablet held upright (800 × 1280), and the sent-mail log of a quality manager,
// against the demo as the test server seeded it.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { sql } from 'drizzle-orm';
import { browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { createDatabase } from '@api/db/client';
import { lotPath } from '@web/lib/lots';
import type { Role } from '@shared/schemas/users';

const db = createDatabase(databaseUrl(), 2);
const it = browserTest({ viewport: { width: 800, height: 1280 }, timeout: 15_000 });
afterAll(() => db.$client.end());

let demoMail: { subject: string; text: string };
beforeAll(async () => {
  const res = await db.execute<{ subject: string; text_body: string }>(sql`select subject, text_body from mail_outbox where kind = 'digest' order by id limit 1`);
  demoMail = { subject: res.rows[0].subject, text: res.rows[0].text_body };
});

async function signInAt(page: Page, role: Role, path: string) {
  await signIn(page, role, path);
  await page.waitForURL(`**${path}`);
}

describe('alarms on a tablet', () => {
  it('keeps every alarm and its actions on an 800-pixel-wide screen, with links to the chart at the lot and to the lot page', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/alarms');
    await pageHeading(page, 'Alarms').waitFor();
    const card = page.locator('article[data-alarm-group]').first();
    await card.waitFor();
    await page.getByText('In order of what matters this morning').waitFor();
    // Nothing to scroll sideways: the page is no wider than the screen.
    const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
    expect(widths.scroll).toBeLessThanOrEqual(widths.client);
    const acknowledge = card.getByRole('button', { name: 'Acknowledge' }).first();
    const close = card.getByRole('button', { name: 'Close' }).first();
    for (const button of [acknowledge, close]) {
      const box = (await button.boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width).toBeLessThanOrEqual(800);
    }
    const lot = (await card.locator('header .font-mono').nth(1).textContent())!;
    expect(await card.getByRole('link', { name: 'Chart at this lot' }).getAttribute('href')).toMatch(new RegExp(`^/charts/\\d+\\?lot=${lot}$`));
    expect(await card.getByRole('link', { name: 'Lot page' }).getAttribute('href')).toBe(lotPath(lot));
    // People read words, not rule identifiers or "Point 280".
    const text = (await page.locator('main').textContent())!;
    expect(text).not.toMatch(/\bwe[1-4]\b|Point \d+|UTC/);
    await screenshot(page, 'alarms-tablet');
  });
});

describe('sent e-mail', () => {
  it('shows the quality manager the messages that went out, and the text of one', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/mail-log');
    await pageHeading(page, 'Sent e-mail').waitFor();
    const item = page.locator('li[data-mail]').filter({ hasText: demoMail.subject });
    await item.waitFor();
    expect(await item.textContent()).toContain('Morning digest · to manager@harrowvale.example');
    await item.getByRole('button', { name: 'Show the text' }).click();
    expect(await item.locator('pre').textContent()).toBe(demoMail.text);
    await screenshot(page, 'mail-log');
  });
});
