import { describe, expect, it } from 'vitest';
import { SUITE_PASSWORD, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';

const PASSWORD = SUITE_PASSWORD;
const suite = useServerAndBrowser();


async function freshPage() {
  await suite.browser.context.clearCookies();
  return suite.browser.context.newPage();
}

describe('each role lands on its own home', () => {
  it('prints the URL and the demo sign-ins at start', () => {
    expect(suite.server.output()).toContain(`Crowntip is running at ${suite.server.url}`);
    expect(suite.server.output()).toContain('sampler@crowntip.test');
  });

  for (const [role, email, home] of [
    ['admin', 'admin@crowntip.test', '/office'],
    ['clerk', 'clerk@crowntip.test', '/office'],
    ['auditor', 'auditor@crowntip.test', '/office'],
  ] as const) {
    it(`${role} signs in and sees the office dashboard`, async () => {
      const page = await freshPage();
      await signIn(page, suite.server.url, email, PASSWORD);
      expect(new URL(page.url()).pathname).toBe(home);
      expect(await page.getByRole('heading', { level: 1 }).textContent()).toContain('Bramblecrest Growers');
      // The office stylesheet is loaded from the app itself (Lato font included).
      const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
      expect(font).toContain('Lato');
      await screenshot(page, `home-${role}`);
      await page.close();
    });
  }

  it('the admin reaches users and outbox; the auditor sees no edit controls', async () => {
    const admin = await freshPage();
    await signIn(admin, suite.server.url, 'admin@crowntip.test', PASSWORD);
    await admin.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users' }).click();
    expect(await admin.getByRole('link', { name: 'Invite a user' }).count()).toBe(1);
    await screenshot(admin, 'admin-users');
    await admin.close();

    const auditor = await freshPage();
    await signIn(auditor, suite.server.url, 'auditor@crowntip.test', PASSWORD);
    expect(await auditor.getByText('Read-only', { exact: true }).count()).toBeGreaterThan(0);
    expect(await auditor.getByRole('link', { name: /users/i }).count()).toBe(0);
    expect(await auditor.getByRole('link', { name: /invite/i }).count()).toBe(0);
    expect(await auditor.getByRole('button', { name: /change|deactivate|save|invite/i }).count()).toBe(0);
    await auditor.goto(`${suite.server.url}/admin/users`);
    expect(await auditor.getByRole('heading', { name: 'Not allowed' }).count()).toBe(1);
    await auditor.close();
  });

  it('the sampler lands on /capture and sees their name', async () => {
    const page = await freshPage();
    await signIn(page, suite.server.url, 'sampler@crowntip.test', PASSWORD);
    expect(new URL(page.url()).pathname).toMatch(/^\/capture/);
    await page.getByText('Rosalía Quintanar').first().waitFor({ timeout: 15_000 });
    await screenshot(page, 'home-sampler');
    await page.close();
  });

  it('a signed-out visit to /capture goes to sign in and comes back', async () => {
    const page = await freshPage();
    await page.goto(`${suite.server.url}/capture`);
    expect(new URL(page.url()).pathname).toBe('/login');
    await page.getByLabel('E-mail').fill('sampler@crowntip.test');
    await page.getByLabel('Password').fill(PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/capture/);
    await page.getByText('Rosalía Quintanar').first().waitFor({ timeout: 15_000 });
    await page.close();
  });
});
