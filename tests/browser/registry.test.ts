import { describe, expect, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();


describe('the farm registry in the browser', () => {
  it('a clerk adds a ranch, a field with a boundary and a planting, and finds them in the season view', async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Registry' }).click();
    await page.getByRole('link', { name: 'New ranch' }).click();
    await page.getByLabel('Name').fill('Larkspur Mesa');
    await page.getByLabel('Code (optional)').fill('LM');
    await page.getByRole('button', { name: 'Add ranch' }).click();
    await expect(page.getByRole('heading', { name: 'Larkspur Mesa' }).count()).resolves.toBe(1);

    await page.getByRole('link', { name: 'Add field' }).click();
    await page.getByLabel('Field name').fill('Mesa Top');
    await page.getByLabel('Area (acres)').fill('12.5');
    const geo = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'geo-')), 'mesa-top.geojson');
    fs.writeFileSync(geo, JSON.stringify({ type: 'Polygon', coordinates: [[[-134.95, 36.25], [-134.9468, 36.25], [-134.9468, 36.2514], [-134.95, 36.2514], [-134.95, 36.25]]] }));
    await page.getByLabel(/Boundary \(optional\)/).setInputFiles(geo);
    await page.getByRole('button', { name: 'Add field' }).click();
    await expect(page.getByRole('heading', { name: 'Mesa Top' }).count()).resolves.toBe(1);
    expect(await page.getByRole('img', { name: 'Outline of Mesa Top' }).count()).toBe(1);

    await page.getByRole('link', { name: 'Add planting' }).click();
    await page.getByLabel('Crop').selectOption('cereal_rye');
    await page.getByLabel('Variety (optional)').fill('Demo Rye 12');
    const season = await page.getByLabel('Season').inputValue();
    await page.getByLabel('Seeded on').fill(`${season.slice(0, 4)}-10-20`);
    await page.getByRole('button', { name: 'Save planting' }).click();
    expect(await page.getByRole('cell', { name: 'Cereal rye' }).count()).toBe(1);
    await screenshot(page, 'registry-field');

    await page.getByRole('link', { name: 'Season view' }).click();
    await page.getByLabel('Ranch').selectOption({ label: 'Larkspur Mesa' });
    await page.getByRole('button', { name: 'Show' }).click();
    const row = page.getByRole('row', { name: /Mesa Top/ });
    expect(await row.count()).toBe(1);
    expect(await row.textContent()).toContain('Cereal rye');
    await screenshot(page, 'registry-season');
    await page.close();
  });

  it('an auditor sees the same pages without edit controls', async () => {
    await suite.browser.context.clearCookies();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'auditor@crowntip.test', PASSWORD);
    await page.goto(`${suite.server.url}/registry/ranches`);
    expect(await page.getByRole('link', { name: 'Larkspur Mesa' }).count()).toBe(1);
    expect(await page.getByRole('link', { name: 'New ranch' }).count()).toBe(0);
    await page.getByRole('link', { name: 'Larkspur Mesa' }).click();
    expect(await page.getByRole('link', { name: /Add field|Edit ranch/ }).count()).toBe(0);
    await page.getByRole('link', { name: 'Mesa Top' }).click();
    expect(await page.getByRole('link', { name: /Add planting|Edit field|Edit/ }).count()).toBe(0);
    await page.getByRole('link', { name: 'Change history' }).click();
    expect(await page.getByText('Field “Mesa Top” created on Larkspur Mesa').count()).toBe(1);
    await screenshot(page, 'registry-history-auditor');
    await page.close();
  });
});
