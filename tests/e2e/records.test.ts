// Specifications, process events and corrections of stored readings in a real browser against the real
// server started by scripts/run-tests.ts: a quality manager revises a specification, a technician records
// an event and corrects a reading, and an auditor finds nothing to change.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import { and, eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { baseUrl, browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { isDemoCode } from '../support/catalogue';
import { createDatabase, type Database } from '@api/db/client';
import { auditEvents } from '@api/db/schema';

const it = browserTest();
let db: Database;
// Unique per run, so the suite can run again on the same database. The lot and the event lie in 2021,
// years before the demo history, so the charts other tests read stay as they are.
const stamp = Date.now().toString(36).toUpperCase();

beforeAll(() => {
  db = createDatabase(databaseUrl(), 1);
});

afterAll(async () => {
  await db?.$client.end();
});

/** Runs the page in a browser time zone other than the plant's, so that a page reading the browser's zone is caught. */
async function browserZone(page: Page, timezoneId: string) {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Emulation.setTimezoneOverride', { timezoneId });
}

/** An instant on the demo plant's clock (Europe/London) as dd/MM/yyyy HH:mm, written by Intl rather than the app's own code. */
function plantClockReference(iso: string): string {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit' }).formatToParts(new Date(iso));
  const get = (type: string) => parts.find((p) => p.type === type)!.value;
  return `${get('day')}/${get('month')}/${get('year')} ${get('hour')}:${get('minute')}`;
}

interface CharacteristicItem {
  id: number;
  code: string;
  spec: { revision: number; lsl: number | null; usl: number | null; target: number | null } | null;
}

async function characteristic(page: Page, code: string): Promise<CharacteristicItem> {
  const res = await page.request.get(`${baseUrl()}/api/v1/characteristics`);
  expect(res.status()).toBe(200);
  const found = ((await res.json()) as { items: CharacteristicItem[] }).items.find((c) => c.code === code);
  if (!found) throw new Error(`The demo seed has no characteristic ${code}`);
  return found;
}

async function revisionCount(page: Page, id: number): Promise<number> {
  const res = await page.request.get(`${baseUrl()}/api/v1/characteristics/${id}/spec-revisions`);
  return ((await res.json()) as { items: unknown[] }).items.length;
}

/** A one-row upload through the API as the signed-in user; returns the lot number. */
async function uploadOneReading(page: Page, code: string, product: string, line: string, value: string): Promise<string> {
  const lot = `REC-${stamp}-${code}`;
  const res = await page.request.post(`${baseUrl()}/api/v1/uploads`, {
    multipart: {
      file: {
        name: `records-${stamp}-${code}.csv`,
        mimeType: 'text/csv',
        buffer: Buffer.from(`lot,product,line,produced_at,characteristic,value,replicate\n${lot},${product},${line},2021-08-10T07:00,${code},${value},1\n`),
      },
    },
  });
  expect(res.status()).toBe(201);
  return lot;
}

describe('specifications', () => {
  it('lets a quality manager add a revision, refuses an inverted band and a back-dated one, and shows the new one in force', async ({ page }) => {
    await signIn(page, 'quality_manager', '/records');
    await pageHeading(page, 'Specifications').waitFor();
    expect(new URL(page.url()).pathname).toBe('/records/specifications');
    const air = await characteristic(page, 'HVR3-AIR');
    // The demo seed gives HV Patch R3 air content one revision: USL 6 %, target 4 % (api/db/seed/scenario.ts).
    expect(air.spec).toMatchObject({ revision: 1, lsl: null, usl: 6, target: 4 });
    const product = page.getByRole('region', { name: /HV Patch R3/ });
    expect(await product.getByRole('row', { name: /HVR3-AIR/ }).locator('td').allTextContents()).toEqual(['–', '4.0', '6.0', '%', '1', expect.stringMatching(/^\d\d\/\d\d\/\d{4} \d\d:\d\d$/)]);
    await screenshot(page, 'records-specifications');

    await product.getByRole('link', { name: 'HVR3-AIR' }).click();
    await pageHeading(page, /^HVR3-AIR · air content/).waitFor();
    await page.getByTestId('spec-in-force').getByText('USL 6.0 % (target 4.0)').waitFor();
    const form = page.getByRole('form', { name: 'Add a revision' });
    // The form starts from the latest limits.
    expect(await form.getByLabel('USL (%)').inputValue()).toBe('6');
    expect(await form.getByLabel('Target (%)').inputValue()).toBe('4');

    // An inverted band: the shared schema's message under the upper limit, and nothing sent.
    await form.getByLabel('LSL (%)').fill('7');
    await form.getByLabel('USL (%)').fill('6,2');
    await form.getByLabel('Reason').fill('Upper limit widened with the data sheet revision');
    await form.getByRole('button', { name: 'Save revision 2' }).click();
    await form.getByText('The lower limit must be below the upper limit').waitFor();
    expect(await form.getByLabel('USL (%)').getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'records-specification-inverted');
    expect(await revisionCount(page, air.id)).toBe(1);

    // One-sided, as air content usually is; the decimal comma is read as a decimal.
    await form.getByLabel('LSL (%)').fill('');
    await form.getByRole('button', { name: 'Save revision 2' }).click();
    await page.getByText(/Revision 2 saved, in force from .*The change and its reason are in the audit trail\./).waitFor();
    const history = page.getByRole('table', { name: 'Revision history' });
    const revisionRow = (n: number) => history.locator('tbody tr').filter({ has: page.getByRole('rowheader', { name: String(n), exact: true }) });
    await revisionRow(2).getByText('In force').waitFor();
    expect(await revisionRow(2).locator('td').allTextContents()).toEqual([
      'In force',
      '–',
      '4.0',
      '6.2',
      expect.stringMatching(/^\d\d\/\d\d\/\d{4} \d\d:\d\d$/),
      expect.stringMatching(/^Upper limit widened with the data sheet revisionDemo Quality Manager, \d\d\/\d\d\/\d{4} \d\d:\d\d$/),
    ]);
    expect(await revisionRow(1).getByText('Superseded').isVisible()).toBe(true);
    await page.getByTestId('spec-in-force').getByText('USL 6.2 % (target 4.0)').waitFor();
    expect((await characteristic(page, 'HVR3-AIR')).spec).toMatchObject({ revision: 2, lsl: null, usl: 6.2, target: 4 });
    await screenshot(page, 'records-specification-revised');

    // Revisions follow each other in time: the server's refusal lands under the date.
    await form.getByLabel('USL (%)').fill('6.3');
    // Typed in the plant's format (dd/mm/yyyy hh:mm); the browser's own date picker is not used.
    await form.getByLabel('Effective from (optional)').fill('2021-01-01 06:00');
    await form.getByRole('button', { name: 'Save revision 3' }).click();
    await form.getByText('Type the date and time as dd/mm/yyyy hh:mm, e.g. 30/11/2026 06:15').waitFor();
    await form.getByLabel('Effective from (optional)').fill('01/01/2021 06:00');
    await form.getByLabel('Reason').fill('Back-dated widening');
    await form.getByRole('button', { name: 'Save revision 3' }).click();
    await form.getByText(/^A new revision cannot take effect before revision 2/).waitFor();
    expect(await form.getByLabel('Effective from (optional)').getAttribute('aria-invalid')).toBe('true');
    expect(await revisionCount(page, air.id)).toBe(2);
  });
});

describe('process events', () => {
  it('shows and takes an event in plant time while the browser keeps another zone, the same hour the chart data gives', async ({ page }) => {
    // The browser runs on Pacific time, the demo plant on UK time (api/db/seed/scenario/plant.ts): eight
    // hours apart in June (IANA time zone database), so a page using the browser's zone would be caught.
    await browserZone(page, 'America/Los_Angeles');
    await signIn(page, 'technician', '/records/events');
    await pageHeading(page, 'Process events').waitFor();
    expect(await page.evaluate(() => Intl.DateTimeFormat().resolvedOptions().timeZone)).toBe('America/Los_Angeles');
    // The zone is named once, in the footer of every page; no time carries its own zone.
    expect(await page.getByTestId('plant-time-note').textContent()).toMatch(/^Times are plant time \(Europe\/London, (?:GMT|BST)\)\. Dates are written dd\/mm\/yyyy\.$/);
    expect(await page.getByText(/browser's time zone/i).count()).toBe(0);
    // The demo events are listed for everyone.
    await page.getByRole('row', { name: /New sand source/ }).waitFor();

    const title = `Sieve replaced ${stamp}`;
    const form = page.getByRole('form', { name: 'Record an event' });
    const when = form.getByLabel('When it happened');
    expect(await when.getAttribute('placeholder')).toBe('dd/mm/yyyy hh:mm');
    expect(await when.getAttribute('type')).toBe('text');
    // The field starts at the plant's time now, in the plant's format.
    expect(await when.inputValue()).toMatch(/^\d\d\/\d\d\/\d{4} \d\d:\d\d$/);
    // A browser-style ISO date is not the plant's format: the field says how to type it.
    await when.fill('2021-06-14T08:30');
    await form.getByLabel('Title').fill(title);
    await form.getByRole('button', { name: 'Record event' }).click();
    await form.getByText('Type the date and time as dd/mm/yyyy hh:mm, e.g. 30/11/2026 06:15').waitFor();
    expect(await when.getAttribute('aria-invalid')).toBe('true');

    await when.fill('14/06/2021 08:30');
    await form.getByLabel('Production line').selectOption('L2');
    // Only the products of the chosen line are offered.
    // (Of the demo plant's: a catalogue test running beside this one may have added a product to the line.)
    expect((await form.getByLabel('Product', { exact: true }).locator('option').allTextContents()).filter(isDemoCode)).toEqual(['Every product of the line', 'HVFX · HV Fix Flex', 'HVR3 · HV Patch R3']);
    await form.getByLabel('Product', { exact: true }).selectOption('HVR3');
    await form.getByLabel('Description (optional)').fill('Worn 2 mm control sieve of the Line 2 sand feed replaced.');
    await screenshot(page, 'records-event-form');
    await form.getByRole('button', { name: 'Record event' }).click();

    await page.getByText(`Recorded “${title}”, 14/06/2021 08:30. It appears as a marker on the control charts of HVR3.`).waitFor();
    const row = page.getByRole('row', { name: new RegExp(title) });
    expect(await row.locator('td').allTextContents()).toEqual(['14/06/2021 08:30', 'L2', 'HVR3', 'Demo Technician']);
    // UK summer time is UTC+1 in June (IANA time zone database): 08:30 at the plant is 07:30 UTC, whatever the browser's zone.
    const stored = (await (await page.request.get(`${baseUrl()}/api/v1/process-events?from=2021-06-14T00:00:00Z&to=2021-06-15T00:00:00Z`)).json()) as {
      items: { title: string; occurredAt: string; lineCode: string; productCode: string }[];
    };
    expect(stored.items.find((e) => e.title === title)).toMatchObject({ occurredAt: '2021-06-14T07:30:00.000Z', lineCode: 'L2', productCode: 'HVR3' });

    // The chart of an HVR3 characteristic carries the same event at the same instant; written on the
    // plant's clock by Intl (the platform's own zone data, not the app's date library) it is the hour the list shows.
    const air = await characteristic(page, 'HVR3-AIR');
    const chart = (await (await page.request.get(`${baseUrl()}/api/v1/characteristics/${air.id}/chart?from=2021-06-01T00:00:00Z&to=2021-06-30T00:00:00Z`)).json()) as {
      events: { title: string; occurredAt: string }[];
    };
    const onChart = chart.events.find((e) => e.title === title);
    expect(onChart).toBeDefined();
    expect(plantClockReference(onChart!.occurredAt)).toBe('14/06/2021 08:30');
    // The form is ready for the next event.
    expect(await form.getByLabel('Title').inputValue()).toBe('');
    await screenshot(page, 'records-events');

    // The period filter takes plant days as dd/mm/yyyy: one that ends the day before leaves the event out,
    // one that takes in the day brings it back.
    const from = page.getByLabel('From (optional)');
    const to = page.getByLabel('To (optional)');
    expect(await from.getAttribute('placeholder')).toBe('dd/mm/yyyy');
    await from.fill('01/06/2021');
    await to.fill('13/06/2021');
    await row.waitFor({ state: 'detached' });
    await to.fill('14/06/2021');
    await row.waitFor();
    expect(await page.getByRole('row', { name: /New sand source/ }).count()).toBe(0);
    // A day in another format is named under its field once the field is left.
    await to.fill('2021-06-14');
    await from.focus();
    await page.getByText('Type the date as dd/mm/yyyy, e.g. 30/11/2026').waitFor();
    expect(await to.getAttribute('aria-invalid')).toBe('true');
  });

  it('names a too-short title under its field and records nothing', async ({ page }) => {
    await signIn(page, 'technician', '/records/events');
    const form = page.getByRole('form', { name: 'Record an event' });
    await form.getByLabel('Title').fill('ab');
    await form.getByRole('button', { name: 'Record event' }).click();
    await form.getByText('Give a title of at least 3 characters').waitFor();
    expect(await form.getByLabel('Title').getAttribute('aria-invalid')).toBe('true');
  });
});

describe('corrections', () => {
  it('lets a technician correct a stored reading with a reason, from the keyboard, and keeps the old value in the audit trail', async ({ page }) => {
    await signIn(page, 'technician', '/results/history');
    await pageHeading(page, 'Upload history').waitFor();
    const lot = await uploadOneReading(page, 'HVR3-AIR', 'HVR3', 'L2', '4.1');
    await page.goto(`${baseUrl()}/results/lots/${lot}`);
    await pageHeading(page, `Lot ${lot}`).waitFor();

    const button = page.getByRole('button', { name: 'Correct reading 1 of HVR3-AIR…' });
    await button.focus();
    await page.keyboard.press('Enter');
    const dialog = page.getByRole('dialog', { name: 'Correct reading 1 of HVR3-AIR' });
    expect(await dialog.getByTestId('stored-value').textContent()).toBe('4.1 %');
    const value = dialog.getByLabel('Corrected value (%)');
    expect(await value.evaluate((el) => el === document.activeElement)).toBe(true);

    // The shared schema wants a reason of five characters or more.
    await page.keyboard.type('4,3');
    await dialog.getByLabel('Reason').fill('typo');
    await dialog.getByRole('button', { name: 'Save correction' }).click();
    await dialog.getByText('Give a reason of at least 5 characters').waitFor();

    // Air content is a share of the mortar's volume, so it cannot exceed 100 % (the possible range of the
    // method in shared/lab/test-methods.ts); the server's refusal lands under the value.
    await value.fill('120');
    await dialog.getByLabel('Reason').fill('Typing error: the instrument sheet reads 4.3');
    await dialog.getByRole('button', { name: 'Save correction' }).click();
    await dialog.getByText(/^120 % is outside the possible range 0–100 %/).waitFor();
    expect(await value.getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'records-correction-dialog');

    await value.fill('4,3');
    await dialog.getByRole('button', { name: 'Save correction' }).click();
    await page.getByText('Reading 1 of HVR3-AIR corrected from 4.1 to 4.3 %. The old value, your name and the reason are in the audit trail.').waitFor();
    expect(await dialog.count()).toBe(0);
    await page.getByRole('row', { name: /HVR3-AIR/ }).getByText('4.3 %').waitFor();
    await screenshot(page, 'records-correction-saved');

    const lotBody = (await (await page.request.get(`${baseUrl()}/api/v1/lots/${lot}`)).json()) as { results: { id: number; value: number }[] };
    expect(lotBody.results.map((r) => r.value)).toEqual([4.3]);
    const [audit] = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.action, 'correct'), eq(auditEvents.entity, 'measurement'), eq(auditEvents.entityId, String(lotBody.results[0].id))));
    expect(audit).toMatchObject({ before: { value: 4.1 }, after: { value: 4.3 }, reason: 'Typing error: the instrument sheet reads 4.3' });
  });
});

describe('auditor', () => {
  it('reads specifications, events and lots with no control to change them, and the server refuses a change', async ({ page }) => {
    await signIn(page, 'technician', '/results/history');
    await pageHeading(page, 'Upload history').waitFor();
    const lot = await uploadOneReading(page, 'HVR3-DENS', 'HVR3', 'L2', '2081');
    await page.context().clearCookies();

    await signIn(page, 'auditor', '/results/history');
    await pageHeading(page, 'Upload history').waitFor();
    await page.getByRole('navigation', { name: 'Main menu' }).getByRole('link', { name: 'Specifications & events' }).click();
    await pageHeading(page, 'Specifications').waitFor();
    await page.getByRole('link', { name: 'HVR3-AIR' }).click();
    await page.getByRole('table', { name: 'Revision history' }).waitFor();
    expect(await page.getByRole('form', { name: 'Add a revision' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /Save revision/ }).count()).toBe(0);
    await screenshot(page, 'records-specification-auditor');

    const areaTabs = page.getByRole('navigation', { name: 'Specification and event pages' });
    await areaTabs.getByRole('link', { name: 'Process events' }).click();
    await pageHeading(page, 'Process events').waitFor();
    expect(await areaTabs.getByRole('link', { name: 'Process events' }).getAttribute('aria-current')).toBe('page');
    expect(await areaTabs.getByRole('link', { name: 'Specifications' }).getAttribute('aria-current')).toBeNull();
    await page.getByRole('row', { name: /New sand source/ }).waitFor();
    expect(await page.getByRole('form', { name: 'Record an event' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Record event' }).count()).toBe(0);
    await screenshot(page, 'records-events-auditor');

    await page.goto(`${baseUrl()}/results/lots/${lot}`);
    await pageHeading(page, `Lot ${lot}`).waitFor();
    // Fresh density reads to no decimals, thousands grouped (shared/figures.ts).
    expect(await page.getByRole('row', { name: /HVR3-DENS/ }).textContent()).toContain('2,081 kg/m³');
    expect(await page.getByRole('button', { name: /Correct/ }).count()).toBe(0);

    // The hidden controls are not the only guard: the API answers 403 to the auditor itself.
    const { results } = (await (await page.request.get(`${baseUrl()}/api/v1/lots/${lot}`)).json()) as { results: { id: number }[] };
    const refused = await page.request.patch(`${baseUrl()}/api/v1/measurements/${results[0].id}`, { data: { value: 2000, reason: 'Auditor trying a change' } });
    expect(refused.status()).toBe(403);
    const events = await page.request.post(`${baseUrl()}/api/v1/process-events`, { data: { occurredAt: '2021-06-14T08:30:00+02:00', title: 'Auditor note' } });
    expect(events.status()).toBe(403);
  });
});
