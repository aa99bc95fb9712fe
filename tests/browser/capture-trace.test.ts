import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { SCREENSHOTS, screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';

/**
 * Tracing a field's boundary on the phone with the location faked (playwright's setGeolocation):
 * the sampler walks a 120 × 80 m rectangle without signal, taps Finish (the status says so), sends
 * the outline into the outbox, and the screen follows it there until it reaches the office once the
 * signal is back; a clerk sees it on the field page and accepts it.
 */

const suite = useServerAndBrowser({}, { viewport: { width: 390, height: 844 }, permissions: ['geolocation'] });

/** Metres per degree at 36.2° on WGS84 (geographiclib, Karney), as in tests/server/registry/boundary-proposals.test.ts. */
const M_PER_DEG_LAT = 110_963;
const M_PER_DEG_LON = 89_935;

async function walkRectangle(page: Page, origin: { lat: number; lon: number }, w: number, h: number, stepM = 4) {
  const corners: Array<[number, number]> = [[0, 0], [w, 0], [w, h], [0, h], [0, 0]];
  for (let c = 0; c < 4; c++) {
    const [ax, ay] = corners[c]!;
    const [bx, by] = corners[c + 1]!;
    const n = Math.round(Math.hypot(bx - ax, by - ay) / stepM);
    for (let k = c === 0 ? 0 : 1; k <= n; k++) {
      const x = ax + ((bx - ax) * k) / n;
      const y = ay + ((by - ay) * k) / n;
      await page.context().setGeolocation({ latitude: origin.lat + y / M_PER_DEG_LAT, longitude: origin.lon + x / M_PER_DEG_LON, accuracy: 5 });
      await page.waitForTimeout(40);
    }
  }
}

const keep = (name: string) => {
  fs.mkdirSync('/tmp/shots-plan', { recursive: true });
  fs.copyFileSync(path.join(SCREENSHOTS, `${name}.png`), `/tmp/shots-plan/${name}.png`);
};

describe('tracing a boundary on the phone', () => {
  it('records a walked rectangle offline, sends it when the signal is back, and the office accepts it', async () => {
    const { context } = suite.browser;
    const origin = { lat: 36.21, lon: -134.88 };
    await context.setGeolocation({ latitude: origin.lat, longitude: origin.lon, accuracy: 5 });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signIn(page, suite.server.url, 'sampler2@crowntip.test', SUITE_PASSWORD);
    await page.getByRole('heading', { name: "Today's walks" }).waitFor();
    await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, null, { timeout: 30_000 });
    const today = (await (await page.request.get(`${suite.server.url}/api/today`)).json()) as { items: Array<{ plantingId: string; fieldId: string; fieldName: string; boundary: unknown }> };
    const bare = today.items.find((i) => !i.boundary)!;
    expect(bare, 'a planting whose field has no boundary').toBeTruthy();

    await page.goto(`${suite.server.url}/capture/plantings/${bare.plantingId}`);
    await page.getByRole('link', { name: /Trace the boundary/ }).click();
    await page.getByRole('heading', { name: 'Trace the boundary' }).waitFor();
    await page.waitForLoadState('networkidle');

    await context.setOffline(true);
    await page.getByRole('button', { name: 'Start tracing' }).click();
    await walkRectangle(page, origin, 120, 80);
    await expect.poll(async () => page.getByTestId('trace-summary').innerText(), { timeout: 10_000 }).toMatch(/\d{2,} positions/);
    await screenshot(page, 'trace-recording-en');
    keep('trace-recording-en');
    await page.getByRole('button', { name: 'Finish' }).click();
    await page.getByTestId('trace-outline').waitFor();
    // After Finish the status says so (it once read "Paused"), and that nothing has gone yet.
    const summary = await page.getByTestId('trace-summary').innerText();
    expect(summary).toContain('Finished: the outline is saved on this phone, ready to send to the office.');
    expect(summary).not.toContain('Paused');
    await screenshot(page, 'trace-finished-en');
    keep('trace-finished-en');
    await page.getByRole('button', { name: 'Send to the office' }).click();
    await page.getByTestId('trace-sent').waitFor();
    expect(await page.getByTestId('trace-sent-state').innerText()).toBe('In the outbox: no signal, it will be sent on its own when the signal is back.');
    // The outbox banner names what waits: a field outline, not a walk.
    expect(await page.getByTestId('queue-banner').innerText()).toContain('No signal: 1 field outline waiting to send');
    await screenshot(page, 'trace-sent-offline-en');
    keep('trace-sent-offline-en');

    const proposals = () => page.request.get(`${suite.server.url}/api/fields/${bare.fieldId}/boundary-proposals`).then((r) => r.json());
    expect((await proposals()).total).toBe(0); // no signal: it waits on the phone
    await context.setOffline(false);
    await expect.poll(async () => (await proposals()).total, { timeout: 30_000 }).toBe(1);
    await expect.poll(() => page.getByTestId('trace-sent-state').innerText(), { timeout: 10_000 }).toBe('Reached the office: it waits there to be checked.');
    const [p] = (await proposals()).items;
    expect(p.status).toBe('pending');
    // 120 m × 80 m = 0.96 ha (hand-worked), within 2 % after simplifying.
    expect(Math.abs(p.areaHa - 0.96) / 0.96).toBeLessThan(0.02);
    expect(p.pointsRecorded).toBeGreaterThan(50);

    // The same screen in Spanish, a few steps into a new trace.
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'Language: Español' }).click();
    await page.goto(`${suite.server.url}/capture/plantings/${bare.plantingId}/trace`);
    await page.getByRole('heading', { name: 'Recorrer el contorno' }).waitFor();
    const second = { lat: origin.lat + 0.002, lon: origin.lon };
    await context.setGeolocation({ latitude: second.lat, longitude: second.lon, accuracy: 5 });
    await page.getByRole('button', { name: 'Empezar a recorrer' }).click();
    await walkRectangle(page, second, 40, 30);
    await page.getByRole('button', { name: 'Terminar' }).click();
    await page.getByTestId('trace-outline').waitFor();
    expect(await page.getByTestId('trace-summary').innerText()).toContain('Terminado: el contorno está guardado en este teléfono, listo para enviar a la oficina.');
    await screenshot(page, 'trace-finished-es');
    keep('trace-finished-es');
    await page.getByRole('button', { name: 'Empezar de nuevo' }).click();
    await page.getByRole('button', { name: 'Language: English' }).waitFor().catch(() => undefined);
    await page.close();
    expect(errors).toEqual([]);

    // The office: the field page shows the outline; the clerk accepts it.
    await context.clearCookies();
    const office = await context.newPage();
    await office.setViewportSize({ width: 1280, height: 800 });
    await signIn(office, suite.server.url, 'clerk@crowntip.test', SUITE_PASSWORD);
    await office.goto(`${suite.server.url}/registry/fields/${bare.fieldId}`);
    await office.getByRole('heading', { name: 'Boundaries traced on the phone' }).waitFor();
    await office.locator('#boundary-proposals').scrollIntoViewIfNeeded();
    await screenshot(office, 'trace-office-field');
    keep('trace-office-field');
    await office.getByRole('button', { name: 'Accept boundary' }).click();
    await office.getByText('Traced boundary accepted').waitFor();
    await screenshot(office, 'trace-office-accepted');
    keep('trace-office-accepted');
    const field = await (await office.request.get(`${suite.server.url}/api/fields/${bare.fieldId}`)).json();
    expect(field.boundary).toEqual(p.boundary);
    await office.close();
  });
});
