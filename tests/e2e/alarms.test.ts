// The alarm inbox and one alarm's page in a real browser against the test server: a quality manager
// filters the inbox, opens an alarm, investigates and closes it with an assignable cause; a technician
// reads the same page without the triage controls. Also the sent-mail log of a quality manager.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { and, eq, sql } from 'drizzle-orm';
import { browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { createRunRow, createTestCharacteristic, removeTestCharacteristics, type TestCharacteristic } from '../support/plant';
import { createDatabase } from '@api/db/client';
import { alarms } from '@api/db/schema';
import { runCharacteristic } from '@api/spc/run';
import { lotPath } from '@web/lib/lots';
import type { Role } from '@shared/schemas/users';

const db = createDatabase(databaseUrl(), 2);
const it = browserTest({ viewport: { width: 1280, height: 1000 }, timeout: 15_000 });

let demoMail: { id: number; subject: string; text: string };
let t: TestCharacteristic;
let alarmId: number;
beforeAll(async () => {
  // The newest digest: the log lists newest first, and other test files add mail while this one runs.
  const res = await db.execute<{ id: number; subject: string; text_body: string }>(sql`
    select id, subject, text_body from mail_outbox where kind = 'digest' and to_address = 'manager@harrowvale.example' order by created_at desc, id desc limit 1`);
  demoMail = { id: res.rows[0].id, subject: res.rows[0].subject, text: res.rows[0].text_body };
  // A product of this test alone, with one point far beyond its upper control limit (lot A22).
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  for (let i = 0; i < 24; i++) await t.addLot(`A${i}`, new Date(Date.UTC(2025, 9, 1 + i, 6)).toISOString(), i === 22 ? [172, 173] : [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3]);
  const runId = await createRunRow(db, [t.characteristicId]);
  await runCharacteristic(db, { runId, characteristicId: t.characteristicId, worker: 'e2e', publicUrl: 'http://prismline.test' });
  const [a] = await db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'we1')));
  alarmId = a.id;
}, 60_000);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

async function signInAt(page: Page, role: Role, path: string) {
  await signIn(page, role, path);
  await page.waitForURL(`**${path}`);
}

describe('alarm triage', () => {
  it('lets a quality manager filter the inbox, open an alarm, investigate it and close it with an assignable cause', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/alarms');
    await pageHeading(page, 'Alarms').waitFor();
    await page.locator('tr[data-alarm]').first().waitFor();
    // The filter lives in the address: product and signal.
    await page.getByLabel('Product').selectOption({ label: `${t.productCode} · Test compound ${t.productCode.slice(2)}` });
    await page.getByLabel('Signal').selectOption({ label: 'Beyond a control limit' });
    await page.waitForURL((url) => url.searchParams.get('product') === String(t.productId) && url.searchParams.get('rule') === 'we1');
    const row = page.locator(`tr[data-alarm="${alarmId}"]`);
    // The list of the earlier filter stays until the new one has loaded.
    await expect.poll(() => page.locator('tr[data-alarm]').count()).toBe(1);
    await row.waitFor();
    expect(await row.getByRole('link', { name: 'Chart at this lot' }).getAttribute('href')).toBe(`/charts/${t.characteristicId}?lot=${t.lotNumber('A22')}`);
    expect(await row.getByRole('link', { name: t.lotNumber('A22') }).getAttribute('href')).toBe(lotPath(t.lotNumber('A22')));
    // The selection offers the bulk actions and an NCR from the chosen alarms.
    await row.getByRole('checkbox').check();
    await page.getByText('1 selected').waitFor();
    expect(await page.getByRole('link', { name: 'Raise NCR' }).getAttribute('href')).toBe(`/ncrs/new?alarms=${alarmId}`);
    await screenshot(page, 'alarms-inbox');

    await row.getByRole('link', { name: 'Open the alarm' }).click();
    await page.waitForURL(`**/alarms/${alarmId}`);
    await pageHeading(page, `Beyond a control limit — ${t.code}, lot ${t.lotNumber('A22')}`).waitFor();
    const decide = page.getByRole('group', { name: 'Next step' });
    await decide.getByRole('button', { name: 'Acknowledge' }).click();
    await page.getByRole('button', { name: 'Acknowledge' }).last().click();
    await decide.getByRole('button', { name: 'Investigate' }).click();
    await page.getByLabel('Note (optional)').fill('Checking the flow table and the retained sample');
    await page.getByRole('button', { name: 'Investigate' }).last().click();
    await decide.getByRole('button', { name: 'Close' }).click();
    await page.getByLabel('Assignable cause found').check();
    await page.getByLabel('Cause category').selectOption('measurement');
    // The category's hint under the field (shared/schemas/causes.ts).
    await page.locator('p', { hasText: 'test equipment, calibration, specimen preparation' }).waitFor();
    await page.getByLabel('What was checked and found').fill('Chipped prism on the flow table; replaced and retested');
    await page.getByRole('button', { name: 'Close the alarm' }).click();
    await decide.getByRole('button', { name: 'Reopen' }).waitFor();
    const main = page.locator('main');
    await main.getByText('Assignable cause found — measurement').waitFor();
    const history = page.getByRole('list', { name: 'History' });
    expect(await history.locator('li').count()).toBe(3);
    expect(await history.textContent()).toMatch(/acknowledged.*started the investigation — Checking the flow table.*closed — Chipped prism/s);
    await screenshot(page, 'alarm-closed');
    const [stored] = await db.select().from(alarms).where(eq(alarms.id, alarmId));
    expect(stored).toMatchObject({ status: 'closed', outcome: 'assignable-cause', causeCategory: 'measurement' });
  });

  it('shows a technician the inbox and the alarm without any triage control', async ({ page }) => {
    await signInAt(page, 'technician', `/alarms/${alarmId}`);
    await pageHeading(page, new RegExp(`^Beyond a control limit — ${t.code}`)).waitFor();
    await page.getByRole('heading', { name: 'History' }).waitFor();
    expect(await page.getByRole('group', { name: 'Next step' }).count()).toBe(0);
    for (const name of ['Acknowledge', 'Investigate', 'Close', 'Reopen', 'Add the comment']) expect(await page.getByRole('button', { name, exact: true }).count(), name).toBe(0);
    expect(await page.getByLabel('Who follows it up').count()).toBe(0);
    await page.goto(page.url().replace(/\/alarms\/\d+$/, `/alarms?product=${t.productId}&status=all`));
    await page.locator(`tr[data-alarm="${alarmId}"]`).waitFor();
    expect(await page.getByRole('checkbox').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Acknowledge selected' }).count()).toBe(0);
  });
});

describe('sent e-mail', () => {
  it('shows the quality manager the messages that went out, and the text of one', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/mail-log');
    await pageHeading(page, 'Sent e-mail').waitFor();
    const item = page.locator(`li[data-mail="${demoMail.id}"]`).filter({ hasText: demoMail.subject });
    await item.waitFor();
    expect(await item.textContent()).toContain('Morning digest · to manager@harrowvale.example');
    await item.getByRole('button', { name: 'Show the text' }).click();
    expect(await item.locator('pre').textContent()).toBe(demoMail.text);
    await screenshot(page, 'mail-log');
  });
});
