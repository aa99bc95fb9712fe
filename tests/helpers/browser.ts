import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { startServer, type RunningServer } from './server';

export const SCREENSHOTS = path.resolve('tests/browser/screenshots');

/** Debian's Chromium, headless, with flags that keep it off the network it has no use for (updates, sync, QUIC) and without a GPU or sandbox, as on a build machine. */
export interface BrowserOptions {
  viewport?: { width: number; height: number };
  /** Permissions granted to every origin, e.g. ['geolocation']. */
  permissions?: string[];
  /** A fixed position for navigator.geolocation. */
  geolocation?: { latitude: number; longitude: number; accuracy?: number };
  locale?: string;
  /** The browser's time zone (IANA name), e.g. 'Etc/GMT+8'. */
  timezoneId?: string;
}

export async function openBrowser(options: BrowserOptions = {}): Promise<{
  context: BrowserContext;
  close: () => Promise<void>;
}> {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    viewport: options.viewport ?? { width: 1280, height: 860 },
    permissions: options.permissions,
    geolocation: options.geolocation,
    locale: options.locale,
    timezoneId: options.timezoneId,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    context,
    close: async () => {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

export async function screenshot(page: Page, name: string) {
  fs.mkdirSync(SCREENSHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOTS, `${name}.png`), fullPage: true });
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string) {
  await page.goto(`${baseUrl}/login`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForLoadState('networkidle');
}

export const SUITE_PASSWORD = 'browser-demo-password';

/**
 * One real server and one Chromium for a test file: started before its tests, stopped after.
 * Read `suite.server` and `suite.browser` inside tests (they are set once the suite has started).
 */
export function useServerAndBrowser(env: Record<string, string> = {}, options: Parameters<typeof openBrowser>[0] = {}) {
  const suite = {} as { server: RunningServer; browser: Awaited<ReturnType<typeof openBrowser>> };
  beforeAll(async () => {
    suite.server = await startServer({ DEMO_PASSWORD: SUITE_PASSWORD, ...env });
    suite.browser = await openBrowser(options);
  });
  afterAll(async () => {
    await suite.browser?.close();
    await suite.server?.stop();
  });
  return suite;
}
