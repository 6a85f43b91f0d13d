// The web app shell in a real browser against the real server started by scripts/run-tests.ts:
// sign-in, the role-aware menu and route guards, user administration, sign-out and not-found.
import { describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { baseUrl, browserTest, demoEmailOf, pageHeading, screenshot, signIn, submitSignIn } from '../support/browser';

const it = browserTest();

const mainMenu = (page: Page) => page.getByRole('navigation', { name: 'Main menu' });

describe('web app shell', () => {
  it('shows the server’s reason when the password is wrong and stays on sign-in', async ({ page }) => {
    await page.goto(`${baseUrl()}/`);
    await page.waitForURL('**/sign-in');
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await screenshot(page, 'shell-sign-in');

    await submitSignIn(page, demoEmailOf('admin'), 'not-the-password');
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toContain('Wrong e-mail or password');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
  });

  it('checks the form before asking the server', async ({ page }) => {
    await page.goto(`${baseUrl()}/sign-in`);
    await submitSignIn(page, 'not-an-address', '');
    await page.getByText('Enter a valid e-mail address').waitFor();
    await page.getByText('Password is required').waitFor();
  });

  it('lets the administrator add a user, change the role and deactivate it', async ({ page }) => {
    await signIn(page, 'admin');
    await pageHeading(page, 'Plant overview').waitFor();
    expect(await page.getByTestId('user-role').textContent()).toBe('Administrator');
    expect(await mainMenu(page).getByText('Administration').isVisible()).toBe(true);
    await screenshot(page, 'shell-layout-admin');

    await mainMenu(page).getByRole('link', { name: 'Users' }).click();
    await pageHeading(page, 'Users').waitFor();
    await page.getByRole('row').filter({ hasText: demoEmailOf('technician') }).waitFor();

    const stamp = Date.now().toString(36);
    const email = `tester.${stamp}@harrowvale.example`;
    const name = `Shift Tester ${stamp}`;
    const form = page.getByRole('form', { name: 'Add a user' });
    const addUser = async (userEmail: string) => {
      await page.getByRole('button', { name: 'Add a user' }).click();
      await form.getByLabel('Full name').fill(name);
      await form.getByLabel('E-mail').fill(userEmail);
      await form.getByLabel('Role').selectOption('technician');
      await form.getByLabel('First password').fill('first-shift-2024');
      await form.getByRole('button', { name: 'Add user' }).click();
    };

    // The form checks with the shared schema before anything is sent.
    await page.getByRole('button', { name: 'Add a user' }).click();
    await form.getByLabel('First password').fill('short');
    await form.getByRole('button', { name: 'Add user' }).click();
    await form.getByText('Use at least 10 characters for a password').waitFor();
    await form.getByRole('button', { name: 'Cancel' }).click();

    await addUser(email);
    const row = page.getByRole('row').filter({ hasText: email });
    await row.waitFor();
    expect(await row.textContent()).toContain('QC technician');
    expect(await row.textContent()).toContain('Active');

    // The same address again: the server's 409 lands under the e-mail field.
    await addUser(email.toUpperCase());
    await form.getByText(`A user with e-mail ${email} already exists`).waitFor();
    await screenshot(page, 'shell-users-add');
    await form.getByRole('button', { name: 'Cancel' }).click();

    await row.getByLabel(`Role of ${name}`).selectOption('quality_manager');
    await page.getByText(`${name} is now Quality manager.`).waitFor();
    expect(await row.getByLabel(`Role of ${name}`).inputValue()).toBe('quality_manager');

    await row.getByRole('button', { name: 'Deactivate' }).click();
    const dialog = page.getByRole('dialog', { name: `Deactivate ${name}?` });
    await dialog.getByRole('button', { name: 'Deactivate' }).click();
    await row.getByText('Deactivated').waitFor();
    expect(await row.getByRole('button', { name: 'Reactivate' }).isVisible()).toBe(true);

    // The filter narrows the list to the new user.
    await page.getByLabel('Filter').fill(`tester.${stamp}`);
    await page.getByText(/^1 of \d+ users$/).waitFor();
    await screenshot(page, 'shell-users');

    // What the screen shows is what the server stored: the deactivated user cannot sign in.
    const attempt = await page.request.post(`${baseUrl()}/api/v1/auth/login`, { data: { email, password: 'first-shift-2024' } });
    expect(attempt.status()).toBe(401);
  });

  it('sorts the user list by a column header', async ({ page }) => {
    await signIn(page, 'admin', '/admin/users');
    await pageHeading(page, 'Users').waitFor();
    const nameHeader = page.getByRole('columnheader', { name: 'Name and e-mail' });
    const firstName = () => page.locator('tbody tr').first().locator('td span').first().textContent();

    expect(await nameHeader.getAttribute('aria-sort')).toBe('ascending');
    const ascendingFirst = await firstName();
    await nameHeader.getByRole('button').click();
    expect(await nameHeader.getAttribute('aria-sort')).toBe('descending');
    const descendingFirst = await firstName();
    expect(descendingFirst).not.toBe(ascendingFirst);
    expect(descendingFirst!.localeCompare(ascendingFirst!)).toBeGreaterThan(0);
  });

  it('keeps administration from a technician, in the menu and by address', async ({ page }) => {
    await signIn(page, 'technician', '/charts');

    // Back on the page asked for before signing in.
    await pageHeading(page, 'Control charts').waitFor();
    expect(new URL(page.url()).pathname).toBe('/charts');
    const labels = await mainMenu(page).getByRole('link').allTextContents();
    // Alarms and NCRs are read by every role (alarm.read, ncr.read); only managers act on them.
    expect(labels).toEqual(['Plant overview', 'Control charts', 'Results & uploads', 'Test methods', 'Specifications & events', 'Alarms', 'SPC runs', 'Nonconformance reports', 'Alerts by e-mail']);

    await page.goto(`${baseUrl()}/admin/users`);
    await pageHeading(page, 'Not allowed for your role').waitFor();
    expect(await page.getByText('QC technician', { exact: true }).first().isVisible()).toBe(true);
    await screenshot(page, 'shell-not-allowed');
  });

  it('shows not-found inside the layout, and sign-out returns to sign-in for good', async ({ page }) => {
    await signIn(page, 'auditor', '/no-such-page');
    await pageHeading(page, 'Page not found').waitFor();
    expect(await page.getByText('/no-such-page').isVisible()).toBe(true);
    const labels = await mainMenu(page).getByRole('link').allTextContents();
    expect(labels).toEqual(['Plant overview', 'Control charts', 'Results & uploads', 'Test methods', 'Specifications & events', 'Alarms', 'SPC runs', 'Nonconformance reports', 'Capability reports', 'Audit trail', 'Alerts by e-mail']);

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL('**/sign-in');
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();

    // The server forgot the session too: a reload does not sign back in.
    await page.goto(`${baseUrl()}/`);
    await page.waitForURL('**/sign-in');
    const me = await page.request.get(`${baseUrl()}/api/v1/auth/me`);
    expect(me.status()).toBe(401);
  });

  it('folds the menu behind a button on a narrow screen', async ({ page }) => {
    // The page is the test's own, so its narrow size ends with it.
    await page.setViewportSize({ width: 768, height: 1024 });
    await signIn(page, 'quality_manager');
    await pageHeading(page, 'Plant overview').waitFor();
    expect(await mainMenu(page).count()).toBe(0);

    await page.getByRole('button', { name: 'Menu' }).click();
    await mainMenu(page).getByRole('link', { name: 'Alerts by e-mail' }).click();
    await pageHeading(page, 'Alerts by e-mail').waitFor();
    // Choosing a page closes the menu again.
    expect(await mainMenu(page).count()).toBe(0);
    await page.getByRole('button', { name: 'Menu' }).click();
    await screenshot(page, 'shell-narrow-menu');
    expect(await mainMenu(page).getByRole('link').allTextContents()).not.toContain('Users');
  });
});

describe('lot search in the header', () => {
  /** The newest lot of the demo plant, as the API lists it. */
  async function newestLot(page: Page): Promise<{ lotNumber: string; productCode: string }> {
    const res = await page.request.get(`${baseUrl()}/api/v1/lots?limit=1`);
    expect(res.status()).toBe(200);
    return ((await res.json()) as { items: { lotNumber: string; productCode: string }[] }).items[0];
  }

  it('lets an auditor open a lot from the start of its number typed in lower case, or the whole number and Enter', async ({ page }) => {
    await signIn(page, 'auditor');
    await pageHeading(page, 'Plant overview').waitFor();
    const lot = await newestLot(page);
    const search = page.getByRole('combobox', { name: 'Find a lot' });

    // The start of a number suggests the lots that begin with it, at most eight (LOT_SUGGESTIONS).
    await search.fill(lot.lotNumber.slice(0, -1).toLowerCase());
    const suggestions = page.getByRole('listbox', { name: 'Lots found' }).getByRole('option');
    await suggestions.filter({ hasText: lot.lotNumber }).waitFor();
    expect(await suggestions.count()).toBeLessThanOrEqual(8);
    for (const text of await suggestions.allTextContents()) expect(text.toUpperCase().startsWith(lot.lotNumber.slice(0, -1).toUpperCase())).toBe(true);
    await screenshot(page, 'shell-lot-search');
    await suggestions.filter({ hasText: lot.lotNumber }).click();
    await pageHeading(page, `Lot ${lot.lotNumber}`).waitFor();
    expect(new URL(page.url()).pathname).toBe(`/results/lots/${encodeURIComponent(lot.lotNumber)}`);
    // The box is emptied for the next search.
    expect(await search.inputValue()).toBe('');

    // From another page, the whole number and Enter open the lot without picking.
    await page.getByRole('navigation', { name: 'Main menu' }).getByRole('link', { name: 'Specifications & events' }).click();
    await pageHeading(page, 'Specifications').waitFor();
    await search.fill(lot.lotNumber);
    await page.getByRole('option', { name: new RegExp(lot.lotNumber) }).first().waitFor();
    await search.press('Enter');
    await pageHeading(page, `Lot ${lot.lotNumber}`).waitFor();
  });

  it('says plainly when no lot has that number, and moves through suggestions by keyboard', async ({ page }) => {
    await signIn(page, 'technician');
    await pageHeading(page, 'Plant overview').waitFor();
    const search = page.getByRole('combobox', { name: 'Find a lot' });
    await search.fill('NO-SUCH-LOT-42');
    await page.getByRole('status').filter({ hasText: 'No lot called “NO-SUCH-LOT-42”.' }).waitFor();
    await search.press('Enter');
    expect(new URL(page.url()).pathname).toBe('/');

    const lot = await newestLot(page);
    await search.fill(lot.lotNumber.slice(0, 2));
    const first = page.getByRole('listbox', { name: 'Lots found' }).getByRole('option').first();
    await first.waitFor();
    const firstNumber = (await first.locator('span').first().textContent())!;
    await search.press('ArrowDown');
    expect(await first.getAttribute('aria-selected')).toBe('true');
    expect(await search.getAttribute('aria-activedescendant')).toBe(await first.getAttribute('id'));
    await search.press('Enter');
    await pageHeading(page, `Lot ${firstNumber}`).waitFor();
  });

  it('keeps the header, the search and the records pages on screen on a tablet (800 × 1280)', async ({ page }) => {
    await page.setViewportSize({ width: 800, height: 1280 });
    await signIn(page, 'quality_manager', '/records/events');
    await pageHeading(page, 'Process events').waitFor();
    for (const path of ['/records/events', '/records/specifications', '/spc-runs']) {
      await page.goto(`${baseUrl()}${path}`);
      await page.getByRole('heading', { level: 1 }).waitFor();
      await page.getByTestId('plant-time-note').waitFor();
      // Nothing wider than the screen: no sideways scrolling of the whole page.
      expect(await page.evaluate(() => document.documentElement.scrollWidth), path).toBeLessThanOrEqual(800);
      // Nor a table that hides a column behind its own sideways scroll.
      const hidden = await page.evaluate(() =>
        [...document.querySelectorAll('main table')].filter((table) => table.parentElement!.scrollWidth > table.parentElement!.clientWidth + 1).map((table) => table.querySelector('caption')?.textContent ?? 'a table'),
      );
      expect(hidden, path).toEqual([]);
      const box = await page.getByRole('combobox', { name: 'Find a lot' }).boundingBox();
      expect(box, path).not.toBeNull();
      expect(box!.x + box!.width, path).toBeLessThanOrEqual(800);
      const signOut = await page.getByRole('button', { name: 'Sign out' }).boundingBox();
      expect(signOut!.x + signOut!.width, path).toBeLessThanOrEqual(800);
    }
    await page.goto(`${baseUrl()}/records/events`);
    await pageHeading(page, 'Process events').waitFor();
    await screenshot(page, 'shell-tablet-events');
  });
});
