import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();


describe('registry CSV import in the browser', () => {
  it('a clerk uploads the example file, checks the preview, imports it and watches the progress reach 100 %', async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Registry' }).click();
    await page.getByRole('navigation', { name: 'Registry' }).getByRole('link', { name: 'Import CSV' }).click();
    await page.getByRole('heading', { name: 'Import the registry from a CSV file' }).waitFor();
    await screenshot(page, 'import-upload');

    // The example file, downloaded with the clerk's session, uploaded back as a clerk would.
    const example = await page.request.get(`${suite.server.url}/registry/import/example.csv`);
    expect(example.status()).toBe(200);
    await page.getByLabel('CSV file').setInputFiles({ name: 'crowntip-registry-example.csv', mimeType: 'text/csv', buffer: await example.body() });
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.waitForURL(/\/registry\/import\/[a-f0-9]{32}$/);

    await page.getByRole('heading', { name: 'Check the import' }).waitFor();
    expect(await page.getByText('Will create ranch Kestrel Mesa').count()).toBe(1);
    expect(await page.getByText('Will create ranch Willowdrift Ranch').count()).toBe(1);
    expect(await page.getByText('No problems found').count()).toBe(1);
    expect(await page.getByLabel('Field', { exact: true }).inputValue()).toBe('1');
    expect(await page.getByLabel('Unit of the area').inputValue()).toBe('ac');
    expect(await page.getByRole('cell', { name: 'North 40 Flats' }).count()).toBe(1);
    await screenshot(page, 'import-preview');

    await page.getByRole('button', { name: 'Import 20 rows' }).click();
    await page.getByText('Imported 20 rows: 2 new ranches, 20 new fields, 20 plantings.').waitFor({ timeout: 20_000 });
    const progress = page.getByRole('progressbar', { name: 'Import progress' });
    expect(await progress.evaluate((el) => (el as HTMLProgressElement).value / (el as HTMLProgressElement).max)).toBe(1);
    expect(await page.getByText('Import complete: 100 %').count()).toBe(1);
    await screenshot(page, 'import-done');

    await page.getByRole('link', { name: 'See the import summary' }).click();
    await page.getByRole('heading', { name: 'Import finished' }).waitFor();
    expect(await page.getByText('2 ranches created: Kestrel Mesa, Willowdrift Ranch.').count()).toBe(1);
    await screenshot(page, 'import-result');

    // The imported fields are in the registry.
    await page.getByRole('link', { name: 'Go to the ranches' }).click();
    expect(await page.getByRole('link', { name: 'Willowdrift Ranch' }).count()).toBe(1);
    await page.close();
  });

  it('a file with problems lists them all and cannot be imported', async () => {
    const page = await suite.browser.context.newPage();
    await page.goto(`${suite.server.url}/registry/import`);
    await page.getByLabel('CSV file').setInputFiles('tests/fixtures/import/errors.csv');
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.getByRole('heading', { name: 'Problems (9)' }).waitFor();
    expect(await page.getByRole('button', { name: 'Import 8 rows' }).isDisabled()).toBe(true);
    expect(await page.getByRole('cell', { name: 'The ranch is missing.' }).count()).toBe(1);
    const download = page.waitForEvent('download');
    await page.getByRole('link', { name: 'Download the problems (CSV)' }).click();
    const text = fs.readFileSync((await (await download).path())!, 'utf8');
    expect(text).toContain(",'=cmd(),");
    await screenshot(page, 'import-problems');
    await page.close();
  });

  it('shows a refused upload in place without leaving the page', async () => {
    const page = await suite.browser.context.newPage();
    await page.goto(`${suite.server.url}/registry/import`);
    await page.getByLabel('CSV file').setInputFiles({ name: 'notes.csv', mimeType: 'text/csv', buffer: Buffer.from('ranch,field\n') });
    await page.getByRole('button', { name: 'Upload and check' }).click();
    await page.getByText('The file has a header line but no rows.').waitFor();
    expect(new URL(page.url()).pathname).toBe('/registry/import');
    await page.close();
  });
});
