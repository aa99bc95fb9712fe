import { describe, expect, it } from 'vitest';
import { screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';
import { at } from '../helpers/lists';

/**
 * The walk plan far from the field: one plain sentence with the distance, no "you are here" dot
 * pinned to the drawing's edge, no stop distance in hundreds of thousands of feet. Near the field:
 * the dot and the distance to the next stop.
 */

const suite = useServerAndBrowser({}, { viewport: { width: 390, height: 844 } });

interface Today {
  items: Array<{ fieldName: string; boundary: { type: string; coordinates: unknown } | null }>;
}

/** Bench 1's outline as the server gives it to the phone (wherever the demo puts it). */
async function benchOneCorners(): Promise<Array<[number, number]>> {
  const res = await fetch(`${suite.server.url}/api/session`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'sampler2@crowntip.test', password: SUITE_PASSWORD }),
  });
  const cookie = res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
  const today = (await (await fetch(`${suite.server.url}/api/today?limit=500`, { headers: { cookie, accept: 'application/json' } })).json()) as Today;
  const b = today.items.find((i) => i.fieldName === 'Bench 1')!.boundary!;
  const rings = (b.type === 'Polygon' ? [b.coordinates] : b.coordinates) as Array<Array<Array<[number, number]>>>;
  return rings.flatMap((poly) => at(poly, 0, 'outer ring'));
}

describe('/capture walk plan', () => {
  it('far from the field says how far in miles and kilometres and hides the dot; near it shows both', async () => {
    const { context } = suite.browser;
    const corners = await benchOneCorners();
    // The northernmost corner, and a point 68 km due north of it: along a meridian 1° of latitude
    // is 2π × 6371.0088 km / 360 = 111.19508 km (mean Earth radius, IUGG), so 68 km is
    // 68 / 111.19508 = 0.611537°. 68 km / 1.609344 km per mile = 42.25 mi → "42 mi (68 km)".
    const [lon, lat] = corners.reduce((a, c) => (c[1] > a[1] ? c : a));
    await context.grantPermissions(['geolocation']);
    await context.setGeolocation({ latitude: lat + 68 / 111.19508, longitude: lon, accuracy: 8 });

    const page = await context.newPage();
    await signIn(page, suite.server.url, 'sampler2@crowntip.test', SUITE_PASSWORD);
    await page.getByRole('link', { name: 'Open the walk plan for Bench 1' }).click();
    await page.getByRole('heading', { name: 'Bench 1', level: 1 }).waitFor();
    await page.getByText('You are about 42 mi (68 km) from this field').waitFor();
    expect(await page.getByText(/Stop \d+ is .* away/).count()).toBe(0);
    expect(await page.getByRole('img', { name: /Field outline/ }).getByText('You are here').count()).toBe(0);
    await screenshot(page, 'capture-plan-far-en');

    // In Spanish (this sampler keeps US units).
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'Language: Español' }).click();
    await page.getByRole('link', { name: 'Abrir el plan de recorrido de Bench 1' }).click();
    await page.getByText('Estás a unos 42 mi (68 km) de este campo').waitFor();
    await screenshot(page, 'capture-plan-far-es');
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'English', exact: true }).click();
    await page.getByRole('heading', { name: "Today's walks" }).waitFor();

    // At the corner itself (on the outline): the dot and the distance to stop 1. (The permission
    // is granted, so the position starts by itself.)
    await context.setGeolocation({ latitude: lat, longitude: lon, accuracy: 8 });
    await page.getByRole('link', { name: 'Open the walk plan for Bench 1' }).click();
    await page.getByText(/Stop 1 is [\d,]+ ft away \([\d,]+ paces\)/).waitFor();
    await page.getByRole('img', { name: /Field outline/ }).getByText('You are here').waitFor();
    expect(await page.getByText(/from this field/).count()).toBe(0);
    await page.close();
  });

  it('says the pattern and the margin, reaches stop 1 from the start of the line, re-draws until the first plant (English and Spanish)', async () => {
    const { context } = suite.browser;
    await context.clearPermissions();
    const page = await context.newPage();
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('link', { name: 'Open the walk plan for Bench 2' }).click();
    await page.getByRole('heading', { name: 'Bench 2', level: 1 }).waitFor();
    // Bench 2 is a skewed quadrilateral (convex): one line. 10 m = 32.8 ft → "33 ft".
    await page.getByText(/^One straight line, the longest that fits inside the margin/).waitFor();
    await page.getByText('Every stop is at least 33 ft from every edge.').waitFor();
    await page.getByText(/[\d,]+ paces \([\d,]+ ft\) from the start of the line$/).waitFor();
    expect(await page.getByText('Start here').count()).toBe(0);
    await screenshot(page, 'capture-plan-en');

    const stopOne = () => page.getByRole('img', { name: /Field outline/ }).locator('circle').first().evaluate((c) => [c.getAttribute('cx'), c.getAttribute('cy')].join(','));
    const before = await stopOne();
    await page.getByRole('button', { name: 'Re-draw stops' }).click();
    await page.getByText('New stop positions drawn.').waitFor();
    await expect.poll(stopOne).not.toBe(before);
    const drawn = await stopOne();
    // Kept for this planting: opening the plan again shows the same stops.
    await page.reload();
    await page.getByRole('heading', { name: 'Bench 2', level: 1 }).waitFor();
    expect(await stopOne()).toBe(drawn);

    // Started, still no plant: re-draw stays; after the first plant it is gone.
    await page.getByRole('button', { name: 'Start the walk' }).click();
    await page.getByRole('heading', { name: 'Stop 1 of 10' }).waitFor();
    await page.getByRole('link', { name: /Plan/ }).first().click();
    await page.getByRole('button', { name: 'Re-draw stops' }).waitFor();
    expect(await stopOne()).toBe(drawn);
    await page.getByRole('button', { name: 'Continue the walk' }).click();
    await page.getByLabel(/Main shoot length/).fill('30');
    await page.getByRole('button', { name: /Next/ }).click();
    await page.getByRole('heading', { name: 'Stop 2 of 10' }).waitFor();
    await page.getByRole('link', { name: /Plan/ }).first().click();
    await page.getByRole('button', { name: 'Continue the walk' }).waitFor();
    expect(await page.getByRole('button', { name: 'Re-draw stops' }).count()).toBe(0);
    expect(await stopOne()).toBe(drawn);

    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'Language: Español' }).click();
    await page.getByRole('link', { name: 'Abrir el plan de recorrido de Bench 1' }).click();
    await page.getByText(/^Una sola línea recta, la más larga que cabe dentro del margen/).waitFor();
    await page.getByText('Cada parada queda al menos a 33 pies de toda orilla.').waitFor();
    await page.getByText(/[\d,]+ pasos \([\d,]+ pies\) desde el inicio de la línea$/).waitFor();
    await page.getByRole('button', { name: 'Volver a sortear las paradas' }).waitFor();
    await screenshot(page, 'capture-plan-es');
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('button', { name: 'English', exact: true }).click();
    await page.getByRole('heading', { name: "Today's walks" }).waitFor();
    await page.close();
  });
});
