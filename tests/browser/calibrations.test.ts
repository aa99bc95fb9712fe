import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';
import { CM_PER_IN, lengthForBiomass, type Fit } from '../../shared/calc';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();
const FIXTURE = path.resolve('tests/fixtures/calibration/rye-inches-lbac.csv');


describe('calibrations in the browser', () => {
  it('an admin uploads a CSV, checks it, compares the fits, publishes and prints the lookup table', async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'admin@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Calibrations' }).click();
    await page.getByRole('heading', { name: 'Calibrations', level: 1 }).waitFor();
    expect(await page.getByText('Demo data — not for real credits').count()).toBeGreaterThan(0);
    await screenshot(page, 'calibrations-list');

    // Upload (through the page's script, with upload progress) and preview.
    await page.getByRole('link', { name: 'New calibration' }).first().click();
    await page.getByLabel(/CSV file/).setInputFiles(FIXTURE);
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.waitForURL(/\/calibrations\/uploads\/[0-9a-f-]{36}$/);
    await page.getByText('All 150 rows are good').waitFor();
    // Units come from the header hints: "Mean length (in)", "Biomass (lb/ac)".
    expect(await page.getByLabel('Unit of the length column').inputValue()).toBe('in');
    expect(await page.getByLabel('Unit of the biomass column').inputValue()).toBe('lb_ac');
    await page.getByLabel('Crop').selectOption({ label: 'Cereal rye' });
    await page.getByLabel('Region (optional)').fill('Browser test valley');
    await screenshot(page, 'calibration-preview');
    await page.getByRole('button', { name: 'Save draft' }).click();

    // Fit page: four models, charts, the recommendation.
    await page.waitForURL(/\/calibrations\/[0-9a-f-]{36}$/);
    const calibrationUrl = page.url();
    await page.getByRole('heading', { name: 'The four models compared' }).waitFor();
    expect(await page.locator('#model-comparison tbody tr').count()).toBe(4);
    expect(await page.getByRole('img', { name: /biomass against mean main shoot length/ }).count()).toBe(1);
    expect(await page.getByRole('img', { name: /residuals against fitted biomass/ }).count()).toBe(1);
    expect(await page.getByText('Recommendation:').count()).toBe(1);
    await screenshot(page, 'calibration-fit');

    // Publish the power curve.
    await page.getByRole('radio', { name: /^Power/ }).check();
    await page.getByLabel('Name of this version').fill('Browser trial, invented points');
    // Asked first in a dialog (without script, on a confirmation page).
    const asked = new Promise<string>((resolve) => page.once('dialog', (d) => (resolve(d.message()), void d.accept())));
    await page.getByRole('button', { name: 'Publish' }).click();
    expect(await asked).toBe('Publish this calibration? A published version never changes.');
    await page.getByText(/Published as version 1/).waitFor();
    expect(page.url()).toBe(calibrationUrl);
    expect(await page.getByRole('button', { name: 'Publish' }).count()).toBe(0);

    // The printable lookup table in inches.
    await page.getByRole('link', { name: 'Lookup table in inches' }).click();
    await page.getByRole('heading', { name: /Lookup table: Cereal rye/ }).waitFor();
    expect(await page.getByRole('button', { name: 'Print' }).count()).toBe(1);
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    await screenshot(page, 'calibration-table-print');

    // The highlighted row is the first 1-inch step at or above the length lengthForBiomass gives.
    const id = calibrationUrl.split('/').pop()!;
    const api = await page.request.get(`${suite.server.url}/api/calibrations/${id}`);
    expect(api.status()).toBe(200);
    const fit = (await api.json()).fit as Fit;
    const threshold = Number(await page.locator('[data-threshold-kg-ha]').getAttribute('data-threshold-kg-ha'));
    const at = lengthForBiomass(fit, threshold);
    expect(at.ok).toBe(true);
    if (!at.ok) return;
    const rows = page.locator('tr[data-threshold="true"]');
    expect(await rows.count()).toBe(1);
    const printedLength = Number(await rows.getAttribute('data-length'));
    expect(printedLength).toBe(Math.ceil(at.x / CM_PER_IN - 1e-9));
    expect(await rows.innerText()).toContain('threshold');
    // Rye needs roughly 31 in to reach 4,500 lb/ac (product brief, common practice).
    expect(Math.abs(printedLength - 31)).toBeLessThanOrEqual(2);
    await page.emulateMedia({ media: 'screen' });
    await screenshot(page, 'calibration-table');
    await page.close();
  });

  it('the auditor reads published calibrations without any controls', async () => {
    await suite.browser.context.clearCookies();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'auditor@crowntip.test', PASSWORD);
    await page.goto(`${suite.server.url}/calibrations`);
    await page.getByRole('link', { name: 'Triticale' }).first().click();
    await page.getByRole('heading', { name: 'The four models compared' }).waitFor();
    expect(await page.getByRole('button', { name: /publish|retire|delete|new draft/i }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'New calibration' }).count()).toBe(0);
    await page.close();
  });
});
