import fs from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { getDocumentProxy } from 'unpdf';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';
import { openDatabase } from '../../server/platform/database';
import { at } from '../helpers/lists';
import { estimateSnapshot, ORG, userId } from '../helpers/register-scenario';
import { seasonOfDate, seasonStartYear, seasonStarting, todayIso } from '../../shared/registry/season';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();
let versionUrl = '';

// Last season's demo plantings (e.g. 2025-26, reporting year 2026) are terminated but have no
// walks: give them approved walks straight in the server's database, so the register has credits.
const CURRENT_START = seasonStartYear(seasonOfDate(todayIso()));
const LAST_SEASON = seasonStarting(CURRENT_START - 1);
const YEAR = CURRENT_START;
async function addApprovedWalks(dataDir: string) {
  const db = openDatabase(path.join(dataDir, 'crowntip.sqlite'));
  try {
    const plantings: { id: string; seeded_on: string; terminated_on: string }[] = await db('plantings')
      .where({ organisation_id: ORG, season: LAST_SEASON })
      .whereNotNull('terminated_on')
      .orderBy('id');
    const now = new Date().toISOString();
    const minus = (iso: string, days: number) => new Date(Date.parse(`${iso}T00:00:00Z`) - days * 86_400_000).toISOString().slice(0, 10);
    const biomass = [6200, 5600, 4300, 7000, 6400];
    await db('field_walks').insert(
      plantings.map((p, i) => {
        const walkedOn = minus(p.terminated_on, i % 5 === 4 ? 45 : 10);
        return {
          id: randomUUID(),
          organisation_id: ORG,
          planting_id: p.id,
          sampler_id: userId('sampler2@crowntip.test'),
          walked_on: walkedOn < p.seeded_on ? p.seeded_on : walkedOn,
          status: 'approved',
          content_hash: 'browser-test',
          estimate: JSON.stringify(estimateSnapshot(at(biomass, i % 5, 'biomass'), 70 + (i % 5) * 4)),
          created_at: now,
          reviewed_by: userId('clerk@crowntip.test'),
          reviewed_at: now,
        };
      }),
    );
  } finally {
    await db.destroy();
  }
}

beforeAll(() => addApprovedWalks(suite.server.dataDir));

describe('credit registers in the browser', () => {
  it('a clerk finalises a register, prints it, sends it to the grower and builds the organisation’s register', async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Registers' }).click();
    await expect(page.getByRole('heading', { name: /^Credit registers \d{4}$/ }).count()).resolves.toBe(1);
    await page.getByLabel('Reporting year').selectOption(String(YEAR));
    await page.getByRole('button', { name: 'Show' }).click();
    await expect(page.getByRole('heading', { name: `Credit registers ${YEAR}` }).count()).resolves.toBe(1);
    expect(await page.getByRole('img', { name: /Credit by ranch/ }).count()).toBe(1);

    // The organisation's register, built in the background with a progress bar.
    await page.getByRole('button', { name: 'Build the organisation’s register' }).click();
    await page.getByRole('link', { name: 'Download PDF' }).waitFor({ state: 'visible', timeout: 30_000 });
    expect(await page.locator('progress').evaluate((el) => (el as HTMLProgressElement).value)).toBe(100);
    expect(await page.getByRole('status').textContent()).toMatch(/^Ready: \d+ fields of \d+ ranches \(100 %\)\.$/);
    await screenshot(page, 'registers-overview');

    await page.getByRole('link', { name: 'Sandpiper Bench' }).click();
    await expect(page.getByRole('heading', { name: `Credit register · Sandpiper Bench · ${YEAR}` }).count()).resolves.toBe(1);
    await screenshot(page, 'registers-draft');
    await page.getByRole('checkbox', { name: /I have checked these \d+ rows/ }).check();
    await page.getByRole('button', { name: 'Finalise register' }).click();
    await page.waitForURL(/\/registers\/v\/[0-9a-f-]+$/);
    versionUrl = page.url();
    expect(await page.getByText('Register finalised as version 1.').count()).toBe(1);
    const hash = (await page.locator('[data-content-hash]').textContent())!.trim();
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    await screenshot(page, 'registers-version');

    // Print view: the same page under print CSS (A4 landscape by default, US Letter on request).
    await page.setViewportSize({ width: 1123, height: 794 });
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    expect(await page.getByText(`sha256 ${hash}`).isVisible()).toBe(true);
    expect(await page.getByRole('heading', { name: 'Provenance' }).isVisible()).toBe(true);
    await screenshot(page, 'registers-print-a4');
    const a4 = await getDocumentProxy(new Uint8Array(await page.pdf({ preferCSSPageSize: true })));
    const a4Page = await a4.getPage(1);
    expect(a4Page.view.map(Math.round)).toEqual([0, 0, 842, 595]); // A4 landscape in points
    await page.emulateMedia({ media: 'screen' });
    await page.getByRole('link', { name: 'US Letter' }).click();
    await page.emulateMedia({ media: 'print' });
    const letter = await getDocumentProxy(new Uint8Array(await page.pdf({ preferCSSPageSize: true })));
    expect((await letter.getPage(1)).view.map(Math.round)).toEqual([0, 0, 792, 612]); // US Letter landscape
    await screenshot(page, 'registers-print-letter');
    await page.emulateMedia({ media: 'screen' });
    await page.setViewportSize({ width: 1280, height: 860 });

    // Send to grower: asked first in a dialog (the page without script asks on a page of its own),
    // then the PDF goes to the ranch's addresses.
    const asked = new Promise<string>((resolve) => page.once('dialog', (d) => (resolve(d.message()), void d.accept())));
    await page.getByRole('button', { name: 'Send to grower' }).click();
    expect(await asked).toBe('Send version 1 of this register as PDF to grower@sandpiper-bench.test? An e-mail cannot be taken back.');
    await page.getByText('Register version 1 sent as PDF').waitFor();
    expect(await page.getByText('Register version 1 sent as PDF to grower@sandpiper-bench.test.').count()).toBe(1);
    await page.close();
  });

  it('an auditor opens the version read-only and downloads the PDF', async () => {
    await suite.browser.context.clearCookies();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'auditor@crowntip.test', PASSWORD);
    await page.goto(versionUrl);
    expect(await page.getByRole('button', { name: 'Send to grower' }).count()).toBe(0);
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download PDF' }).click()]);
    expect(download.suggestedFilename()).toMatch(new RegExp(`^crowntip-register-sandpiper-bench-${YEAR}-v1\\.pdf$`));
    const file = await download.path();
    const head = fs.readFileSync(file).subarray(0, 4).toString();
    expect(head).toBe('%PDF');
    await page.close();
  });

  it('the admin finds the e-mail with its PDF attachment in the Outbox', async () => {
    await suite.browser.context.clearCookies();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'admin@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Outbox' }).click();
    await page.getByRole('link', { name: /Credit register \d{4}: Sandpiper Bench \(version 1\)/ }).click();
    const attachments = page.getByText(/crowntip-register-sandpiper-bench-\d{4}-v1\.pdf \(application\/pdf, \d+ bytes\)/);
    expect(await attachments.count()).toBe(1);
    await screenshot(page, 'registers-outbox');
    await page.close();
  });
});
