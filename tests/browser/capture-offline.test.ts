import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';

/**
 * A sampler in a field without signal: the app must open from the phone as many times as needed
 * (reloads, a new tab after the old one was killed), show the walk in progress and keep every
 * keystroke. Only an answer from the server that the session is over may ask for a new sign-in.
 */

const suite = useServerAndBrowser({}, { viewport: { width: 390, height: 844 } });

/** What IndexedDB holds for a walk in progress: the text typed per stop. */
async function storedValues(page: Page, walkId: string): Promise<Record<string, string> | null> {
  return page.evaluate(
    (id) =>
      new Promise<Record<string, string> | null>((resolve, reject) => {
        const open = indexedDB.open('crowntip-drafts');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const db = open.result;
          const req = db.transaction('drafts', 'readonly').objectStore('drafts').get(id);
          req.onsuccess = () => {
            db.close();
            resolve(req.result ? (req.result.values as Record<string, string>) : null);
          };
          req.onerror = () => reject(req.error);
        };
      }),
    walkId,
  );
}

describe('/capture without signal', () => {
  it('opens a walk in progress after 5 reloads and a cold start offline, and typing still saves', async () => {
    const { context } = suite.browser;
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));

    await signIn(page, suite.server.url, 'sampler@crowntip.test', SUITE_PASSWORD);
    await page.getByRole('heading', { name: 'Recorridos de hoy' }).waitFor();
    await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, null, { timeout: 30_000 });
    await page.waitForLoadState('networkidle');

    await page.getByRole('link', { name: 'Abrir el plan de recorrido de Bench 2' }).click();
    await page.getByRole('button', { name: 'Empezar el recorrido' }).click();
    await page.getByRole('heading', { name: 'Parada 1 de 10' }).waitFor();
    const walkId = new URL(page.url()).pathname.split('/')[3]; // /capture/walks/:id
    if (!walkId) throw new Error(`not on a walk: ${page.url()}`);
    const label = /Largo del tallo principal/;
    await page.getByLabel(label).fill('30');
    await page.getByRole('button', { name: /Siguiente/ }).click();
    await page.getByRole('heading', { name: 'Parada 2 de 10' }).waitFor();
    // Let the persisted query cache settle (it is written a moment after the last change).
    await page.waitForTimeout(1_000);

    await context.setOffline(true);
    for (let n = 1; n <= 5; n++) {
      await page.reload();
      await page.getByRole('heading', { name: 'Parada 2 de 10' }).waitFor({ timeout: 30_000 });
      const typed = String(30 + n);
      await page.getByLabel(label).fill(typed);
      await expect.poll(async () => (await storedValues(page, walkId))?.['2'], { timeout: 5_000 }).toBe(typed);
      expect(await page.getByText('Abre Crowntip una vez con señal').count()).toBe(0);
      // A sampler takes longer than this between reloads: time enough for the failed tries to
      // reach the server to run out (1 s then 2 s apart) and for the query cache to be written.
      await page.waitForTimeout(4_000);
    }
    await screenshot(page, 'capture-offline-entry-es');

    // The tab is killed; a new one opens the app cold, still without signal.
    await page.close();
    const cold = await context.newPage();
    cold.on('pageerror', (e) => errors.push(e.message));
    await cold.goto(`${suite.server.url}/capture`);
    await cold.getByRole('heading', { name: 'Recorridos sin terminar' }).waitFor({ timeout: 30_000 });
    await cold.getByText('2 de 10 plantas medidas').first().waitFor();
    await screenshot(cold, 'capture-offline-today-es');
    await cold.getByRole('link', { name: 'Seguir: Bench 2' }).click();
    await cold.getByRole('heading', { name: 'Parada 2 de 10' }).waitFor();
    expect(await cold.getByLabel(label).inputValue()).toBe('35');
    await cold.getByLabel(label).fill('36');
    await expect.poll(async () => (await storedValues(cold, walkId))?.['2'], { timeout: 5_000 }).toBe('36');

    await context.setOffline(false);
    expect(errors).toEqual([]);
    await cold.close();
  });
});
