// The whole path of a nonconformance in a real browser, as a quality manager walks it: a signal on the
// chart → its alarm, acknowledged and investigated → an NCR raised from it → the lot put on hold from
// its page → an action → the lot's disposition → approval, effectiveness and closure; then each e-mail
// that path sent is found in the sent-mail log.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { and, eq, sql } from 'drizzle-orm';
import { browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { createRunRow, createTestCharacteristic, removeTestCharacteristics, type TestCharacteristic } from '../support/plant';
import { createDatabase } from '@api/db/client';
import { alarms, alarmSubscriptions, users } from '@api/db/schema';
import { runCharacteristic } from '@api/spc/run';

const db = createDatabase(databaseUrl(), 2);
const it = browserTest({ viewport: { width: 1280, height: 1000 }, timeout: 60_000 });

let t: TestCharacteristic;
let alarmId: number;
let lot: string;
let managerId: number;
let firstMailId: number;
beforeAll(async () => {
  // A product of this test alone with one lot far beyond the upper control limit (lot A22), and the
  // quality manager subscribed to it at once, so every message of the path goes to them.
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  for (let i = 0; i < 24; i++) await t.addLot(`A${i}`, new Date(Date.UTC(2025, 9, 1 + i, 6)).toISOString(), i === 22 ? [172, 173] : [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3]);
  const runId = await createRunRow(db, [t.characteristicId]);
  await runCharacteristic(db, { runId, characteristicId: t.characteristicId, worker: 'e2e', publicUrl: 'http://prismline.test' });
  const [a] = await db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'we1')));
  alarmId = a.id;
  lot = t.lotNumber('A22');
  [{ id: managerId }] = await db.select({ id: users.id }).from(users).where(eq(users.email, 'manager@harrowvale.example'));
  await db.insert(alarmSubscriptions).values({ userId: managerId, productId: t.productId, immediate: true, digest: false });
  const last = await db.execute<{ id: number | null }>(sql`select max(id) as id from mail_outbox`);
  firstMailId = (last.rows[0].id ?? 0) + 1;
}, 60_000);
afterAll(async () => {
  await db.delete(alarmSubscriptions).where(eq(alarmSubscriptions.productId, t.productId));
  await removeTestCharacteristics(db);
  await db.$client.end();
});

const section = (page: Page, name: string | RegExp) => page.getByRole('region', { name });
const currentStep = (page: Page) => page.getByRole('list', { name: 'States of the NCR' }).locator('[aria-current="step"]');

/** The plant's day today (Europe/London, dd/MM/yyyy; api/db/seed/scenario/plant.ts) plus `days`, written by Intl rather than the app's code. */
function plantDayText(days: number): string {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(new Date(Date.now() + days * 86_400_000));
  const get = (type: string) => parts.find((p) => p.type === type)!.value;
  return `${get('day')}/${get('month')}/${get('year')}`;
}

describe('from a signal on the chart to a closed NCR', () => {
  it('walks a quality manager through alarm, NCR, hold, action, disposition and closure, and every e-mail is in the log', async ({ page }) => {
    // 1. The chart at the lot: its signal leads to the alarm.
    await signIn(page, 'quality_manager', `/charts/${t.characteristicId}?lot=${encodeURIComponent(lot)}`);
    await page.getByRole('list', { name: 'Run-rule signals' }).waitFor();
    await page.getByRole('link', { name: `Alarms of lot ${lot}` }).click();
    await pageHeading(page, 'Alarms').waitFor();
    await page.locator(`tr[data-alarm="${alarmId}"]`).getByRole('link', { name: 'Open the alarm' }).click();
    await page.waitForURL(`**/alarms/${alarmId}`);

    // 2. Acknowledge, then investigate.
    const decide = page.getByRole('group', { name: 'Next step' });
    await decide.getByRole('button', { name: 'Acknowledge' }).click();
    await page.getByRole('button', { name: 'Acknowledge' }).last().click();
    await decide.getByRole('button', { name: 'Investigate' }).click();
    await page.getByLabel('Note (optional)').fill('Flow far above the limit: checking the water dose of the lot');
    await page.getByRole('button', { name: 'Investigate' }).last().click();
    await decide.getByRole('button', { name: 'Close' }).waitFor();

    // 3. Raise an NCR from the alarm: it arrives linked, with its lot.
    await page.getByRole('link', { name: 'Raise NCR' }).click();
    await pageHeading(page, 'Raise an NCR').waitFor();
    const form = page.getByRole('form', { name: 'Raise an NCR' });
    expect(await form.getByLabel('Lot number').inputValue()).toBe(lot);
    await form.getByLabel('Title').fill(`Flow above the control limit on lot ${lot}`);
    await form.getByLabel('Description').fill('Flow 172 mm and 173 mm against an upper control limit near 150 mm; water dose under review.');
    await form.getByLabel('Severity').selectOption('minor');
    // The hold is put from the lot's own page below.
    await form.getByLabel('Put these lots on hold now').uncheck();
    await form.getByLabel('Assignee').selectOption({ label: 'Demo Quality Manager' });
    await form.getByRole('button', { name: 'Raise NCR' }).click();
    await page.waitForURL(/\/ncrs\/\d+$/);
    const ncrPath = new URL(page.url()).pathname;
    const heading = pageHeading(page, /^NCR-\d{4}-\d{4} · Flow above the control limit/);
    await heading.waitFor();
    const ncrNumber = (await heading.textContent())!.match(/NCR-\d{4}-\d{4}/)![0];
    expect(await section(page, /alarm/i).getByRole('link', { name: /chart/i }).first().getAttribute('href')).toContain(`/charts/${t.characteristicId}`);

    // 4. Put the lot on hold from its page.
    const containment = section(page, 'Containment: lots concerned');
    await containment.getByRole('link', { name: lot }).click();
    await page.getByRole('button', { name: 'Put on hold…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Reason').fill(`Held under ${ncrNumber} until the water dose is cleared`);
    await dialog.getByRole('button', { name: 'Put on hold' }).click();
    await page.getByTestId('lot-status').getByText('On hold').waitFor();
    // The lot page names the NCR that concerns it.
    await page.getByRole('link', { name: ncrNumber }).click();
    await heading.waitFor();

    // 5. Investigate, root cause, an action.
    await page.getByRole('button', { name: 'Start the investigation' }).click();
    await currentStep(page).getByText('Investigating').waitFor();
    const rootCause = section(page, 'Root cause');
    await rootCause.getByRole('button', { name: 'Record the root cause' }).click();
    await rootCause.getByLabel('Cause category').selectOption('machine');
    await rootCause.getByLabel('Analysis').fill('The water meter of the test mixer stuck open; the lot itself was dosed correctly.');
    await rootCause.getByRole('button', { name: 'Save the root cause' }).click();
    await rootCause.getByRole('button', { name: 'Change the root cause' }).waitFor();
    const actions = section(page, 'Corrective and preventive actions');
    await actions.getByRole('button', { name: 'Add an action' }).click();
    const add = actions.getByRole('form', { name: 'Add an action' });
    await add.getByLabel('Owner').selectOption({ label: 'Demo Quality Manager' });
    await add.getByLabel('What is to be done').fill('Replace the water meter of the test mixer and check it against a measuring cylinder');
    await add.getByLabel('Due date').fill(plantDayText(7));
    await add.getByRole('button', { name: 'Add the action' }).click();
    const action = actions.locator('li[data-action]');
    await action.getByText('Replace the water meter of the test mixer').waitFor();
    await page.getByRole('button', { name: 'Actions decided' }).click();
    await currentStep(page).getByText('Actions pending').waitFor();
    await action.getByRole('button', { name: 'Record as done' }).click();
    await action.getByLabel('Evidence').fill('Meter replaced; 500 ml cylinder check within 2 ml.');
    await action.getByRole('button', { name: 'Save' }).click();
    await action.getByText(`Done ${plantDayText(0)}`).waitFor();

    // 6. Disposition: released as is after a retest; the lot's status follows.
    const decision = section(page, 'Disposition of the lots').locator(`li[data-disposition="${lot}"]`);
    await decision.getByRole('button', { name: 'Decide' }).click();
    await decision.getByLabel('Decision').selectOption('release');
    await decision.getByLabel('Note').fill('Retest of the retained sample with a checked water dose: 146 mm, within the specification.');
    await decision.getByRole('button', { name: 'Record the decision' }).click();
    await containment.locator(`tr[data-lot="${lot}"]`).getByText('Released').waitFor();

    // 7. Approve, check effectiveness, close.
    const approval = section(page, 'Approval');
    await approval.getByLabel('Approval note').fill('Cause, action and decision reviewed.');
    await approval.getByRole('button', { name: 'Approve' }).click();
    await approval.getByText(/^Approved by Demo Quality Manager/).waitFor();
    const closure = section(page, 'Effectiveness and closure');
    await closure.getByRole('button', { name: 'Record the effectiveness check' }).click();
    await closure.getByLabel('Effectiveness check', { exact: true }).and(page.getByRole('textbox')).fill('Next ten flow tests on the test mixer agree with the reference mixer within 3 mm.');
    await closure.getByLabel('Yes, effective').check();
    await closure.getByRole('button', { name: 'Save the check' }).click();
    await page.getByRole('button', { name: 'Close the NCR' }).click();
    await currentStep(page).getByText('Closed').waitFor();
    await screenshot(page, 'quality-path-closed');

    // 8. Every message of the path, in the outbox and in the sent-mail log the manager reads.
    const sent = await db.execute<{ kind: string; subject: string; to_address: string }>(sql`
      select kind, subject, to_address from mail_outbox where id >= ${firstMailId} and (refs->>'ncrId' is not null or kind in ('lot-hold', 'lot-release')) order by id`);
    const mine = sent.rows.filter((m) => m.to_address === 'manager@harrowvale.example' && (m.subject.includes(ncrNumber) || m.subject.includes(lot)));
    const subjects = mine.map((m) => m.subject);
    expect(subjects.some((s) => s.includes(ncrNumber) && /raised/i.test(s)), subjects.join('\n')).toBe(true);
    expect(subjects.some((s) => s.includes(`lot ${lot}`) && s.includes('put on hold')), subjects.join('\n')).toBe(true);
    expect(subjects.some((s) => s.includes(ncrNumber) && /closed/i.test(s)), subjects.join('\n')).toBe(true);
    await page.goto(page.url().replace(ncrPath, '/mail-log'));
    await pageHeading(page, 'Sent e-mail').waitFor();
    for (const subject of subjects) await page.locator('li[data-mail]').filter({ hasText: subject }).first().waitFor();
    await screenshot(page, 'quality-path-mail');
  });
});
