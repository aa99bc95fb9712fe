import { describe, expect, it } from 'vitest';
import { screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';

/**
 * The entry screen, one stop at a time: an empty Next asks before skipping a stop, a skipped stop
 * is recorded and sent with the walk, and confirming a questioned length never moves on twice.
 */

const suite = useServerAndBrowser({}, { viewport: { width: 390, height: 844 } });

describe('/capture entry screen', () => {
  it('asks before skipping an empty stop, records the skip and sends it; Yes then Next moves one stop', async () => {
    const page = await suite.browser.context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    const posted: unknown[] = [];
    page.on('request', (r) => {
      if (r.method() === 'POST' && new URL(r.url()).pathname === '/api/walks') posted.push(r.postDataJSON());
    });

    await signIn(page, suite.server.url, 'sampler2@crowntip.test', SUITE_PASSWORD);
    await page.getByRole('heading', { name: 'Assigned to you', level: 2 }).waitFor();
    await screenshot(page, 'capture-today-groups-en');
    await page.getByRole('link', { name: /Open the walk plan for Bench 1/ }).first().click();
    await page.getByRole('button', { name: 'Start the walk' }).click();
    await page.getByRole('heading', { name: 'Stop 1 of 10' }).waitFor();
    const label = /Main shoot length/;

    // Next on an empty stop asks first; "No" stays on the stop.
    await page.getByRole('button', { name: /Next/ }).click();
    await page.getByText('Skip stop 1?').waitFor();
    await screenshot(page, 'capture-entry-skip-en');
    await page.getByRole('button', { name: 'No, measure it' }).click();
    await page.getByRole('heading', { name: 'Stop 1 of 10' }).waitFor();
    expect(await page.getByText('Skip stop 1?').count()).toBe(0);

    // "Yes" skips it, and its chip says so.
    await page.getByRole('button', { name: /Next/ }).click();
    await page.getByRole('button', { name: 'Yes, skip stop 1' }).click();
    await page.getByRole('heading', { name: 'Stop 2 of 10' }).waitFor();
    await page.getByRole('button', { name: 'Stop 1: skipped' }).waitFor();

    for (const [stop, v] of [[2, '30'], [3, '31'], [4, '29'], [5, '32']] as const) {
      await page.getByRole('heading', { name: `Stop ${stop} of 10` }).waitFor();
      await page.getByLabel(label).fill(v);
      await page.getByRole('button', { name: /Next/ }).click();
    }
    // Stop 6: 3 in among ~30 in is questioned; "Yes, it is right" keeps it, then Next moves one stop.
    await page.getByRole('heading', { name: 'Stop 6 of 10' }).waitFor();
    await page.getByLabel(label).fill('3');
    await page.getByRole('button', { name: /Next/ }).click();
    await page.getByRole('button', { name: 'Yes, it is right' }).click();
    await page.getByRole('button', { name: /Next/ }).click();
    await page.getByRole('heading', { name: 'Stop 7 of 10' }).waitFor();
    // Stop 7 was not skipped behind the sampler's back.
    expect(await page.getByRole('button', { name: 'Stop 7: skipped' }).count()).toBe(0);
    expect(await page.getByText('Skip stop 7?').count()).toBe(0);

    for (const [stop, v] of [[7, '30'], [8, '31'], [9, '29']] as const) {
      await page.getByRole('heading', { name: `Stop ${stop} of 10` }).waitFor();
      await page.getByLabel(label).fill(v);
      await page.getByRole('button', { name: /Next/ }).click();
    }
    await page.getByRole('heading', { name: 'Stop 10 of 10' }).waitFor();
    await page.getByLabel(label).fill('30');
    await page.getByRole('button', { name: 'Check and send' }).click();

    await page.getByRole('heading', { name: 'Check and send', level: 1 }).waitFor();
    await page.getByText('Stop 1 was skipped.').waitFor();
    await screenshot(page, 'capture-finish-skipped-en');
    await page.getByRole('button', { name: 'Send the walk' }).click();
    await page.getByRole('heading', { name: /Walk sent/ }).waitFor({ timeout: 30_000 });

    expect(posted).toHaveLength(1);
    const body = posted[0] as { skippedStops?: number[]; plants: Array<{ stop: number }>; planSeed?: string };
    expect(body.skippedStops).toEqual([1]);
    // The seed the plan drew its stops from goes with the walk (shared/calc/walk-plan.ts, newWalkSeed: 12 base-36 characters).
    expect(body.planSeed).toMatch(/^[0-9a-z]{12}$/);
    expect(body.plants.map((p) => p.stop)).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('keeps the verdict and biomass in sight while typing, on one line; the unit once; stop chips fill their row', async () => {
    const page = await suite.browser.context.newPage();
    await page.goto(`${suite.server.url}/capture`); // still signed in from the test above
    await page.getByRole('link', { name: /Open the walk plan for Bench 3/ }).first().click();
    await page.getByRole('button', { name: /Start the walk|Continue the walk/ }).click();
    await page.getByRole('heading', { name: 'Stop 1 of 10' }).waitFor();
    const input = page.getByLabel(/Main shoot length/);
    for (const v of ['30', '31', '29', '32', '30']) {
      await input.fill(v);
      await page.getByRole('button', { name: /Next/ }).click();
    }
    await page.getByRole('heading', { name: 'Stop 6 of 10' }).waitFor();
    await input.fill('3');

    // Scrolled as far down as the page goes (as when the keyboard pushes it up), the summary is
    // still fully inside the 844 px screen.
    await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
    const summary = page.getByTestId('estimate-summary');
    // Five plants under the demo rule's minimum of 10: borderline, however long they are.
    await expect.poll(async () => (await summary.getAttribute('data-verdict')) ?? '').toBe('borderline');
    await summary.getByText('Borderline — too few plants').waitFor();
    const box = (await summary.boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(0);
    expect(box.y + box.height).toBeLessThanOrEqual(844);
    expect(await page.getByTestId('summary-biomass').textContent()).toMatch(/^[\d,]+ lb\/ac$/);
    await screenshot(page, 'capture-entry-sticky-en');

    // Biomass on one line, in the summary and in the full panel ("5,752 lb/ac" must not wrap).
    const lines = (testId: string) =>
      page.getByTestId(testId).evaluate((el) => {
        const r = document.createRange();
        r.selectNodeContents(el);
        return new Set([...r.getClientRects()].map((rect) => Math.round(rect.top))).size;
      });
    expect(await lines('summary-biomass')).toBe(1);
    expect(await lines('biomass')).toBe(1);

    // The unit shows once: beside the number, not also in the label.
    expect((await page.locator('label[for="length"]').innerText()).trim()).toBe('Main shoot length');
    expect(await page.locator('#length-unit').innerText()).toBe('in');

    // The stop chips fill their row: chip 1 starts at the row's left edge, chip 5 ends at its right.
    const row = (await page.getByRole('navigation', { name: 'Stops' }).locator('ol').boundingBox())!;
    const first = (await page.getByRole('button', { name: /^Stop 1: / }).boundingBox())!;
    const fifth = (await page.getByRole('button', { name: /^Stop 5: / }).boundingBox())!;
    expect(Math.abs(first.x - row.x)).toBeLessThan(1);
    expect(Math.abs(fifth.x + fifth.width - (row.x + row.width))).toBeLessThan(1);
    await page.close();
  });

  it('en español: the summary, the skip question and the skipped stop on check and send', async () => {
    const page = await suite.browser.context.newPage();
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'Language: Español' }).click();
    await page.getByRole('heading', { name: 'Asignados a ti', level: 2 }).or(page.getByRole('heading', { name: 'Otras siembras abiertas', level: 2 })).first().waitFor();
    await page.getByRole('link', { name: 'Seguir: Bench 3' }).click();
    await page.getByRole('heading', { name: 'Parada 6 de 10' }).waitFor();
    await page.getByLabel(/Largo del tallo principal/).fill('');
    await page.getByTestId('estimate-summary').getByText('En el límite — pocas plantas').waitFor();
    await page.getByRole('button', { name: /Siguiente/ }).click();
    await page.getByText('¿Saltar la parada 6?').waitFor();
    await screenshot(page, 'capture-entry-skip-es');
    await page.getByRole('button', { name: 'Sí, saltar la parada 6' }).click();
    await page.getByRole('heading', { name: 'Parada 7 de 10' }).waitFor();
    await page.getByRole('button', { name: 'Parada 6: saltada' }).waitFor();
    await page.goto(page.url() + '/finish');
    await page.getByText('La parada 6 se saltó.').waitFor();
    await screenshot(page, 'capture-finish-skipped-es');
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'Idioma: English' }).click();
    await page.getByRole('heading', { name: "Today's walks" }).waitFor();
    await page.close();
  });
});
