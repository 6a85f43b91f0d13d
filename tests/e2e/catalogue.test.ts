// The administrator's catalogue in a real browser against the real server started by
// scripts/run-tests.ts: a line, a product on it and a characteristic of that product are added,
// listed and deactivated; other roles cannot reach the page.
import { afterAll, beforeAll, describe, expect } from 'vitest';
import { and, desc, eq } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { baseUrl, browserTest, pageHeading, screenshot, signIn } from '../support/browser';
import { databaseUrl } from '../support/api';
import { removeCatalogueRecords, testCodePrefix } from '../support/catalogue';
import { createDatabase, type Database } from '@api/db/client';
import { auditEvents } from '@api/db/schema';

const it = browserTest();
const prefix = testCodePrefix('E');
let db: Database;

beforeAll(() => {
  db = createDatabase(databaseUrl(), 1);
});

afterAll(async () => {
  await removeCatalogueRecords(db, prefix);
  await db?.$client.end();
});

const mainMenu = (page: Page) => page.getByRole('navigation', { name: 'Main menu' });
const tabs = (page: Page) => page.getByRole('navigation', { name: 'Catalogue pages' });

interface Listed {
  id: number;
  code: string;
  active: boolean;
  unit: string;
  spec: { revision: number; lsl: number | null } | null;
}

async function listed(page: Page, path: string, code: string): Promise<Listed | undefined> {
  const res = await page.request.get(`${baseUrl()}/api/v1/${path}`);
  expect(res.status()).toBe(200);
  return ((await res.json()) as { items: Listed[] }).items.find((item) => item.code === code);
}

describe('products, lines and characteristics', () => {
  it('lets the administrator add a line, a product and a characteristic, list it and deactivate it', async ({ page }) => {
    const lineCode = `${prefix}L`;
    const productCode = `${prefix}P`;
    const characteristicCode = `${productCode}-RC28`;

    await signIn(page, 'admin', '/admin/catalogue');
    await pageHeading(page, 'Characteristics').waitFor();
    expect(new URL(page.url()).pathname).toBe('/admin/catalogue/characteristics');
    expect(await tabs(page).getByRole('link', { name: 'Characteristics' }).getAttribute('aria-current')).toBe('page');
    // The demo plant's characteristics are listed, each with its specification in force (api/db/seed/scenario.ts).
    await page.getByRole('row', { name: /HVL25-RC28/ }).getByText('LSL 25.0 MPa').waitFor();

    // A line: the code is typed in lower case and stored in upper case.
    await tabs(page).getByRole('link', { name: 'Production lines' }).click();
    await pageHeading(page, 'Production lines').waitFor();
    await page.getByRole('button', { name: 'Add a line' }).click();
    const lineForm = page.getByRole('form', { name: 'Add a line' });
    await lineForm.getByLabel('Code').fill(lineCode.toLowerCase());
    await lineForm.getByLabel('Name').fill('Line 3 · renders');
    await lineForm.getByRole('button', { name: 'Add line' }).click();
    await page.getByText(`Line ${lineCode} added.`).waitFor();
    const lineRow = page.getByRole('row', { name: new RegExp(lineCode) });
    expect(await lineRow.locator('td').allTextContents()).toEqual([lineCode, 'Line 3 · renders', '–', 'Active', 'EditDeactivate']);
    await screenshot(page, 'catalogue-lines');
    // Deactivating asks first, as for products; reactivating brings the line back for the product below.
    await lineRow.getByRole('button', { name: `Deactivate ${lineCode}` }).click();
    await page.getByRole('dialog', { name: `Deactivate ${lineCode}?` }).getByRole('button', { name: 'Deactivate' }).click();
    await page.getByText(`${lineCode} is deactivated: uploads and manual entry refuse results on it.`).waitFor();
    expect(await lineRow.locator('td').nth(3).textContent()).toBe('Deactivated');
    // A deactivated line is not offered for a new product.
    await tabs(page).getByRole('link', { name: 'Products' }).click();
    await page.getByRole('button', { name: 'Add a product' }).click();
    const offered = await page.getByRole('form', { name: 'Add a product' }).getByLabel('Production line').locator('option').allTextContents();
    expect(offered.some((o) => o.startsWith('L1'))).toBe(true);
    expect(offered.some((o) => o.startsWith(lineCode))).toBe(false);
    await tabs(page).getByRole('link', { name: 'Production lines' }).click();
    await pageHeading(page, 'Production lines').waitFor();
    await lineRow.getByRole('button', { name: `Reactivate ${lineCode}` }).click();
    await page.getByRole('dialog', { name: `Reactivate ${lineCode}?` }).getByRole('button', { name: 'Reactivate' }).click();
    await page.getByText(`${lineCode} is active again.`).waitFor();

    // A product on it. EN 13813 has no compressive class C27 (from memory of its Table 2), so the form refuses it before sending.
    await tabs(page).getByRole('link', { name: 'Products' }).click();
    await pageHeading(page, 'Products').waitFor();
    await page.getByRole('button', { name: 'Add a product' }).click();
    const productForm = page.getByRole('form', { name: 'Add a product' });
    await productForm.getByLabel('Code').fill(productCode);
    await productForm.getByLabel('Name').fill('HV Level 30 Rapid');
    await productForm.getByLabel('Family').fill('levelling');
    await productForm.getByLabel('Declared class (optional)').fill('CT-C27-F7');
    await productForm.getByLabel('Production line').selectOption(lineCode);
    await productForm.getByRole('button', { name: 'Add product' }).click();
    await productForm.getByText('C27 is not a compressive class of EN 13813; write it like CT-C25-F6').waitFor();
    await screenshot(page, 'catalogue-product-refused');
    await productForm.getByLabel('Declared class (optional)').fill('ct-c30-f7');
    await productForm.getByRole('button', { name: 'Add product' }).click();
    await page.getByText(`${productCode} added. Add its characteristics next.`).waitFor();
    const productRow = page.getByRole('row', { name: new RegExp(productCode) });
    expect(await productRow.locator('td').allTextContents()).toEqual([`${productCode}HV Level 30 Rapid`, 'levelling', 'CT-C30-F7', `${lineCode}Line 3 · renders`, 'Active', 'EditDeactivate']);
    await screenshot(page, 'catalogue-products');

    // A characteristic of it: code, name, unit and chart follow the choices until typed over.
    await tabs(page).getByRole('link', { name: 'Characteristics' }).click();
    await pageHeading(page, 'Characteristics').waitFor();
    await page.getByRole('button', { name: 'Add a characteristic' }).click();
    const form = page.getByRole('form', { name: 'Add a characteristic' });
    await form.getByLabel('Product').selectOption(productCode);
    await form.getByLabel('Test method').selectOption('RC');
    await form.getByLabel('Age at test (days)').fill('28');
    // EN 196-1 gives compressive strength in MPa; a set of three prisms gives six halves to crush.
    await form.getByLabel('Subgroup size').fill('6');
    expect(await form.getByLabel('Code').inputValue()).toBe(characteristicCode);
    expect(await form.getByLabel('Name').inputValue()).toBe('HV Level 30 Rapid · compressive strength · 28 d');
    expect(await form.getByLabel('Unit').inputValue()).toBe('MPa');
    expect(await form.getByLabel('Control chart').inputValue()).toBe('xbar-r');

    // An individuals chart takes one reading per lot (common practice): refused under the field, nothing sent.
    await form.getByLabel('Control chart').selectOption('imr');
    // EN 13813 class C30 declares 30 MPa compressive strength at 28 days: the lower limit.
    await form.getByLabel('LSL (MPa)').fill('30');
    await form.getByLabel('Reason').fill('Lower limit from the declared class C30');
    await form.getByRole('button', { name: 'Add characteristic' }).click();
    await form.getByText('An individuals chart takes one reading per lot: set the subgroup size to 1, or choose X̄–R or X̄–S').waitFor();
    expect(await form.getByLabel('Control chart').getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'catalogue-characteristic-refused');
    expect(await listed(page, 'characteristics', characteristicCode)).toBeUndefined();

    await form.getByLabel('Control chart').selectOption('xbar-r');
    await form.getByLabel('Sampling plan (optional)').fill('First lot of each shift; a set of three prisms');
    await form.getByRole('button', { name: 'Add characteristic' }).click();
    await page.getByText(`${characteristicCode} added. Specification revision 1 is in force.`).waitFor();
    const stored = await listed(page, 'characteristics', characteristicCode);
    expect(stored).toMatchObject({ unit: 'MPa', active: true, spec: { revision: 1, lsl: 30 } });

    // Listed with its chart and specification, found by the filter.
    await page.getByLabel('Filter').fill(productCode);
    await page.getByText(/^1 of \d+ characteristics$/).waitFor();
    const row = page.getByRole('row', { name: new RegExp(characteristicCode) });
    expect(await row.locator('td').allTextContents()).toEqual([
      `${characteristicCode}${productCode} · compressive strength · 28 d`,
      'Compressive strength · 28 dMPa',
      '6',
      'X̄–RWestern Electric',
      'LSL 30.0 MParevision 1',
      'Active',
      'EditDeactivate',
    ]);
    await screenshot(page, 'catalogue-characteristics');

    // Deactivated, never deleted: the row stays, marked, and the audit trail says who did it.
    await row.getByRole('button', { name: `Deactivate ${characteristicCode}` }).click();
    const dialog = page.getByRole('dialog', { name: `Deactivate ${characteristicCode}?` });
    await screenshot(page, 'catalogue-deactivate-dialog');
    await dialog.getByRole('button', { name: 'Deactivate' }).click();
    await row.getByText('Deactivated').waitFor();
    await page.getByText(`${characteristicCode} is deactivated: uploads refuse it and the SPC run leaves it out. Its results and charts stay.`).waitFor();
    expect(await row.getByRole('button', { name: `Reactivate ${characteristicCode}` }).isVisible()).toBe(true);
    expect((await listed(page, 'characteristics', characteristicCode))?.active).toBe(false);
    const trail = await db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'characteristic'), eq(auditEvents.entityId, String(stored!.id)))).orderBy(auditEvents.id);
    expect(trail.map((e) => e.action)).toEqual(['create', 'revise specification', 'deactivate']);
    await screenshot(page, 'catalogue-deactivated');

    // Editing shows its settings; its specification has its own page.
    await row.getByRole('button', { name: `Edit ${characteristicCode}` }).click();
    const edit = page.getByRole('form', { name: `Change characteristic ${characteristicCode}` });
    expect(await edit.getByLabel('Subgroup size').inputValue()).toBe('6');
    expect(await edit.getByLabel('Sampling plan (optional)').inputValue()).toBe('First lot of each shift; a set of three prisms');
    await screenshot(page, 'catalogue-characteristic-edit');
    await edit.getByRole('link', { name: `Specification revisions of ${characteristicCode}` }).click();
    await pageHeading(page, new RegExp(`^${characteristicCode}`)).waitFor();
    await page.getByTestId('spec-in-force').getByText('LSL 30.0 MPa').waitFor();
  });

  it('shows what stays fixed on a characteristic that has results, and offers what may change', async ({ page }) => {
    await signIn(page, 'admin', '/admin/catalogue/characteristics');
    await pageHeading(page, 'Characteristics').waitFor();
    // The demo history holds flow results of HV Level 25 (api/db/seed/scenario.ts).
    await page.getByRole('button', { name: 'Edit HVL25-FLOW', exact: true }).click();
    const edit = page.getByRole('form', { name: 'Change characteristic HVL25-FLOW' });
    await edit.getByTestId('fixed-identity').getByText('Results are recorded under this code').waitFor();
    expect(await edit.getByLabel('Code').count()).toBe(0);
    expect(await edit.getByLabel('Test method').count()).toBe(0);
    expect(await edit.getByLabel('Subgroup size').inputValue()).toBe('2');
    expect(await edit.getByLabel('Run rules').inputValue()).toBe('extended');
    await screenshot(page, 'catalogue-characteristic-fixed');
    // Saved unchanged, the settings not offered travel as they are: the server finds nothing to change.
    await edit.getByRole('button', { name: 'Save changes' }).click();
    await page.getByText('HVL25-FLOW saved.').waitFor();
    expect(await edit.count()).toBe(0);
    expect(await listed(page, 'characteristics', 'HVL25-FLOW')).toMatchObject({ active: true, unit: 'mm' });
  });

  it('keeps the catalogue from a quality manager, in the menu, by address and at the API', async ({ page }) => {
    await signIn(page, 'quality_manager', '/admin/catalogue/characteristics');
    await pageHeading(page, 'Not allowed for your role').waitFor();
    expect(await mainMenu(page).getByRole('link', { name: 'Products, lines & characteristics' }).count()).toBe(0);
    await screenshot(page, 'catalogue-not-allowed');
    const res = await page.request.post(`${baseUrl()}/api/v1/lines`, { data: { code: `${prefix}Q`, name: 'Line of a manager' } });
    expect(res.status()).toBe(403);
  });
});

describe('plant settings', () => {
  interface PlantItem {
    id: number;
    timeZone: string;
    dateFormat: string;
  }
  const demoPlant = async (page: Page): Promise<PlantItem> => ((await (await page.request.get(`${baseUrl()}/api/v1/plants`)).json()) as { items: PlantItem[] }).items[0];

  it('lets the administrator choose the date format, which every page then shows and takes, with the zone shown read-only', async ({ page }) => {
    await signIn(page, 'admin', '/admin/plant');
    await pageHeading(page, 'Plant settings').waitFor();
    const plant = await demoPlant(page);
    expect(plant.dateFormat).toBe('dd/MM/yyyy');
    try {
      await page.getByText('Europe/London', { exact: true }).waitFor();
      const form = page.getByRole('form', { name: /^Date format of/ });
      // Each choice shows 30 November 2026 written its way.
      expect(await form.getByLabel('Date format').locator('option').allTextContents()).toEqual([
        'dd/mm/yyyy — 30/11/2026',
        'dd.mm.yyyy — 30.11.2026',
        'yyyy-mm-dd — 2026-11-30',
        'mm/dd/yyyy — 11/30/2026',
      ]);
      await form.getByLabel('Date format').selectOption('yyyy-MM-dd');
      await form.getByRole('button', { name: 'Save date format' }).click();
      await page.getByText('Dates are now written yyyy-mm-dd, e.g. 2026-11-30. The change is in the audit trail.').waitFor();
      await screenshot(page, 'catalogue-plant-settings');
      expect((await demoPlant(page)).dateFormat).toBe('yyyy-MM-dd');
      await page.getByTestId('plant-time-note').getByText(/Dates are written yyyy-mm-dd\.$/).waitFor();
      const [audit] = await db
        .select()
        .from(auditEvents)
        .where(and(eq(auditEvents.entity, 'plant'), eq(auditEvents.entityId, String(plant.id))))
        .orderBy(desc(auditEvents.id))
        .limit(1);
      expect(audit).toMatchObject({ action: 'update', before: { dateFormat: 'dd/MM/yyyy' }, after: { dateFormat: 'yyyy-MM-dd' } });

      // The period filter of the process events now asks for and reads yyyy-mm-dd.
      await mainMenu(page).getByRole('link', { name: 'Specifications & events' }).click();
      await page.getByRole('navigation', { name: 'Specification and event pages' }).getByRole('link', { name: 'Process events' }).click();
      await pageHeading(page, 'Process events').waitFor();
      expect(await page.getByLabel('From (optional)').getAttribute('placeholder')).toBe('yyyy-mm-dd');
      expect(await page.getByLabel('When it happened').inputValue()).toMatch(/^\d{4}-\d\d-\d\d \d\d:\d\d$/);
    } finally {
      // The other browser tests expect the demo plant's own format.
      const restored = await page.request.patch(`${baseUrl()}/api/v1/plants/${plant.id}`, { data: { dateFormat: 'dd/MM/yyyy' } });
      expect(restored.status()).toBe(200);
    }
  });

  it('keeps the plant settings from a quality manager, in the menu and at the API', async ({ page }) => {
    await signIn(page, 'quality_manager', '/admin/plant');
    await pageHeading(page, 'Not allowed for your role').waitFor();
    expect(await mainMenu(page).getByRole('link', { name: 'Plant settings' }).count()).toBe(0);
    const plant = await demoPlant(page);
    const res = await page.request.patch(`${baseUrl()}/api/v1/plants/${plant.id}`, { data: { dateFormat: 'yyyy-MM-dd' } });
    expect(res.status()).toBe(403);
  });
});
