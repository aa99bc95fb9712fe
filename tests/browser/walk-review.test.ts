import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';
import { at } from '../helpers/lists';
import { DEMO_WALK_IDS } from '../../seeds/04_demo_walks';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();

/** A real 1 × 1 PNG, the photo of one stop. */
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');


/**
 * A second submitted walk with GPS at most stops, a photo and one odd plant, sent through the JSON
 * API as the capture app sends it, so that the evidence page has a sketch, a thumbnail and a flag.
 * The lengths and positions are invented.
 */
async function sendWalkWithEvidence(): Promise<string> {
  const api = suite.browser.context.request;
  expect((await api.post(`${suite.server.url}/api/session`, { data: { email: 'sampler@crowntip.test', password: PASSWORD } })).status()).toBe(200);
  const csrf = (await (await api.get(`${suite.server.url}/api/session`)).json()).csrfToken as string;
  const today = (await (await api.get(`${suite.server.url}/api/today`)).json()).items as {
    plantingId: string;
    crop: string;
    boundary: { type: 'Polygon'; coordinates: [number, number][][] } | { type: 'MultiPolygon'; coordinates: [number, number][][][] } | null;
  }[];
  const target = today.find((p) => p.boundary && (p.crop === 'cereal_rye' || p.crop === 'triticale'))!;
  const boundary = target.boundary!;
  const ring = at(boundary.type === 'Polygon' ? boundary.coordinates : at(boundary.coordinates, 0, 'part'), 0, 'outer ring');
  const [lon0, lon1] = [Math.min(...ring.map((c) => c[0])), Math.max(...ring.map((c) => c[0]))];
  const [lat0, lat1] = [Math.min(...ring.map((c) => c[1])), Math.max(...ring.map((c) => c[1]))];
  const lengths = [86.0, 79.5, 92.0, 81.0, 75.5, 89.0, 80.5, 131.0, 83.5, 78.0];
  const id = randomUUID();
  const plants = lengths.map((lengthCm, i) => ({
    stop: i + 1,
    lengthCm,
    ...(i === 6 ? {} : { lat: lat0 + ((lat1 - lat0) * (i + 1)) / 11, lon: lon0 + ((lon1 - lon0) * (i + 1)) / 11 }),
  }));
  const headers = { 'X-CSRF-Token': csrf };
  const walkedOn = new Date().toISOString().slice(0, 10);
  expect((await api.post(`${suite.server.url}/api/walks`, { headers, data: { id, plantingId: target.plantingId, walkedOn, stage: 'Z32', plants } })).status()).toBe(201);
  const photo = await api.post(`${suite.server.url}/api/walks/${id}/photos`, { headers, multipart: { stop: '8', photo: { name: 'stop-8.png', mimeType: 'image/png', buffer: TINY_PNG } } });
  expect(photo.status()).toBe(201);
  expect((await api.post(`${suite.server.url}/api/walks/${id}/submit`, { headers })).status()).toBe(200);
  await api.delete(`${suite.server.url}/api/session`, { headers });
  await suite.browser.context.clearCookies();
  return id;
}

describe('walk review in the browser', () => {
  it('a clerk opens the queue, reads the demo submitted walk and approves it', async () => {
    const evidenceWalk = await sendWalkWithEvidence();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Walks' }).click();
    await page.getByRole('heading', { name: 'Walks to review', level: 1 }).waitFor();
    expect(await page.locator('#walks tbody tr[data-walk]').count()).toBe(2);
    await screenshot(page, 'walk-review-queue');

    // The walk with GPS, a photo and an outlier: the evidence page.
    await page.locator(`#walks tr[data-walk="${evidenceWalk}"]`).getByRole('link').click();
    await page.getByRole('heading', { name: 'Flags for a closer look' }).waitFor();
    expect(await page.getByRole('img', { name: /Main shoot lengths of the 10 plants/ }).count()).toBe(1);
    expect(await page.getByRole('img', { name: /with the 9 stops where GPS was recorded/ }).count()).toBe(1);
    expect(await page.getByRole('img', { name: 'Photo of stop 8' }).count()).toBe(1);
    // The thumbnail really loaded (the photo route answers the signed-in clerk). It loads lazily,
    // far down the page: bring it into view and wait for it.
    const thumb = page.getByRole('img', { name: 'Photo of stop 8' });
    await thumb.scrollIntoViewIfNeeded();
    expect(await thumb.evaluate((img: HTMLImageElement) =>
      img.complete && img.naturalWidth > 0
        ? true
        : new Promise<boolean>((resolve) => {
            img.onload = () => resolve(img.naturalWidth > 0);
            img.onerror = () => resolve(false);
          }))).toBe(true);
    expect(await page.getByText(/One plant is far from the others: stop 8/).count()).toBe(1);
    await screenshot(page, 'walk-review-evidence');

    // The demo walk: open it from the queue and approve it.
    await page.getByRole('link', { name: '← Walks' }).click();
    await page.locator(`#walks tr[data-walk="${DEMO_WALK_IDS.submitted}"]`).getByRole('link').click();
    await page.getByRole('heading', { name: 'Estimate' }).waitFor();
    expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(1);
    expect(await page.getByRole('button', { name: 'Reject' }).count()).toBe(1);
    await screenshot(page, 'walk-review-detail');

    // A reject without a reason is refused on the page, and nothing changes.
    await page.getByRole('button', { name: 'Reject' }).click();
    await page.getByText('Say why the walk is rejected.').waitFor();

    page.once('dialog', (dialog) => void dialog.accept());
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.waitForURL(`${suite.server.url}/walks`);
    await page.getByText(/Walk approved: .* It now counts in registers\./).waitFor();
    expect(await page.locator(`#walks tr[data-walk="${DEMO_WALK_IDS.submitted}"]`).count()).toBe(0);
    expect(await page.locator('#walks tbody tr[data-walk]').count()).toBe(1);
    await screenshot(page, 'walk-review-queue-after');
    await page.close();
  });

  it('an auditor opens the approved walk and sees no Approve or Reject buttons', async () => {
    await suite.browser.context.clearCookies();
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'auditor@crowntip.test', PASSWORD);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Walks' }).click();
    await page.getByRole('heading', { name: /Field walks: approved/, level: 1 }).waitFor();
    await page.locator(`#walks tr[data-walk="${DEMO_WALK_IDS.submitted}"]`).getByRole('link').click();
    await page.getByText('This walk counts in registers.').waitFor();
    expect(await page.getByText(/Approved by Jonah Pellbrook/).count()).toBe(1);
    expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Reject' }).count()).toBe(0);
    expect(await page.getByRole('textbox').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Print' }).count()).toBe(1);
    await screenshot(page, 'walk-review-auditor');
    // On paper: no navigation, no buttons.
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false);
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    await screenshot(page, 'walk-review-print');
    await page.close();
  });
});
