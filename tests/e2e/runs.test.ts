// SPC runs, alarms, the mail outbox and alert subscriptions in a real browser against the real
// server of scripts/run-tests.ts, whose workers do the runs and whose fake SMTP server takes the mail.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { sql } from 'drizzle-orm';
import { baseUrl, browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl, demoEmail } from '../support/api';
import { DEMO_PASSWORD } from '@api/db/seed';
import { createDatabase } from '@api/db/client';
import { createTestCharacteristic, removeTestCharacteristics, userIdByEmail, type TestCharacteristic } from '@tests/support/plant';
import type { Role } from '@shared/schemas/users';

const db = createDatabase(databaseUrl(), 2);
const it = browserTest({ timeout: 15_000 });
let t: TestCharacteristic;
const day = (d: number) => new Date(Date.UTC(2025, 9, 1 + d, 6)).toISOString();

/** A characteristic with a subscriber, and one lot below its specification uploaded through the server (its hooks raise the alarm at once). */
beforeAll(async () => {
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 135, usl: 155, effectiveFrom: day(-5) }] });
  for (let i = 0; i < 6; i++) await t.addLot(`W${i}`, day(i), [145, 146]);
  await db.execute(sql`insert into alarm_subscriptions (user_id, product_id, immediate, digest) values (${await userIdByEmail(db, demoEmail.admin)}, ${t.productId}, true, false)`);
  const login = (await (await fetch(`${baseUrl()}/api/v1/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: demoEmail.technician, password: DEMO_PASSWORD }) })).json()) as { token: string };
  const form = new FormData();
  // Produced an hour ago: a recent lot is e-mailed at once (older history goes to the digest only).
  const recent = new Date(Date.now() - 3_600_000).toISOString();
  const csv = `lot,product,line,produced_at,characteristic,value,replicate\n${t.lotNumber('LOW')},${t.productCode},L1,${recent},${t.code},130,1\n${t.lotNumber('LOW')},${t.productCode},L1,${recent},${t.code},131,2\n`;
  form.append('file', new Blob([csv], { type: 'text/csv' }), 'shift.csv');
  const res = await fetch(`${baseUrl()}/api/v1/uploads`, { method: 'POST', headers: { authorization: `Bearer ${login.token}` }, body: form });
  if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${await res.text()}`);
});

afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

/** Signs in and waits until the app is back on the page asked for. */
async function signInAt(page: Page, role: Role, path: string) {
  await signIn(page, role, path);
  await page.waitForURL(`**${path}`);
}

describe('SPC runs page', () => {
  it('lets a quality manager start a full run and follows its progress live to the end', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/spc-runs');
    await pageHeading(page, 'SPC runs').waitFor();
    await page.getByRole('button', { name: 'Start a full run now' }).click();
    const notice = page.getByRole('status').filter({ hasText: /Run \d+ has been queued/ });
    await notice.waitFor();
    const id = (await notice.textContent())!.match(/Run (\d+)/)![1];
    const row = page.locator(`tr[data-run="${id}"]`);
    await row.waitFor();
    expect(await row.textContent()).toMatch(/Started by hand/);
    await screenshot(page, 'runs-in-progress');
    // The page polls; no reload: the row turns to finished by itself.
    await row.getByText('Finished', { exact: true }).waitFor({ timeout: 120_000 });
    const progress = row.getByRole('progressbar');
    const [now, max] = await Promise.all([progress.getAttribute('aria-valuenow'), progress.getAttribute('aria-valuemax')]);
    expect(Number(now)).toBe(Number(max));
    expect(await row.textContent()).toMatch(new RegExp(`${max} of ${max} done`));
    await screenshot(page, 'runs-finished');
  }, 150_000);

  it('shows a technician the runs without the button that starts one', async ({ page }) => {
    await signInAt(page, 'technician', '/spc-runs');
    await pageHeading(page, 'SPC runs').waitFor();
    await page.locator('tr[data-run]').first().waitFor();
    expect(await page.getByRole('button', { name: 'Start a full run now' }).count()).toBe(0);
  });
});

describe('alarms page', () => {
  it('lists the out-of-specification lot with its values and limit, links the chart at the lot, and takes an acknowledgement with a note', async ({ page }) => {
    await signInAt(page, 'quality_manager', '/alarms');
    await pageHeading(page, 'Alarms').waitFor();
    // After a full run of the demo plant the list is long: find the lot.
    await page.getByLabel('Lot or characteristic').fill(t.lotNumber('LOW'));
    await page.getByRole('button', { name: 'Find' }).click();
    const row = page.locator('tr[data-alarm]').filter({ hasText: t.lotNumber('LOW') }).filter({ hasText: 'Out of specification' });
    await row.waitFor();
    const text = await row.textContent();
    expect(text).toContain(t.code);
    expect(text).toContain('Results 130, 131 mm');
    expect(text).toContain('Lot result 131 mm (mean of 2 results: 130, 131) below the lower specification limit 135 mm');
    expect(await row.getByRole('link', { name: 'Chart at this lot' }).getAttribute('href')).toBe(`/charts/${t.characteristicId}?lot=${t.lotNumber('LOW')}`);
    await screenshot(page, 'alarms-open');

    await row.getByRole('checkbox').check();
    await page.getByRole('button', { name: 'Acknowledge selected' }).click();
    const dialog = page.getByRole('dialog', { name: 'Acknowledge 1 open alarm' });
    await dialog.getByLabel('Note').fill('Water dose checked on the mixer log; retest of the retained sample ordered');
    await dialog.getByRole('button', { name: 'Acknowledge' }).click();
    await dialog.waitFor({ state: 'detached' });
    await row.waitFor({ state: 'detached' });

    await page.getByRole('tab', { name: /Acknowledged/ }).click();
    const acknowledged = page.locator('tr[data-alarm]').filter({ hasText: t.lotNumber('LOW') });
    await acknowledged.waitFor();
    await acknowledged.getByRole('link', { name: 'Open the alarm' }).click();
    await page.getByText('Acknowledged by Demo Quality Manager').waitFor();
    expect(await page.locator('main').textContent()).toContain('Water dose checked on the mixer log');
    await screenshot(page, 'alarms-acknowledged');
  });
});

describe('mail outbox page', () => {
  it('shows the administrator the alarm e-mail the fake SMTP server received, with the chart link', async ({ page }) => {
    await signInAt(page, 'admin', '/admin/outbox');
    await pageHeading(page, 'Mail outbox').waitFor();
    // The import's message of the lot (out of specification) and the run's (beyond a control limit) go to each
    // subscriber of its product or line: the administrator's of the import is the one looked at here.
    const item = page.locator('li[data-message]').filter({ hasText: `lot ${t.lotNumber('LOW')} — Out of specification` }).filter({ hasText: `To ${demoEmail.admin}` });
    await item.waitFor({ timeout: 20_000 });
    expect(await item.textContent()).toContain(`To ${demoEmail.admin}`);
    await item.getByRole('button', { name: 'Show the text' }).click();
    const body = await item.locator('pre').textContent();
    expect(body).toContain('Out of specification');
    expect(body).toContain(`/charts/${t.characteristicId}?lot=${t.lotNumber('LOW')}`);
    await screenshot(page, 'outbox');
  });
});

describe('alerts by e-mail page', () => {
  it('lets a technician subscribe to a product line for the morning digest and unsubscribe again', async ({ page }) => {
    await signInAt(page, 'technician', '/subscriptions');
    await pageHeading(page, 'Alerts by e-mail').waitFor();
    await page.getByText('You receive no alarm e-mails').waitFor();
    await page.getByLabel('Product line or product').selectOption({ label: 'L2 · Line 2 · adhesives and repair mortars' });
    await page.getByLabel(/At once/).uncheck();
    await page.getByRole('button', { name: 'Subscribe' }).click();
    const row = page.locator('tr[data-subscription]').filter({ hasText: 'Line L2' });
    await row.waitFor();
    expect(await row.getByRole('checkbox', { name: /Morning digest/ }).isChecked()).toBe(true);
    expect(await row.getByRole('checkbox', { name: /At once/ }).isChecked()).toBe(false);
    await screenshot(page, 'subscriptions');
    await row.getByRole('button', { name: 'Unsubscribe' }).click();
    await page.getByText('You receive no alarm e-mails').waitFor();
  });
});
