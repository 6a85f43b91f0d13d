// Headless Chromium for the browser tests: Debian's /usr/bin/chromium driven by playwright-core,
// never a downloaded browser. Each launch gets a fresh profile so no cookie or cache carries over.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { test } from 'vitest';
import { DEMO_PASSWORD, demoUsers } from '@api/db/seed';
import type { Role } from '@shared/schemas/users';
import { DEFAULT_PLANT_DATE_FORMAT, formatPlantDateTime } from '@shared/time';

const CHROMIUM = '/usr/bin/chromium';
const artifacts = resolve(import.meta.dirname, '..', '..', 'test-artifacts');

export interface TestBrowser {
  context: BrowserContext;
  /** Closes the browser and deletes its profile. */
  close(): Promise<void>;
}

export async function launchBrowser(options: { viewport?: { width: number; height: number } } = {}): Promise<TestBrowser> {
  const profile = mkdtempSync(join(tmpdir(), 'prismline-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: options.viewport ?? { width: 1366, height: 900 },
    locale: 'en-GB',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--disable-quic',
    ],
  });
  return {
    context,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** The running Prismline server, seeded with the demo users; scripts/run-tests.ts sets it. */
export function baseUrl(): string {
  const url = process.env.PRISMLINE_BASE_URL;
  if (!url) throw new Error('PRISMLINE_BASE_URL is not set: run the browser tests with npm test');
  return url.replace(/\/$/, '');
}

/** Saves a full-page PNG to test-artifacts/<name>.png for a person to look at. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(artifacts, { recursive: true });
  const path = join(artifacts, `${name}.png`);
  // A sticky header lands mid-page in a full-page capture taken while scrolled.
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path, fullPage: true });
  return path;
}

export interface BrowserTestOptions {
  viewport?: { width: number; height: number };
  /** Playwright's wait for each action and locator, in ms: well inside the test timeout, so a missing element fails with Playwright's message. */
  timeout?: number;
}

/**
 * vitest's `it` with two fixtures: `browser`, one Chromium for the whole test file, and `page`, a new
 * page for each test with no cookies left from the one before, so one failure does not leak into the next.
 */
export function browserTest(options: BrowserTestOptions = {}) {
  return test
    .extend('browser', { scope: 'file' }, async ({}, { onCleanup }) => {
      const browser = await launchBrowser({ viewport: options.viewport });
      onCleanup(() => browser.close());
      return browser;
    })
    .extend('page', async ({ browser }, { onCleanup }) => {
      await browser.context.clearCookies();
      const page = await browser.context.newPage();
      page.setDefaultTimeout(options.timeout ?? 10_000);
      onCleanup(() => page.close());
      return page;
    });
}

/** The e-mail of the demo user with that role (api/db/seed). */
export function demoEmailOf(role: Role): string {
  const user = demoUsers.find((candidate) => candidate.role === role);
  if (!user) throw new Error(`The demo seed has no ${role}`);
  return user.email;
}

/** Fills in the sign-in form the page shows and sends it. */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Opens `path` signed out, which leads to sign-in, and signs in as the demo user of `role`; the app then goes back to `path`. */
export async function signIn(page: Page, role: Role, path = '/'): Promise<void> {
  await page.goto(`${baseUrl()}${path}`);
  // The first page of a run loads the app cold, on a machine other suites may be loading too.
  await page.waitForURL('**/sign-in', { timeout: 30_000 });
  await submitSignIn(page, demoEmailOf(role), DEMO_PASSWORD);
}

/** The page's title heading. */
export function pageHeading(page: Page, name: string | RegExp) {
  return page.getByRole('heading', { level: 1, name });
}

/** An instant typed as the demo plant writes it (Europe/London, dd/MM/yyyy; api/db/seed/scenario/plant.ts): "30/11/2026 06:15". */
export function plantInput(iso: string): string {
  return formatPlantDateTime(iso, { timeZone: 'Europe/London', dateFormat: DEFAULT_PLANT_DATE_FORMAT });
}
