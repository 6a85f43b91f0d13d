// Entering results in a real browser against the real server started by scripts/run-tests.ts: CSV upload
// with preview, browser-side checks and the server's answers; one lot typed in with press loads; the
// upload history and test methods as an auditor sees them.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect } from 'vitest';
import type { Page } from 'playwright-core';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { baseUrl, browserTest, pageHeading, screenshot, signIn } from '../support/browser';

const it = browserTest();
const files = mkdtempSync(join(tmpdir(), 'prismline-results-'));
// Lot numbers unique to this run, so the suite can run again on the same database. Production dates
// lie in 2021, years before the demo history, so these lots stay out of the charts other tests read
// (one lot entered by hand is the exception: it needs a specification in force, see there).
const stamp = Date.now().toString(36).toUpperCase();
let lotCounter = 0;
const newLot = () => `E2E-${stamp}-${++lotCounter}`;
// The demo plant's clock (api/db/seed/scenario/plant.ts: Europe/London, the default date format dd/MM/yyyy).
const plantClock: PlantClock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' };
/** An instant as a technician types it on the plant's clock, e.g. "02/11/2021 06:20". */
const typed = (instant: Date | string) => formatPlantDateTime(instant, plantClock);

/** Whether the page scrolls sideways, and the actions that lie beyond the right edge of the window. */
async function offScreen(page: Page, actions: string[]) {
  const scrollsSideways = await page.evaluate(() => document.documentElement.scrollWidth > document.documentElement.clientWidth);
  const width = page.viewportSize()!.width;
  const beyond: string[] = [];
  for (const name of actions) {
    const box = await page.getByRole('button', { name, exact: true }).or(page.getByRole('link', { name, exact: true })).first().boundingBox();
    if (!box || box.x < 0 || box.x + box.width > width) beyond.push(name);
  }
  return { scrollsSideways, beyond };
}

function csvFile(name: string, text: string): string {
  const path = join(files, name);
  writeFileSync(path, text);
  return path;
}

async function chooseFile(page: Page, path: string) {
  await page.locator('input[type="file"]').setInputFiles(path);
}

/** The stored results of a lot, by characteristic code, as the API gives them to any role. */
async function storedValues(page: Page, lot: string): Promise<Record<string, number[]> | null> {
  const res = await page.request.get(`${baseUrl()}/api/v1/lots/${lot}`);
  if (res.status() === 404) return null;
  expect(res.status()).toBe(200);
  const body = (await res.json()) as { results: { characteristicCode: string; value: number }[] };
  const out: Record<string, number[]> = {};
  for (const r of body.results) (out[r.characteristicCode] ??= []).push(r.value);
  return out;
}

describe('CSV upload', () => {
  it('previews a semicolon file with decimal commas, checks it in the browser and imports every row', async ({ page }) => {
    const lot = newLot();
    const file = csvFile(
      `press-${stamp}.csv`,
      `lot;product;line;produced_at;characteristic;value;replicate\n${lot};HVL25;L1;15.07.2021 08:00;HVL25-RF28;7,45;1\n${lot};HVL25;L1;15.07.2021 08:00;HVL25-RF28;7,6;2\n${lot};HVL25;L1;15.07.2021 08:00;HVL25-AIR;2,95;1\n`,
    );
    await signIn(page, 'technician', '/results/upload');
    await pageHeading(page, 'Upload results').waitFor();
    expect(await page.getByRole('link', { name: 'Download the CSV template' }).first().getAttribute('href')).toBe('/api/v1/uploads/template.csv');

    await chooseFile(page, file);
    await page.getByTestId('detected-dialect').getByText('semicolon-separated, decimal comma').waitFor();
    expect(await page.getByLabel('Delimiter').inputValue()).toBe(';');
    expect(await page.getByLabel('Decimal mark').inputValue()).toBe('comma');
    // The preview shows the cells as written in the file.
    const preview = page.getByRole('table', { name: 'First rows of the file' });
    expect(await preview.getByRole('row').count()).toBe(4);
    expect(await preview.getByRole('cell', { name: '7,45' }).isVisible()).toBe(true);
    expect(await page.getByText('The columns have the template\'s names').isVisible()).toBe(true);

    await page.getByText('The file passed the checks: 3 rows, 1 lot.').waitFor();
    const importButton = page.getByRole('button', { name: 'Import all 3 rows' });
    expect(await importButton.isEnabled()).toBe(true);
    await screenshot(page, 'results-upload-preview');

    await importButton.click();
    await page.getByText(/Imported: 3 results from press-/).waitFor();
    expect(await page.getByRole('link', { name: lot }).getAttribute('href')).toBe(`/results/lots/${lot}`);
    await screenshot(page, 'results-upload-imported');

    // The decimal commas were read as decimals: "7,45" is stored as 7.45.
    expect(await storedValues(page, lot)).toEqual({ 'HVL25-AIR': [2.95], 'HVL25-RF28': [7.45, 7.6] });
  });

  it('lists a bad row before anything is sent, and imports nothing', async ({ page }) => {
    const lot = newLot();
    const file = csvFile(
      `bad-row-${stamp}.csv`,
      `lot;product;line;produced_at;characteristic;value;replicate\n${lot};HVL25;L1;16.07.2021 08:00;HVL25-DENS;1950;1\n${lot}-b;HVL25;L1;16.07.2021 08:00;HVL25-DENS;heavy;1\n${lot}-c;HVL25;L1;16.07.2021 08:00;HVL25-DENS;1948;1\n`,
    );
    await signIn(page, 'technician', '/results/upload');
    await chooseFile(page, file);

    const errors = page.getByRole('table', { name: 'Rows to correct' });
    await errors.waitFor();
    const rows = errors.locator('tbody tr');
    expect(await rows.count()).toBe(1);
    // No decimal comma in this file, so the message says which decimal mark it was read with.
    expect(await rows.first().locator('td').allTextContents()).toEqual(['3', 'value', '"heavy" is not a number (this file uses "." as the decimal mark)']);
    await page.getByText('1 row needs correcting').waitFor();
    expect(await page.getByRole('button', { name: 'Correct the file first' }).isDisabled()).toBe(true);
    // The bad row is marked in the preview too, numbered as a spreadsheet numbers it.
    expect(await page.getByRole('table', { name: 'First rows of the file' }).getByRole('rowheader', { name: 'needs correcting 3' }).isVisible()).toBe(true);
    await screenshot(page, 'results-upload-bad-row');

    // Nothing reached the server: no lot, and no upload of that name.
    expect(await storedValues(page, lot)).toBeNull();
    const uploads = (await (await page.request.get(`${baseUrl()}/api/v1/uploads?limit=500`)).json()) as { items: { fileName: string }[] };
    expect(uploads.items.map((u) => u.fileName)).not.toContain(`bad-row-${stamp}.csv`);
  });

  it('shows the server’s row errors with the error report, and which upload had the same file', async ({ page }) => {
    const lot = newLot();
    const header = 'lot,product,line,produced_at,characteristic,value,replicate';
    await signIn(page, 'technician', '/results/upload');
    await pageHeading(page, 'Upload results').waitFor();
    const first = await page.request.post(`${baseUrl()}/api/v1/uploads`, {
      multipart: { file: { name: 'earlier.csv', mimeType: 'text/csv', buffer: Buffer.from(`${header}\n${lot},HVL25,L1,2021-07-17T08:00,HVL25-AIR,3.1,1\n`) } },
    });
    expect(first.status()).toBe(201);

    // Right by itself, but replicate 1 of that lot is stored already: only the server can know.
    const again = csvFile(`again-${stamp}.csv`, `${header}\n${lot},HVL25,L1,2021-07-17T08:00,HVL25-AIR,3.4,1\n`);
    await chooseFile(page, again);
    await page.getByRole('button', { name: 'Import 1 row' }).click();
    await page.getByText('Nothing was imported: 1 row needs correcting').waitFor();
    const serverErrors = page.getByRole('table', { name: 'Rows the server could not take' });
    expect(await serverErrors.locator('tbody tr td').allTextContents()).toEqual(['2', 'replicate', expect.stringContaining('already stored')]);
    const report = page.getByRole('link', { name: 'Download the error report (CSV)' });
    const href = await report.getAttribute('href');
    expect(href).toMatch(/^\/api\/v1\/uploads\/\d+\/errors\.csv$/);
    const csv = await (await page.request.get(`${baseUrl()}${href}`)).text();
    expect(csv.split('\r\n')[0]).toBe('\ufeffrow,column,message');
    expect(csv).toMatch(/^2,replicate,.*already stored/m);
    await screenshot(page, 'results-upload-server-rejected');
    expect(await storedValues(page, lot)).toEqual({ 'HVL25-AIR': [3.1] });

    // The first file once more, byte for byte: the server names the earlier upload.
    const sameBytes = csvFile(`earlier-copy-${stamp}.csv`, `${header}\n${lot},HVL25,L1,2021-07-17T08:00,HVL25-AIR,3.1,1\n`);
    await chooseFile(page, sameBytes);
    await page.getByRole('button', { name: 'Import 1 row' }).click();
    const { id } = (await first.json()) as { id: number };
    await page.getByText(`this file was imported before, as upload ${id}`).waitFor();
  });

  it('maps the columns of a wide export, saves the mapping and finds it again for the next file', async ({ page }) => {
    const lot = newLot();
    const name = `Ring export ${stamp}`;
    const wide = (lotNumber: string, a: string, b: string) => `Batch no;Prod;Line no;Made at;Spread 1;Spread 2\n${lotNumber};HVL25;L1;18.07.2021 06:10;${a};${b}\n`;
    await signIn(page, 'technician', '/results/upload');
    await chooseFile(page, csvFile(`ring-${stamp}.csv`, wide(lot, '144', '146')));

    await page.getByRole('heading', { name: '3. Which column holds what' }).waitFor();
    await page.getByLabel('One row per lot, a column per result').check();
    // Nothing is checked or sent until every required column has its header.
    expect(await page.getByRole('button', { name: 'Finish the mapping first' }).isDisabled()).toBe(true);
    await page.getByText('Choose the column that holds the lot number').waitFor();
    await page.getByLabel('Lot number', { exact: true }).selectOption('Batch no');
    await page.getByLabel('Product code', { exact: true }).selectOption('Prod');
    await page.getByLabel('Production line', { exact: true }).selectOption('Line no');
    await page.getByLabel('Production time', { exact: true }).selectOption('Made at');
    await page.getByLabel('Spread 1').selectOption('HVL25-FLOW');
    await page.getByLabel('Spread 2').selectOption('HVL25-FLOW');
    await page.getByRole('button', { name: 'Import 2 results from 1 row' }).waitFor();

    await page.getByLabel('Save this mapping as').fill(name);
    await page.getByRole('button', { name: 'Save mapping' }).click();
    await page.getByText(`Using the saved mapping “${name}”.`).waitFor();
    await screenshot(page, 'results-upload-mapping');
    await page.getByRole('button', { name: 'Import 2 results from 1 row' }).click();
    await page.getByText(/Imported: 2 results/).waitFor();
    expect(await storedValues(page, lot)).toEqual({ 'HVL25-FLOW': [144, 146] });

    // The next export of that kind: the saved mapping fits its columns and is used at once.
    const next = newLot();
    await page.getByRole('button', { name: 'Upload another file' }).click();
    await chooseFile(page, csvFile(`ring-next-${stamp}.csv`, wide(next, '145', '147')));
    await page.getByText(`Using the saved mapping “${name}”.`).waitFor();
    await page.getByRole('button', { name: 'Import 2 results from 1 row' }).click();
    await page.getByText(/Imported: 2 results/).waitFor();
    expect(await storedValues(page, next)).toEqual({ 'HVL25-FLOW': [145, 147] });
  });
});

describe('manual entry', () => {
  it('converts compressive breaking loads in kN to MPa, evaluates the set and saves it', async ({ page }) => {
    const lot = newLot();
    await signIn(page, 'technician', '/results/enter');
    await pageHeading(page, 'Enter a lot by hand').waitFor();
    await page.getByLabel('Product', { exact: true }).selectOption('HVL25');
    // The product's own line is proposed.
    expect(await page.getByLabel('Production line').inputValue()).toBe('L1');
    await page.getByLabel('Lot number').fill(lot);
    // Dates are typed in the plant's format, on its clock, and the page names that clock once.
    expect(await page.getByText(/^Type dates and times as dd\/mm\/yyyy hh:mm, on the plant's clock\.$/).count()).toBe(1);
    expect(await page.getByText(/Times are plant time \(Europe\/London, (GMT|BST)\)/).count()).toBe(1);
    // Before the demo history no specification revision was in force (the seed's revision 1 starts with it).
    await page.getByLabel('Production time').fill('02/11/2021 06:20');
    await page.getByLabel('Shift (optional)').selectOption('early');
    await page.getByLabel('Add a characteristic').selectOption('HVL25-RC28');
    await page.getByRole('button', { name: 'Add', exact: true }).click();

    const card = page.getByRole('region', { name: /compressive strength · 28 d/ });
    await card.waitFor();
    expect(await card.getByLabel('Breaking loads in kN').isChecked()).toBe(true);
    // The cautions of the method sit beside its readings.
    const cautions = card.getByRole('region', { name: /Handling cautions/ });
    expect(await cautions.textContent()).toMatch(/Alkaline and irritant.*gloves and eye protection.*Respirable dust.*dust extraction.*Testing press.*safety data sheet/s);

    // EN 196-1: Rc = Fc / 1600 mm², so 39 kN gives 24.4 MPa; the lot is judged by the revision in force when it was made, here none.
    await card.getByLabel('Half 1').fill('39');
    await card.getByText('none was in force when the lot was made').waitFor();
    await card.getByText('= 24.4 MPa', { exact: true }).waitFor();
    // Made an hour ago, under revision 1: 24.4 MPa is below its LSL of 25 MPa (the declared C25). This lot joins
    // the end of the HVL25-RC28 chart, which no other test reads.
    await page.getByLabel('Production time').fill(typed(new Date(Date.now() - 3_600_000)));
    await card.getByText('= 24.4 MPa out of spec').waitFor();
    // EN 196-1: 40 kN / 1600 mm² = 25.0 MPa, on the limit and so within it.
    await card.getByLabel('Half 1').fill('40');
    await card.getByText('= 25.0 MPa', { exact: true }).waitFor();
    for (const [i, load] of ['41', '42', '40', '41', '42'].entries()) await card.getByLabel(`Half ${i + 2}`).fill(load);
    // Mean of 25.0, 25.625, 26.25, 25.0, 25.625, 26.25 MPa = 25.625 MPa; all within ±10 % of it (EN 196-1).
    expect(await card.getByTestId('set-result-HVL25-RC28').textContent()).toBe('25.6 MPa');
    await card.getByText('Within specification').waitFor();
    await card.getByText('Set accepted', { exact: true }).waitFor();
    await screenshot(page, 'results-manual-entry');

    await page.getByRole('button', { name: 'Save 6 results' }).click();
    await page.getByText(/Saved: 6 results of lot/).waitFor();
    expect(await storedValues(page, lot)).toEqual({ 'HVL25-RC28': [25, 25.625, 26.25, 25, 25.625, 26.25] });

    await page.getByRole('link', { name: lot }).click();
    await pageHeading(page, `Lot ${lot}`).waitFor();
    expect(await page.getByRole('row', { name: /HVL25-RC28/ }).textContent()).toContain('25.6 MPa');
    await screenshot(page, 'results-lot');
  });

  it('names an empty reading under its field and sends nothing', async ({ page }) => {
    const lot = newLot();
    await signIn(page, 'technician', '/results/enter');
    await page.getByLabel('Product', { exact: true }).selectOption('HVL25');
    await page.getByLabel('Lot number').fill(lot);
    await page.getByLabel('Production time').fill('02/11/2021 06:20');
    await page.getByLabel('Add a characteristic').selectOption('HVL25-FLOW');
    await page.getByRole('button', { name: 'Add', exact: true }).click();
    const card = page.getByRole('region', { name: /flow diameter$/ });
    await card.getByLabel('Reading 1').fill('146');
    await page.getByRole('button', { name: 'Save 2 results' }).click();
    await card.getByText('Enter a number').waitFor();
    expect(await card.getByLabel('Reading 2').getAttribute('aria-invalid')).toBe('true');
    expect(await storedValues(page, lot)).toBeNull();
  });
});

describe('what must not get in', () => {
  it('says plainly that a picture is not a results file, and offers no column mapping for it', async ({ page }) => {
    // The signature every PNG picture starts with (ISO/IEC 15948, 5.2), then its header chunk.
    const png = join(files, `photo-${stamp}.csv`);
    writeFileSync(png, Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x48, 0x44, 0x52, 0x00, 0x00, 0x01, 0x00]));
    await signIn(page, 'technician', '/results/upload');
    await pageHeading(page, 'Upload results').waitFor();
    await chooseFile(page, png);
    await page.getByText(`photo-${stamp}.csv: This is not a results file: it holds binary content`).waitFor();
    expect(await page.getByRole('heading', { name: /Which column holds what/ }).count()).toBe(0);
    expect(await page.getByText(/0 data rows/).count()).toBe(0);
    await screenshot(page, 'results-upload-not-results');
  });

  it('refuses a production time in the future and a product on a line that does not make it, under their fields', async ({ page }) => {
    const lot = newLot();
    await signIn(page, 'technician', '/results/enter');
    await page.getByLabel('Product', { exact: true }).selectOption('HVL25');
    await page.getByLabel('Lot number').fill(lot);
    await page.getByLabel('Add a characteristic').selectOption('HVL25-FLOW');
    await page.getByRole('button', { name: 'Add', exact: true }).click();
    const card = page.getByRole('region', { name: /flow diameter$/ });
    await card.getByLabel('Reading 1').fill('146');
    await card.getByLabel('Reading 2').fill('147');

    // Three months ahead: the form says so under the field before anything is sent.
    await page.getByLabel('Production time').fill(typed(new Date(Date.now() + 90 * 86_400_000)));
    await page.getByRole('button', { name: 'Save 2 results' }).click();
    await page.getByText(/^Production time is later than now: results cannot come from the future/).waitFor();
    expect(await page.getByLabel('Production time').getAttribute('aria-invalid')).toBe('true');
    // A test time before the production time.
    await page.getByLabel('Production time').fill('02/11/2021 06:20');
    await card.getByLabel('Test time (optional)').fill('01/11/2021 06:20');
    await page.getByRole('button', { name: 'Save 2 results' }).click();
    await card.getByText('Test time is before the lot was produced').waitFor();
    await card.getByLabel('Test time (optional)').fill('02/11/2021 08:00');

    // HV Level 25 is made on L1 (the demo catalogue); only the server knows the catalogue's pairing for sure.
    await page.getByLabel('Production line').selectOption('L2');
    await page.getByRole('button', { name: 'Save 2 results' }).click();
    await page.getByText('Product HVL25 is not made on line L2 (HVL25 is made on L1)').waitFor();
    expect(await page.getByLabel('Production line').getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'results-manual-entry-refused');
    expect(await storedValues(page, lot)).toBeNull();
  });

  it('keeps every action of the upload and manual-entry screens on a tablet held upright (800 × 1280)', async ({ page }) => {
    await page.setViewportSize({ width: 800, height: 1280 });
    await signIn(page, 'technician', '/results/upload');
    await pageHeading(page, 'Upload results').waitFor();
    const lot = newLot();
    await chooseFile(page, csvFile(`tablet-${stamp}.csv`, `Tablet batch;Tablet product;Tablet line;Tablet made;Ring A;Ring B\n${lot};HVL25;L1;19.07.2021 06:10;144;146\n`));
    await page.getByRole('heading', { name: '3. Which column holds what' }).waitFor();
    await page.getByLabel('One row per lot, a column per result').check();
    expect(await offScreen(page, ['Download the CSV template', 'Choose another file', 'Finish the mapping first'])).toEqual({ scrollsSideways: false, beyond: [] });
    await screenshot(page, 'results-upload-tablet');

    // A file the browser refuses row by row, under a long name as exports name their files.
    const longName = `press-export-line-1-early-shift-${stamp}-corrected-after-the-morning-meeting-final.csv`;
    await chooseFile(page, csvFile(longName, `lot;product;line;produced_at;characteristic;value;replicate\n${lot};HVL25;L2;19.07.2021 06:10;HVL25-DENS;heavy;1\n`));
    await page.getByRole('table', { name: 'Rows to correct' }).waitFor();
    expect(await offScreen(page, ['Choose another file', 'Correct the file first'])).toEqual({ scrollsSideways: false, beyond: [] });
    await screenshot(page, 'results-upload-tablet-errors');

    await page.goto(`${baseUrl()}/results/enter`);
    await pageHeading(page, 'Enter a lot by hand').waitFor();
    await page.getByLabel('Product', { exact: true }).selectOption('HVL25');
    for (const code of ['HVL25-RC28', 'HVL25-FLOW']) {
      await page.getByLabel('Add a characteristic').selectOption(code);
      await page.getByRole('button', { name: 'Add', exact: true }).click();
    }
    await page.getByRole('region', { name: /compressive strength · 28 d/ }).waitFor();
    expect(await offScreen(page, ['Add', 'Remove HVL25-RC28', 'Remove HVL25-FLOW', 'Save 8 results'])).toEqual({ scrollsSideways: false, beyond: [] });
    await screenshot(page, 'results-manual-entry-tablet');
  });
});

describe('the lot page and the upload history', () => {
  it('show times on the plant clock in its date format and figures to the characteristic decimals, whatever the browser zone', async ({ page }) => {
    const lot = newLot();
    const fileName = `plant-clock-${stamp}.csv`;
    await signIn(page, 'technician', '/results/history');
    await pageHeading(page, 'Upload history').waitFor();
    // 19 July 2021 06:10 at the plant is 05:10 UTC (UK summer time, BST = UTC+1).
    const created = await page.request.post(`${baseUrl()}/api/v1/uploads`, {
      multipart: { file: { name: fileName, mimeType: 'text/csv', buffer: Buffer.from(`lot,product,line,produced_at,characteristic,value\n${lot},HVL25,L1,2021-07-19T06:10,HVL25-DENS,1950\n`) } },
    });
    expect(created.status()).toBe(201);
    // The browser in New York: the page must not care.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Emulation.setTimezoneOverride', { timezoneId: 'America/New_York' });

    await page.goto(`${baseUrl()}/results/lots/${lot}`);
    await pageHeading(page, `Lot ${lot}`).waitFor();
    await page.getByText('19/07/2021 06:10', { exact: true }).waitFor();
    expect(await page.getByText(/Times are plant time \(Europe\/London, (GMT|BST)\)/).count()).toBe(1);
    // Fresh density is kept to no decimals (its test method in shared/lab/test-methods.ts); thousands are grouped for reading.
    const row = page.getByRole('row', { name: /HVL25-DENS/ });
    expect(await row.getByRole('cell').nth(2).textContent()).toBe('1,950 kg/m³');
    expect(await row.getByRole('cell').nth(1).textContent()).toContain('1,950');

    await page.goto(`${baseUrl()}/results/history`);
    const listed = (await (await page.request.get(`${baseUrl()}/api/v1/uploads?limit=500`)).json()) as { items: { fileName: string; uploadedAt: string }[] };
    const uploadedAt = listed.items.find((u) => u.fileName === fileName)!.uploadedAt;
    const historyRow = page.getByRole('row', { name: new RegExp(fileName) });
    expect(await historyRow.getByRole('cell').first().textContent()).toContain(typed(uploadedAt));
    await screenshot(page, 'results-history-plant-clock');
  });
});

describe('roles', () => {
  it('shows the auditor the history and the test methods, and no way to upload', async ({ page }) => {
    await signIn(page, 'auditor', '/results');
    await pageHeading(page, 'Upload history').waitFor();
    expect(new URL(page.url()).pathname).toBe('/results/history');
    const tabs = page.getByRole('navigation', { name: 'Results pages' });
    expect(await tabs.getByRole('link').allTextContents()).toEqual(['Upload history', 'Lots']);
    expect(await tabs.getByRole('link', { name: 'Upload history' }).getAttribute('aria-current')).toBe('page');
    expect(await page.getByText('Choose a CSV file').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Void…' }).count()).toBe(0);
    // The demo history came in through the upload path like any file.
    const historyRow = page.getByRole('row', { name: /harrow-vale-history\.csv/ });
    await historyRow.waitFor();
    // Its original file is offered with its size in decimal megabytes (IEC 80000-13), one decimal.
    const listed = (await (await page.request.get(`${baseUrl()}/api/v1/uploads?limit=500`)).json()) as { items: { fileName: string; sizeBytes: number }[] };
    const sizeBytes = listed.items.find((u) => u.fileName === 'harrow-vale-history.csv')!.sizeBytes;
    expect(sizeBytes).toBeGreaterThan(1_000_000);
    expect(await historyRow.getByRole('link', { name: /^Original file/ }).textContent()).toBe(`Original file (${Number((sizeBytes / 1e6).toFixed(1))} MB)`);
    await screenshot(page, 'results-history-auditor');

    await page.goto(`${baseUrl()}/results/upload`);
    await pageHeading(page, 'Not allowed for your role').waitFor();

    await page.getByRole('navigation', { name: 'Main menu' }).getByRole('link', { name: 'Test methods' }).click();
    await pageHeading(page, 'Test methods').waitFor();
    await screenshot(page, 'results-test-methods');
    await page.getByRole('link', { name: /Compressive strength/ }).click();
    await pageHeading(page, /Compressive strength/).waitFor();
    // EN 196-1: Rc = Fc / 1600 mm²; 40 kN → 25.0 MPa.
    await page.getByText('Rc = Fc / 1600 mm² (EN 196-1).').waitFor();
    await page.getByText('A breaking load of 40 kN gives 25.0 MPa.').waitFor();
    const cautions = page.getByRole('region', { name: 'Handling cautions' });
    expect(await cautions.textContent()).toMatch(/Alkaline and irritant.*gloves and eye protection.*Respirable dust.*dust extraction.*Testing press.*local regulations/s);
    await screenshot(page, 'results-test-method');
  });

  it('lets a quality manager void an imported upload with a reason', async ({ page }) => {
    const lot = newLot();
    await signIn(page, 'quality_manager', '/results/history');
    await pageHeading(page, 'Upload history').waitFor();
    const fileName = `void-me-${stamp}.csv`;
    const created = await page.request.post(`${baseUrl()}/api/v1/uploads`, {
      multipart: { file: { name: fileName, mimeType: 'text/csv', buffer: Buffer.from(`lot,product,line,produced_at,characteristic,value\n${lot},HVL25,L1,2021-07-19T08:00,HVL25-AIR,9.9\n`) } },
    });
    expect(created.status()).toBe(201);
    await page.reload();
    const row = page.getByRole('row', { name: new RegExp(fileName) });
    await row.getByRole('button', { name: 'Void…' }).click();
    const dialog = page.getByRole('dialog', { name: /Void upload \d+\?/ });
    await dialog.getByLabel('Reason').fill('bad');
    await dialog.getByRole('button', { name: 'Void upload' }).click();
    await dialog.getByText('Give a reason of at least 5 characters').waitFor();
    await dialog.getByLabel('Reason').fill('Samples mixed with the wrong water dose');
    await screenshot(page, 'results-void-dialog');
    await dialog.getByRole('button', { name: 'Void upload' }).click();
    await row.getByText('Voided').waitFor();
    expect(await row.textContent()).toContain('Samples mixed with the wrong water dose');
    expect(await storedValues(page, lot)).toEqual({});
  });
});
