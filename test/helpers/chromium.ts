import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

/** Debian's chromium (apt-get install chromium); .ci/run installs it. */
export const CHROMIUM = '/usr/bin/chromium';

/**
 * True when the browser tests should run: chromium is installed, or we are under
 * CI (where a missing browser must fail, not skip). Prints one line when skipping.
 */
export function shouldRunBrowserTests(): boolean {
  if (existsSync(CHROMIUM) || Boolean(process.env['CI'])) return true;
  console.warn(`browser tests skipped: ${CHROMIUM} not found (apt-get install -y chromium)`);
  return false;
}

/** A page opened from a file, with every console error, page error and request it made. */
export interface OpenedPage {
  readonly page: Page;
  readonly errors: string[];
  /** Every request except the page's own file (data: URIs are not requests). */
  readonly requests: string[];
}

/** One headless chromium, offline-minded flags, a fresh profile; close() removes the profile. */
export async function launchChromium(
  viewport = { width: 1400, height: 1000 },
): Promise<{ open: (path: string) => Promise<OpenedPage>; openUrl: (url: string) => Promise<OpenedPage>; close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'rectboost-chromium-'));
  const context: BrowserContext = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport,
    args: [
      '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync',
    ],
  });
  const openUrl = async (url: string): Promise<OpenedPage> => {
    const page = await context.newPage();
    const errors: string[] = [];
    const requests: string[] = [];
    page.on('console', (message) => {
      if (message.type() === 'error') errors.push(message.text());
    });
    page.on('pageerror', (error) => errors.push(error.message));
    page.on('request', (request) => {
      if (request.url() !== url) requests.push(request.url());
    });
    await page.goto(url, { waitUntil: 'load' });
    return { page, errors, requests };
  };
  return {
    open: async (path: string) => openUrl(pathToFileURL(path).href),
    /** A page served over HTTP (module scripts do not load from file: URLs). */
    openUrl,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}
