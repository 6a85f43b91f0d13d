// Nonconformance reports in a real browser against the real server started by scripts/run-tests.ts: a
// quality manager raises one from a lot with containment and runs it to closure, the NCR prints as one A4
// record, a technician raises and attaches but manages nothing, and an auditor only reads.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect } from 'vitest';
import { sql } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { baseUrl, browserTest, demoEmailOf, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { createDatabase } from '@api/db/client';
import { DEMO_PASSWORD } from '@api/db/seed';
import type { AlarmView } from '@shared/schemas/alarms';
import type { NcrView } from '@shared/schemas/ncrs';
import type { Role } from '@shared/schemas/users';

const it = browserTest({ timeout: 15_000 });
const db = createDatabase(databaseUrl(), 1);
afterAll(() => db.$client.end());

/** Lots of the demo history that no NCR names and no hold contains: containment must be what puts them on hold. */
let freeLots: string[] = [];
beforeAll(async () => {
  const res = await db.execute<{ lot_number: string }>(sql`
    select l.lot_number from lots l
    where not exists (select 1 from lot_holds h where h.lot_id = l.id and h.released_at is null)
      and not exists (select 1 from ncr_lots n where n.lot_id = l.id)
    order by l.id desc limit 3`);
  freeLots = res.rows.map((r) => r.lot_number);
  expect(freeLots).toHaveLength(3);
});

/** The demo plant's day (Europe/London, dd/MM/yyyy; api/db/seed/scenario/plant.ts) `days` from today, written by Intl rather than the app's code. */
function plantDayText(days: number): string {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', year: 'numeric', month: '2-digit', day: '2-digit' }).formatToParts(new Date(Date.now() + days * 86_400_000));
  const get = (type: string) => parts.find((p) => p.type === type)!.value;
  return `${get('day')}/${get('month')}/${get('year')}`;
}

/** A bearer token of a demo user, for setting a scene through the API. */
async function tokenOf(role: Role): Promise<string> {
  const res = await fetch(`${baseUrl()}/api/v1/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: demoEmailOf(role), password: DEMO_PASSWORD }) });
  expect(res.status).toBe(200);
  return ((await res.json()) as { token: string }).token;
}

async function api<T>(role: Role, method: string, path: string, body?: unknown): Promise<T> {
  const res = await fetch(`${baseUrl()}${path}`, {
    method,
    headers: { authorization: `Bearer ${await tokenOf(role)}`, 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  expect(res.ok, `${method} ${path}: ${res.status}`).toBe(true);
  return (await res.json()) as T;
}

const section = (page: Page, name: string | RegExp) => page.getByRole('region', { name });
const currentStep = (page: Page) => page.getByRole('list', { name: 'States of the NCR' }).locator('[aria-current="step"]');

describe('an NCR run to closure by a quality manager', () => {
  it('raises it from a lot with containment, adds and completes an action, decides the lot, approves, checks effectiveness, closes, prints and reopens with a reason', async ({ page }) => {
    const lot = freeLots[0];
    await signIn(page, 'quality_manager', `/ncrs/new?lot=${encodeURIComponent(lot)}`);
    await pageHeading(page, 'Raise an NCR').waitFor();
    const form = page.getByRole('form', { name: 'Raise an NCR' });
    // The lot arrives filled in, with containment offered and ticked.
    expect(await form.getByLabel('Lot number').inputValue()).toBe(lot);
    expect(await form.getByLabel('Put these lots on hold now').isChecked()).toBe(true);
    await form.getByLabel('Title').fill(`Flow below specification on lot ${lot}`);
    await form.getByLabel('Description').fill('Flow 118 mm against a lower limit of 130 mm on the retained sample; the lot is in the warehouse.');
    // No severity chosen: the shared request schema's message under the field, and nothing sent.
    await form.getByRole('button', { name: 'Raise NCR' }).click();
    await form.getByText('Choose a severity: minor, major, critical').waitFor();
    await form.getByLabel('Severity').selectOption('major');
    // A decimal comma is read as a decimal (common practice in the plant's country of use).
    await form.getByLabel('Quantity (t)').fill('12,5');
    await form.getByLabel('Assignee').selectOption({ label: 'Demo Quality Manager' });
    await form.getByRole('button', { name: 'Raise NCR' }).click();
    await page.waitForURL(/\/ncrs\/\d+$/);
    const id = Number(new URL(page.url()).pathname.split('/').pop());

    const heading = pageHeading(page, /^NCR-\d{4}-\d{4} · Flow below specification/);
    await heading.waitFor();
    expect(await currentStep(page).textContent()).toBe('1.Open');
    // Containment: the lot is on hold by this NCR, with the quantity and a link to its page.
    const containment = section(page, 'Containment: lots concerned');
    const row = containment.locator(`tr[data-lot="${lot}"]`);
    expect(await row.getByText('On hold').isVisible()).toBe(true);
    expect(await row.getByText('Contained by this NCR').isVisible()).toBe(true);
    expect(await row.locator('td').nth(3).textContent()).toBe('12.5 t');
    expect(await row.getByRole('link', { name: lot }).getAttribute('href')).toBe(`/results/lots/${encodeURIComponent(lot)}`);

    await page.getByRole('button', { name: 'Start the investigation' }).click();
    await currentStep(page).getByText('Investigating').waitFor();

    const rootCause = section(page, 'Root cause');
    await rootCause.getByRole('button', { name: 'Record the root cause' }).click();
    await rootCause.getByLabel('Cause category').selectOption('material');
    await rootCause.getByLabel('Analysis').fill('The new sand delivery of the week carried more fines; water demand rose and flow fell.');
    await rootCause.getByRole('button', { name: 'Save the root cause' }).click();
    await rootCause.getByRole('button', { name: 'Change the root cause' }).waitFor();
    // The category in words with what it covers (shared/schemas/causes.ts), and the analysis.
    expect(await rootCause.locator('p').allTextContents()).toEqual([
      'Material — raw materials: sand source, binder, additives, a delivery',
      'The new sand delivery of the week carried more fines; water demand rose and flow fell.',
    ]);

    const actions = section(page, 'Corrective and preventive actions');
    await actions.getByRole('button', { name: 'Add an action' }).click();
    const add = actions.getByRole('form', { name: 'Add an action' });
    await add.getByLabel('Owner').selectOption({ label: 'Demo Technician' });
    await add.getByLabel('What is to be done').fill('Sieve analysis of every sand delivery before it is used');
    // A date typed the ISO way is not the plant's format: the form says so and sends nothing.
    await add.getByLabel('Due date').fill('2030-01-31');
    await add.getByRole('button', { name: 'Add the action' }).click();
    await add.getByText('Type the date as dd/mm/yyyy, e.g. 30/11/2026').waitFor();
    await add.getByLabel('Due date').fill(plantDayText(14));
    await add.getByRole('button', { name: 'Add the action' }).click();
    const action = actions.locator('li[data-action]');
    await action.getByText('Sieve analysis of every sand delivery before it is used').waitFor();
    expect(await action.textContent()).toContain(`Demo Technician · due ${plantDayText(14)}`);

    await page.getByRole('button', { name: 'Actions decided' }).click();
    await currentStep(page).getByText('Actions pending').waitFor();
    // Closing now is refused: the list of what is missing stands on the page, and the server's refusal says the same.
    const blockers = page.getByTestId('closing-blockers');
    await blockers.getByText('A quality manager has not approved it yet.').waitFor();
    await page.getByRole('button', { name: 'Close the NCR' }).click();
    await page.getByRole('alert').getByText('The NCR cannot be closed yet:').waitFor();
    expect(await page.getByRole('alert').getByText('Record the effectiveness check of the actions.').isVisible()).toBe(true);
    expect(await currentStep(page).textContent()).toBe('3.Actions pending');

    await action.getByRole('button', { name: 'Record as done' }).click();
    await action.getByLabel('Evidence').fill('Sieve analyses of deliveries 41 to 44 filed in the lab binder.');
    await action.getByRole('button', { name: 'Save' }).click();
    await action.getByText(`Done ${plantDayText(0)}`).waitFor();

    const dispositions = section(page, 'Disposition of the lots');
    const decision = dispositions.locator(`li[data-disposition="${lot}"]`);
    await decision.getByRole('button', { name: 'Decide' }).click();
    await decision.getByLabel('Decision').selectOption('downgrade');
    const soldAs = decision.getByLabel('Sold as');
    const target = (await soldAs.locator('option').nth(1).textContent())!;
    await soldAs.selectOption({ index: 1 });
    await decision.getByLabel('Note').fill('Meets the specification of the lower product; bags relabelled.');
    await decision.getByRole('button', { name: 'Record the decision' }).click();
    await decision.getByText(`Downgrade to another product to ${target}`).waitFor();
    // Downgraded: released to be sold as the other product (shared/schemas/ncr-requests.ts, dispositions).
    await row.getByText('Released').waitFor();

    const approval = section(page, 'Approval');
    await approval.getByLabel('Approval note').fill('Root cause, actions and decision reviewed.');
    await approval.getByRole('button', { name: 'Approve' }).click();
    await approval.getByText(/^Approved by Demo Quality Manager, \d\d\/\d\d\/\d{4} \d\d:\d\d$/).waitFor();

    const closure = section(page, 'Effectiveness and closure');
    await closure.getByRole('button', { name: 'Record the effectiveness check' }).click();
    await closure.getByLabel('Effectiveness check', { exact: true }).and(page.getByRole('textbox')).fill('Flow of the next ten lots within specification, mean 142 mm.');
    await closure.getByLabel('Yes, effective').check();
    await closure.getByRole('button', { name: 'Save the check' }).click();
    await closure.getByTestId('ncr-effective').getByText('Effective').waitFor();
    expect(await blockers.count()).toBe(0);

    await page.getByRole('button', { name: 'Close the NCR' }).click();
    await currentStep(page).getByText('Closed').waitFor();
    await closure.getByText(/^Closed \d\d\/\d\d\/\d{4} \d\d:\d\d by Demo Quality Manager$/).waitFor();
    // Closed: nothing left to change, only reopening.
    expect(await page.getByRole('button', { name: 'Reopen' }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Add an action' }).count()).toBe(0);

    // The history is the server's, in its order, oldest first, every time in the plant's format.
    const ncr = await api<NcrView>('quality_manager', 'GET', `/api/v1/ncrs/${id}`);
    const history = section(page, 'History').locator('tbody tr');
    expect(await history.count()).toBe(ncr.history.length);
    expect(ncr.history.length).toBeGreaterThanOrEqual(9);
    const times = await history.locator('time').evaluateAll((els) => els.map((e) => e.getAttribute('datetime')!));
    expect(times).toEqual(ncr.history.map((h) => h.at));
    expect([...times].sort()).toEqual(times);
    expect(await history.first().locator('td').nth(2).textContent()).toContain(ncr.history[0].summary);
    expect(ncr).toMatchObject({ status: 'closed', effective: true, rootCauseCategory: 'material', lots: [{ lotNumber: lot, quantityT: 12.5, disposition: 'downgrade', lotStatus: 'released' }] });
    await screenshot(page, 'ncr-closed');

    // On paper: no menu, header, buttons or forms; the number and title on top; the history included.
    await page.emulateMedia({ media: 'print' });
    const display = (selector: string) => page.locator(selector).first().evaluate((el) => getComputedStyle(el).display);
    expect(await display('aside:has(nav[aria-label="Main menu"])')).toBe('none');
    expect(await page.getByRole('navigation', { name: 'Main menu' }).isVisible()).toBe(false);
    expect(await display('header:has(input[placeholder="Find a lot…"])')).toBe('none');
    expect(await page.getByRole('button', { name: 'Sign out' }).isVisible()).toBe(false);
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    expect(await page.getByRole('button', { name: 'Reopen' }).isVisible()).toBe(false);
    expect(await heading.isVisible()).toBe(true);
    expect(await section(page, 'History').isVisible()).toBe(true);
    await page.getByText(/^Times are plant time \(Europe\/London, (GMT|BST)\)\.$/).first().waitFor();
    const top = await heading.boundingBox();
    const historyBox = await section(page, 'History').boundingBox();
    expect(top!.y).toBeLessThan(historyBox!.y);
    expect(await page.evaluate(() => getComputedStyle(document.body).backgroundColor)).toBe('rgb(255, 255, 255)');
    await screenshot(page, 'ncr-print');
    // The page size the print rules ask for is A4: 210 × 297 mm (ISO 216) = 595.28 × 841.89 pt at 72 pt to the inch.
    const pdf = (await page.pdf({ preferCSSPageSize: true })).toString('latin1');
    const box = /\/MediaBox\s*\[\s*0 0 ([\d.]+) ([\d.]+)\s*\]/.exec(pdf);
    expect(box).not.toBeNull();
    expect(Number(box![1])).toBeCloseTo(595.28, -0.5);
    expect(Number(box![2])).toBeCloseTo(841.89, -0.5);

    // Reopening asks why (shared/schemas/ncrs.ts ncrStepNeedsReason); the reason stands in the history.
    await page.emulateMedia({ media: 'screen' });
    await page.getByRole('button', { name: 'Reopen' }).click();
    const dialog = page.getByRole('dialog', { name: 'Reopen' });
    await dialog.getByLabel('Reason').fill('A customer reported low flow on a delivery of the same week.');
    await dialog.getByRole('button', { name: 'Reopen' }).click();
    await currentStep(page).getByText('Open').waitFor();
    expect(await dialog.count()).toBe(0);
    await section(page, 'History').locator('tbody tr').last().getByText('Reason: A customer reported low flow on a delivery of the same week.').waitFor();
  });

  it('lists the NCR under its state with the filter kept in the address', async ({ page }) => {
    const lot = freeLots[1];
    const raised = await api<NcrView>('quality_manager', 'POST', '/api/v1/ncrs', {
      title: `Air content above specification on lot ${lot}`,
      description: 'Air content 7.1 % against an upper limit of 6 % on the retained sample.',
      severity: 'critical',
      lots: [{ lotNumber: lot, quantityT: 24 }],
      holdLots: true,
    });
    await signIn(page, 'quality_manager', '/ncrs');
    await pageHeading(page, 'Nonconformance reports').waitFor();
    await page.getByRole('button', { name: /^Open/ }).click();
    await page.getByLabel('Severity').selectOption('critical');
    await page.getByLabel('Number, title or lot').fill(lot);
    await page.getByRole('button', { name: 'Find' }).click();
    await page.waitForURL(`**/ncrs?status=open&severity=critical&q=${encodeURIComponent(lot)}`);
    const row = page.locator(`tr[data-ncr="${raised.number}"]`);
    await row.waitFor();
    // The list of the previous filter stays on screen until the new answer arrives.
    await expect.poll(() => page.locator('tbody tr').count()).toBe(1);
    expect(await row.locator('td').allTextContents()).toEqual([
      raised.number,
      raised.title,
      raised.product!.code,
      'Critical',
      'Open',
      'Nobody yet',
      lot,
      '0',
      expect.stringMatching(/^\d\d\/\d\d\/\d{4}$/),
    ]);
    // The filter survives a reload: it lives in the address.
    await page.reload();
    await row.waitFor();
    expect(await page.getByLabel('Severity').inputValue()).toBe('critical');
    await screenshot(page, 'ncr-list');
  });
});

describe('an NCR raised from alarms', () => {
  it('shows the alarms, fills in their product, lot and a title, and links them on the NCR', async ({ page }) => {
    const { items } = await api<{ items: AlarmView[] }>('quality_manager', 'GET', '/api/v1/alarms?status=open&limit=1');
    const alarm = items[0];
    await signIn(page, 'quality_manager', `/ncrs/new?alarms=${alarm.id}`);
    const form = page.getByRole('form', { name: 'Raise an NCR' });
    await form.getByRole('region', { name: 'Alarms it is raised from' }).getByText(alarm.description).waitFor();
    expect(await form.getByLabel('Lot number').inputValue()).toBe(alarm.lot.lotNumber);
    expect(await form.getByLabel('Product').locator('option:checked').textContent()).toMatch(new RegExp(`^${alarm.characteristic.productCode} · `));
    expect(await form.getByLabel('Title').inputValue()).toBe(`${alarm.characteristic.code}: ${alarm.signal} — lot ${alarm.lot.lotNumber}`);
    await form.getByLabel('Description').fill('Raised from the alarm after the retained sample was tested again with the same result.');
    await form.getByLabel('Severity').selectOption('minor');
    // Left out of containment here, so the lot keeps its standing for the other suites.
    await form.getByLabel('Put these lots on hold now').uncheck();
    await form.getByRole('button', { name: 'Raise NCR' }).click();
    await page.waitForURL(/\/ncrs\/\d+$/);
    const linked = section(page, 'Linked alarms').locator(`li[data-alarm="${alarm.id}"]`);
    await linked.waitFor();
    expect(await linked.getByRole('link', { name: 'Chart at this point' }).getAttribute('href')).toBe(alarm.chartUrl);
    expect(await linked.getByRole('link', { name: `Alarm ${alarm.id}` }).getAttribute('href')).toBe(`/alarms/${alarm.id}`);
  });
});

describe('who may do what on an NCR', () => {
  it('lets a technician raise an NCR and attach files, with no assignee field and no manager buttons', async ({ page }) => {
    await signIn(page, 'technician', '/ncrs');
    await pageHeading(page, 'Nonconformance reports').waitFor();
    await page.getByRole('link', { name: 'Raise NCR' }).click();
    const form = page.getByRole('form', { name: 'Raise an NCR' });
    await form.getByLabel('Title').fill('Flow table found out of level at the start of the shift');
    await form.getByLabel('Description').fill('The flow table was 2 mm out of level; the last three flow results of the night shift are in doubt.');
    await form.getByLabel('Severity').selectOption('minor');
    expect(await form.getByLabel('Assignee').count()).toBe(0);
    await form.getByRole('button', { name: 'Raise NCR' }).click();
    await page.waitForURL(/\/ncrs\/\d+$/);
    await pageHeading(page, /Flow table found out of level/).waitFor();
    for (const name of ['Start the investigation', 'Record the root cause', 'Add an action', 'Approve', 'Record the effectiveness check', /^Edit title/]) {
      expect(await page.getByRole('button', { name }).count(), String(name)).toBe(0);
    }

    // A CSV attached: listed with its size and the SHA-256 of its bytes as node:crypto computes it (FIPS 180-4).
    const bytes = Buffer.from('lot,flow_mm\nL1-TEST-1,118\n');
    const attachments = section(page, 'Attachments');
    await attachments.getByLabel('File', { exact: true }).setInputFiles({ name: 'flow-table-check.csv', mimeType: 'text/csv', buffer: bytes });
    await attachments.getByLabel('Note (optional)').fill('Level readings before and after');
    await attachments.getByRole('button', { name: 'Attach' }).click();
    const row = attachments.locator('tr[data-attachment="flow-table-check.csv"]');
    await row.waitFor();
    expect(await row.locator('td').nth(1).textContent()).toBe(`${bytes.length} B`);
    expect(await row.locator('td').nth(3).textContent()).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(await row.getByRole('link', { name: 'flow-table-check.csv' }).getAttribute('download')).toBe('flow-table-check.csv');
    // A program is refused, and the page shows the server's reason.
    await attachments.getByLabel('File', { exact: true }).setInputFiles({ name: 'readings.csv', mimeType: 'text/csv', buffer: Buffer.concat([Buffer.from('MZ'), Buffer.alloc(200, 0x90)]) });
    await attachments.getByRole('button', { name: 'Attach' }).click();
    await attachments.getByRole('alert').getByText(/^readings\.csv is /).waitFor();
    expect(await attachments.locator('tbody tr').count()).toBe(1);
    await screenshot(page, 'ncr-technician');
  });

  it('shows an auditor the NCRs and every part of one, with nothing to change', async ({ page }) => {
    const lot = freeLots[2];
    const raised = await api<NcrView>('quality_manager', 'POST', '/api/v1/ncrs', {
      title: `Bag weight below declared on lot ${lot}`,
      description: 'Ten bags weighed 24.6 kg on average against 25 kg declared.',
      severity: 'major',
      lots: [{ lotNumber: lot }],
      holdLots: true,
    });
    await signIn(page, 'auditor', '/ncrs');
    await pageHeading(page, 'Nonconformance reports').waitFor();
    expect(await page.getByRole('link', { name: 'Raise NCR' }).count()).toBe(0);
    await page.getByRole('link', { name: raised.number }).click();
    await pageHeading(page, new RegExp(`^${raised.number}`)).waitFor();
    await section(page, 'Containment: lots concerned').locator(`tr[data-lot="${lot}"]`).getByText('On hold').waitFor();
    // The only button is Print; no form at all.
    expect(await page.locator('main button').allTextContents()).toEqual(['Print']);
    expect(await page.locator('main form').count()).toBe(0);
    await page.goto(`${baseUrl()}/ncrs/new`);
    await pageHeading(page, 'Not allowed for your role').waitFor();
  });

  it('shows the overdue NCR actions on the overview, each linked to its NCR', async ({ page }) => {
    const raised = await api<NcrView>('quality_manager', 'POST', '/api/v1/ncrs', {
      title: 'Curing room humidity log incomplete for a week',
      description: 'The humidity log of the curing room has no entries for the last seven days.',
      severity: 'minor',
    });
    const people = await api<{ items: { id: number; name: string }[] }>('quality_manager', 'GET', '/api/v1/people');
    const dueDay = new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/London' }).format(new Date(Date.now() - 3 * 86_400_000));
    const withAction = await api<NcrView>('quality_manager', 'POST', `/api/v1/ncrs/${raised.id}/actions`, {
      kind: 'corrective',
      description: 'Replace the humidity logger battery and download its memory',
      ownerId: people.items.find((p) => p.name === 'Demo Technician')!.id,
      dueDate: dueDay,
    });
    expect(withAction.actions[0].overdue).toBe(true);
    await signIn(page, 'quality_manager', '/');
    const due = page.getByTestId('ncr-actions-due');
    const item = due.locator(`li[data-action="${withAction.actions[0].id}"]`);
    await item.waitFor();
    expect(await item.getByText('Overdue').isVisible()).toBe(true);
    expect(await item.textContent()).toContain(`due ${plantDayText(-3)}`);
    await item.getByRole('link', { name: raised.number }).click();
    await page.waitForURL(`**/ncrs/${raised.id}`);
    await section(page, 'Corrective and preventive actions').getByText(`Overdue: was due ${plantDayText(-3)}`).waitFor();
  });
});
