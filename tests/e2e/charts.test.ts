// The overview and the chart page in a real browser against the seeded demo plant: the quality
// manager finds the flow of HV Level 25 with its limits recalculated after the new sand source, reads
// a rule in the tooltip, opens a lot, excludes a point and freezes limits from a baseline before it.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect } from 'vitest';
import type { APIRequestContext, Locator, Page } from 'playwright-core';
import { baseUrl, browserTest, pageHeading, plantInput, screenshot, signIn } from '../support/browser';
import { ruleDescriptions } from '@shared/spc';
import type { CharacteristicChart } from '@shared/schemas/charts';
import type { Overview } from '@shared/schemas/overview';

const it = browserTest({ viewport: { width: 1600, height: 1000 }, timeout: 15_000 });

/** The chart as the API gives it: by default the period since the limits in force apply, as the page opens. */
async function chartJson(request: APIRequestContext, id: number, query = ''): Promise<CharacteristicChart> {
  const res = await request.get(`${baseUrl()}/api/v1/characteristics/${id}/chart${query}`);
  expect(res.status()).toBe(200);
  return (await res.json()) as CharacteristicChart;
}

/** One part of the page as test-artifacts/<name>.png, at full resolution, for a person to look at. */
async function partShot(part: Locator, name: string) {
  await part.screenshot({ path: resolve(import.meta.dirname, '..', '..', 'test-artifacts', `${name}.png`) });
}

/** Waits until echarts has drawn into the chart's canvas. */
async function chartDrawn(page: Page) {
  await page.getByTestId('control-chart').locator('canvas').first().waitFor();
  await page.waitForFunction(() => {
    const canvas = document.querySelector('[data-testid="control-chart"] canvas') as HTMLCanvasElement | null;
    return !!canvas && canvas.width > 0 && canvas.height > 0;
  });
}

describe('overview and control charts', () => {
  it('leads the quality manager from the overview to the step change in flow, its revised limits, a rule and a lot', async ({ page }) => {
    await signIn(page, 'quality_manager');
    await pageHeading(page, 'Plant overview').waitFor();
    const tile = page.getByTestId('tile-HVL25-FLOW');
    await tile.waitFor();
    // Needs attention first: the tiles of a product stand in the order of the server's attention score.
    const overview = (await (await page.request.get(`${baseUrl()}/api/v1/overview?days=30`)).json()) as Overview;
    const score = new Map(overview.items.map((i) => [i.code, i.attentionScore]));
    const shown = await page.locator('section[aria-labelledby="product-HVL25"] article[data-testid^="tile-"]').evaluateAll((tiles) => tiles.map((t) => t.getAttribute('data-testid')!.slice(5)));
    expect(shown.length).toBeGreaterThan(5);
    const scores = shown.map((code) => score.get(code)!);
    expect(scores).toEqual([...scores].sort((a, b) => b - a));
    await screenshot(page, 'charts-overview');
    await page.setViewportSize({ width: 820, height: 1180 });
    await page.screenshot({ path: resolve(import.meta.dirname, '..', '..', 'test-artifacts', 'charts-overview-tablet.png') });
    await page.setViewportSize({ width: 1600, height: 1000 });

    // Filters narrow the screen to one line.
    await page.getByLabel('Line', { exact: true }).selectOption('L2');
    await page.waitForURL(/line=L2/);
    await page.getByTestId('tile-HVL25-FLOW').waitFor({ state: 'detached' });
    expect(await page.getByRole('heading', { name: 'HV Fix Flex' }).isVisible()).toBe(true);
    expect(await page.getByRole('heading', { name: /^Line 1/ }).count()).toBe(0);
    await page.getByLabel('Line', { exact: true }).selectOption('');
    await tile.waitFor();

    await tile.getByRole('link', { name: 'flow diameter', exact: true }).click();
    await pageHeading(page, 'HV Level 25 · flow diameter').waitFor();
    await chartDrawn(page);
    const id = Number(new URL(page.url()).pathname.split('/').pop());
    const chart = await chartJson(page.request, id);

    // The sand source change is logged as an event, and the limits in force come from the level after it.
    expect(await page.getByRole('region', { name: 'Process events' }).getByText('New sand source').isVisible()).toBe(true);
    const revised = 'New sand source: limits recalculated from the new level';
    expect(chart.limits).toMatchObject({ source: 'frozen', reason: revised });
    await page.getByTestId('limits-source').getByText(revised, { exact: false }).waitFor();
    const signals = page.getByRole('list', { name: 'Run-rule signals' });
    await signals.waitFor();
    expect(await page.getByTestId('signal-count').textContent()).toContain(`${chart.violations.length} signal`);
    const newest = chart.violations.reduce((a, b) => (b.index > a.index ? b : a));
    const newestPoint = chart.points[newest.index];
    await signals.getByRole('button', { name: `Show lot ${newestPoint.lotNumber} on the chart` }).click();

    // The tooltip names the lot, the time and shift, every replicate and the rule in words.
    const tip = page.getByTestId('control-chart').getByTestId('point-tooltip');
    await tip.waitFor();
    const tipText = (await tip.textContent()) ?? '';
    expect(tipText).toContain(`Lot ${newestPoint.lotNumber}`);
    // Named by lot and plant time, never by a position that changes with the period shown.
    expect(tipText).not.toMatch(/Point \d/);
    expect(tipText).toContain(`Replicates (2): ${newestPoint.values.map((v) => v.toFixed(0)).join(' · ')} mm`);
    expect(tipText).toMatch(/Early shift|Late shift|Night shift/);
    expect(tipText).toContain(ruleDescriptions[newest.rule]);
    expect(await page.getByTestId('selected-point').textContent()).toContain(`Lot ${newestPoint.lotNumber} · `);
    await partShot(page.locator('#chart-section'), 'charts-control-chart-tooltip');
    await screenshot(page, 'charts-chart-page');

    // Keyboard: End selects the newest point, Enter opens its lot with every result of it.
    await page.getByTestId('control-chart').focus();
    await page.keyboard.press('End');
    const last = chart.points.at(-1)!;
    await page.getByTestId('selected-point').getByText(`Lot ${last.lotNumber} · `).waitFor();
    await page.keyboard.press('Enter');
    const lotDialog = page.getByRole('dialog', { name: `Lot ${last.lotNumber}` });
    await lotDialog.waitFor();
    const results = lotDialog.getByRole('list', { name: `Results of lot ${last.lotNumber}` });
    await results.getByText('(this chart)').waitFor();
    expect(await results.getByRole('listitem').count()).toBeGreaterThan(1);
    await partShot(lotDialog, 'charts-lot-details');
    await lotDialog.getByRole('button', { name: 'Close' }).click();
    await lotDialog.waitFor({ state: 'detached' });
  });

  it('opens on the period since the limits in force, and an alarm link to an old lot on a period that holds it', async ({ page }) => {
    await signIn(page, 'quality_manager');
    await pageHeading(page, 'Plant overview').waitFor();
    // The latest lot on a card links to its lot page.
    const overview = (await (await page.request.get(`${baseUrl()}/api/v1/overview?days=30`)).json()) as Overview;
    const latest = overview.items.find((i) => i.code === 'HVL25-FLOW')!.latest!;
    const tile = page.getByTestId('tile-HVL25-FLOW');
    expect(await tile.getByRole('link', { name: latest.lotNumber }).getAttribute('href')).toBe(`/results/lots/${encodeURIComponent(latest.lotNumber)}`);
    await page.setViewportSize({ width: 1280, height: 1000 });
    await page.screenshot({ path: resolve(import.meta.dirname, '..', '..', 'test-artifacts', 'charts-overview-1280.png') });
    await page.setViewportSize({ width: 800, height: 1000 });
    await page.screenshot({ path: resolve(import.meta.dirname, '..', '..', 'test-artifacts', 'charts-overview-800.png') });
    await page.setViewportSize({ width: 1280, height: 1000 });

    await page.goto(`${baseUrl()}/charts`);
    await pageHeading(page, 'Control charts').waitFor();
    await page.getByRole('link', { name: /^flow diameter X̄/ }).first().click();
    await pageHeading(page, 'HV Level 25 · flow diameter').waitFor();
    await chartDrawn(page);
    const id = Number(new URL(page.url()).pathname.split('/').pop());
    const current = await chartJson(page.request, id);
    const all = await chartJson(page.request, id, '?period=all');
    // The default period starts where the limits in force apply: no lot from before the process change.
    expect(current.window.period).toBe('limits');
    expect(await page.getByLabel('Period').inputValue()).toBe('limits');
    await page.getByText(`${current.points.length} points`, { exact: true }).waitFor();
    expect(current.points.length).toBeLessThan(all.points.length);
    // The zone is named once on the page.
    expect(await page.getByText(/^Times are plant time \(Europe\/London, (GMT|BST)\)/).count()).toBe(1);
    await partShot(page.locator('#chart-section'), 'charts-default-period-1280');

    // The oldest lot, as an alarm links to it: a longer period opens with the lot selected and its details shown.
    const oldest = all.points[0];
    await page.goto(`${baseUrl()}/charts/${id}?lot=${encodeURIComponent(oldest.lotNumber)}`);
    await chartDrawn(page);
    expect(await page.getByLabel('Period').inputValue()).not.toBe('limits');
    const panel = page.getByTestId('selected-point');
    await panel.getByText(`Lot ${oldest.lotNumber} · `).waitFor();
    await page.getByTestId('control-chart').getByTestId('point-tooltip').getByText(`Lot ${oldest.lotNumber}`).waitFor();
    await partShot(page.locator('#chart-section'), 'charts-linked-old-lot-1280');
    // The lot page is one click from the point.
    await panel.getByRole('link', { name: 'Lot page' }).click();
    await page.waitForURL(`**/results/lots/${encodeURIComponent(oldest.lotNumber)}`);
    await page.setViewportSize({ width: 800, height: 1000 });
    await page.goto(`${baseUrl()}/charts/${id}`);
    await chartDrawn(page);
    await partShot(page.locator('#chart-section'), 'charts-default-period-800');
    await page.setViewportSize({ width: 1600, height: 1000 });
  });

  it('lets the quality manager exclude a point with a reason and freeze limits from a baseline', async ({ page }) => {
    await signIn(page, 'quality_manager', '/charts');
    await pageHeading(page, 'Control charts').waitFor();
    // Lines by the names the overview uses, with their codes.
    await page.getByRole('heading', { level: 2, name: 'Line 1 · levelling compounds L1' }).waitFor();
    await screenshot(page, 'charts-picker');
    await page.getByRole('link', { name: /^flow diameter X̄/ }).first().click();
    await pageHeading(page, 'HV Level 25 · flow diameter').waitFor();
    const id = Number(new URL(page.url()).pathname.split('/').pop());
    const before = await chartJson(page.request, id);
    expect(before.limits.source).toBe('frozen');

    // The lot with the widest range, opened the way an alarm links to it: by its lot number.
    const widest = before.points.filter((p) => !p.excluded).reduce((a, b) => ((b.dispersion ?? 0) > (a.dispersion ?? 0) ? b : a));
    await page.goto(`${baseUrl()}/charts/${id}?lot=${encodeURIComponent(widest.lotNumber)}`);
    await chartDrawn(page);
    const selectedPanel = page.getByTestId('selected-point');
    await selectedPanel.getByText(`Lot ${widest.lotNumber} · `).waitFor();
    await page.getByTestId('control-chart').getByTestId('point-tooltip').getByText(`Lot ${widest.lotNumber}`).waitFor();
    const uclShown = page.getByTestId('limit-ucl');
    expect(await uclShown.textContent()).toBe(before.limits.location.ucl!.toFixed(2));

    await selectedPanel.getByRole('button', { name: 'Exclude from the limits…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Exclude the point from the limits' });
    await dialog.getByRole('button', { name: 'Exclude point' }).click();
    await dialog.getByText('Give a reason of at least 3 characters').waitFor();
    const reason = 'Ring lifted unevenly on the first reading; retrained the operator';
    await dialog.getByLabel('Assignable cause').fill(reason);
    await dialog.getByRole('button', { name: 'Exclude point' }).click();
    await page.getByText(/is excluded; the frozen limits stay as they are until limits are frozen again/).waitFor();

    // Phase II: the point leaves the run rules; the frozen limits stay until the next freeze.
    const after = await chartJson(page.request, id);
    expect(after.points[widest.index]).toMatchObject({ excluded: true, exclusionReason: reason, rules: [] });
    expect(after.limits.location.ucl).toBe(before.limits.location.ucl);
    await page.getByTestId('limit-ucl').getByText(after.limits.location.ucl!.toFixed(2), { exact: true }).waitFor();
    expect(await selectedPanel.textContent()).toContain(`excluded from the limits: ${reason}`);

    // Freeze from the weeks before the new sand source: the lots after it then stand out against them.
    // Those weeks lie before the limits in force, so the whole history is one choice away.
    await page.getByLabel('Period').selectOption('all');
    await page.waitForURL(/period=all/);
    const history = await chartJson(page.request, id, '?period=all');
    const sand = history.events.find((e) => e.title === 'New sand source')!;
    const sandMs = Date.parse(sand.occurredAt);
    const baseline = history.points.filter((p) => Date.parse(p.producedAt) < sandMs && Date.parse(p.producedAt) >= sandMs - 45 * 86_400_000);
    await page.getByText(`${history.points.length} points`, { exact: true }).waitFor();
    // The selected lot stays selected in the longer period: it is known by its lot, not its position.
    await selectedPanel.getByText(`Lot ${widest.lotNumber} · `).waitFor();
    await page.getByRole('button', { name: 'Freeze limits…' }).click();
    const freeze = page.getByRole('dialog', { name: 'Freeze control limits' });
    await freeze.getByLabel('Baseline from').fill(plantInput(baseline[0].producedAt));
    await freeze.getByLabel('Baseline to').fill(plantInput(baseline.at(-1)!.producedAt));
    await freeze.getByTestId('baseline-count').getByText(`${baseline.length} points in the baseline`).waitFor();
    const why = 'Six stable weeks before the change of sand source';
    await freeze.getByLabel('Reason').fill(why);
    await freeze.getByRole('button', { name: 'Freeze limits' }).click();
    await page.getByText(/Limits frozen as revision \d+ from \d+ points/).waitFor();

    const frozen = await chartJson(page.request, id);
    expect(frozen.limits).toMatchObject({ source: 'frozen', reason: why, frozenBy: 'Demo Quality Manager' });
    await page.getByTestId('limits-source').getByText(why, { exact: false }).waitFor();
    expect(await page.getByTestId('limit-ucl').textContent()).toBe(frozen.limits.location.ucl!.toFixed(2));
    const revisions = page.getByRole('region', { name: 'Limit revisions' });
    await revisions.getByText(why).waitFor();
    expect(await revisions.getByText('In force').count()).toBe(1);
    // Against the limits of the old sand, the flow after the change is a sustained signal.
    const afterSand = frozen.violations.filter((v) => Date.parse(frozen.points[v.index].producedAt) >= sandMs);
    expect(afterSand.length).toBeGreaterThan(10);
    await partShot(page.locator('#chart-section'), 'charts-control-chart-frozen');
    await partShot(page.getByRole('region', { name: 'Control limits' }), 'charts-limits-frozen');
    await screenshot(page, 'charts-chart-frozen');
  });

  it('shows the auditor the chart and its history without the controls that change limits', async ({ page }) => {
    await signIn(page, 'auditor', '/charts');
    await pageHeading(page, 'Control charts').waitFor();
    await page.getByRole('link', { name: /^fresh density I/ }).first().click();
    await pageHeading(page, /· fresh density$/).waitFor();
    await chartDrawn(page);
    await page.getByRole('region', { name: 'Capability' }).getByTestId('index-Cpk').waitFor();
    expect(await page.getByRole('button', { name: 'Freeze limits…' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /^Exclude/ }).count()).toBe(0);
    const download = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Download CSV' }).click();
    const file = await download;
    expect(file.suggestedFilename()).toMatch(/-DENS-chart-points\.csv$/);
    // Plant-time stamps with their offset, figures to the characteristic decimals, no floating-point noise.
    const csv = readFileSync((await file.path())!, 'utf8');
    const [header, first] = csv.split('\r\n');
    // UTF-8 with its byte-order mark, so a spreadsheet reads the units' characters right (shared/csv.ts).
    expect(header.startsWith('\ufefflot,produced_at,')).toBe(true);
    expect(first.split(',')[1]).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:00\+0[01]:00$/);
    expect(csv).not.toMatch(/\d\.\d{5,}/);
    await partShot(page.getByRole('region', { name: 'Capability' }), 'charts-capability');
    await page.setViewportSize({ width: 820, height: 1180 });
    await page.getByTestId('control-chart').scrollIntoViewIfNeeded();
    await page.screenshot({ path: resolve(import.meta.dirname, '..', '..', 'test-artifacts', 'charts-chart-tablet.png') });
    await page.setViewportSize({ width: 1600, height: 1000 });
    await screenshot(page, 'charts-auditor-capability');
  });
});
