// Headless Chromium for the browser tests: Debian's /usr/bin/chromium driven by playwright-core,
// never a downloaded browser. Each launch gets a fresh profile so no cookie or cache carries over.
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

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
