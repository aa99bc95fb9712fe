import { readFileSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { SUITE_PASSWORD, openBrowser, screenshot, signIn, useServerAndBrowser } from '../helpers/browser';

// The office at the width of a common laptop screen.
const suite = useServerAndBrowser({}, { viewport: { width: 1280, height: 800 } });

async function freshPage() {
  await suite.browser.context.clearCookies();
  return suite.browser.context.newPage();
}

async function box(l: Locator) {
  const b = await l.boundingBox();
  if (!b) throw new Error('element has no box (hidden?)');
  return b;
}

const style = <P extends string>(l: Locator, ...props: P[]) =>
  l.evaluate((el, names) => {
    const cs = getComputedStyle(el);
    return Object.fromEntries(names.map((n) => [n, cs.getPropertyValue(n)])) as Record<P, string>; // one entry per name asked for
  }, props);

/** The error style's colours, read off an element given the error class on the same page. */
async function errorStyle(page: Page) {
  return page.evaluate(() => {
    const probe = document.createElement('div');
    probe.className = 'alert-error';
    document.body.append(probe);
    const cs = getComputedStyle(probe);
    const out = { background: cs.backgroundColor, borderLeft: cs.borderLeftColor };
    probe.remove();
    return out;
  });
}

describe('the office header', () => {
  it('fits one row at 1280 px for the admin, with a visible Account link and a light Sign out', async () => {
    const page = await freshPage();
    await signIn(page, suite.server.url, 'admin@crowntip.test', SUITE_PASSWORD);
    const header = page.getByRole('banner');
    const home = page.getByRole('link', { name: 'Crowntip home' });
    const nav = page.getByRole('navigation', { name: 'Main' });
    const links = nav.getByRole('link');
    // The admin sees every area: Office … Outbox (nine links).
    expect(await links.count()).toBe(9);
    const account = page.getByRole('link', { name: /^Account/ });
    const signOut = page.getByRole('button', { name: 'Sign out' });
    expect(await account.isVisible()).toBe(true);

    // One row: every control's vertical middle lies within the logo's box.
    const logo = await box(home);
    const controls = [...(await links.all()), account, signOut];
    for (const c of controls) {
      const b = await box(c);
      const middle = b.y + b.height / 2;
      const label = (await c.textContent()) ?? '';
      expect(middle, label).toBeGreaterThan(logo.y);
      expect(middle, label).toBeLessThan(logo.y + logo.height);
    }
    // and the header is no taller than one row of 44 px targets plus its padding.
    expect((await box(header)).height).toBeLessThan(70);

    // Sign out is the lightest control: no filled or outlined box, lighter and smaller type.
    const so = await style(signOut, 'background-color', 'border-top-width', 'font-weight', 'font-size');
    const link = await style(links.first(), 'font-weight', 'font-size');
    expect(so['background-color']).toBe('rgba(0, 0, 0, 0)');
    expect(so['border-top-width']).toBe('0px');
    expect(Number(so['font-weight'])).toBeLessThan(Number(link['font-weight']));
    expect(parseFloat(so['font-size'])).toBeLessThan(parseFloat(link['font-size']));
    await screenshot(page, 'look-home-admin');
    await page.close();
  });

  it('the registry sub-navigation looks like the walk status tabs', async () => {
    const page = await freshPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', SUITE_PASSWORD);
    await page.goto(`${suite.server.url}/registry/ranches`);
    const registry = page.getByRole('navigation', { name: 'Registry' });
    const regActive = registry.getByRole('link', { name: 'Ranches' });
    const regOther = registry.getByRole('link', { name: 'Season view' });
    const props = ['color', 'font-weight', 'font-size', 'border-bottom-width', 'border-bottom-color', 'background-color', 'min-height'];
    const reg = { active: await style(regActive, ...props), other: await style(regOther, ...props), nav: await style(registry, 'border-bottom-width', 'border-bottom-color') };
    await screenshot(page, 'look-registry-clerk');

    await page.goto(`${suite.server.url}/walks`);
    const walks = page.getByRole('navigation', { name: 'Walk status' });
    const active = walks.locator('[aria-current="page"]');
    const other = walks.locator('a:not([aria-current])').first();
    expect(reg.active).toEqual(await style(active, ...props));
    expect(reg.other).toEqual(await style(other, ...props));
    expect(reg.nav).toEqual(await style(walks, 'border-bottom-width', 'border-bottom-color'));
    // The current tab is told apart by more than colour: its underline.
    expect(reg.active['border-bottom-color']).not.toBe(reg.other['border-bottom-color']);
    await screenshot(page, 'look-walks-clerk');
    await page.close();
  });
});

describe('cautions and chips', () => {
  it('a page with a standing caution shows one caution block, not in the error style', async () => {
    const page = await freshPage();
    await signIn(page, suite.server.url, 'admin@crowntip.test', SUITE_PASSWORD);
    for (const path of ['/admin/rules', '/calibrations']) {
      await page.goto(`${suite.server.url}${path}`);
      if (path === '/calibrations') {
        // A published calibration's page carries the screening-estimate caution.
        await page.getByRole('link', { name: /rye/i }).first().click();
        await page.waitForLoadState('networkidle');
      }
      const cautions = page.locator('.caution');
      expect(await cautions.count(), path).toBe(1);
      expect(await page.locator('.alert-error').count(), path).toBe(0);
      const err = await errorStyle(page);
      const c = await style(cautions.first(), 'background-color', 'border-left-color', 'border-left-width');
      expect(c['background-color'], path).not.toBe(err.background);
      expect(c['border-left-color'], path).not.toBe(err.borderLeft);
      expect(c['border-left-width'], path).not.toBe('0px');
      await screenshot(page, `look-caution${path.replaceAll('/', '-')}`);
    }
    await page.close();
  });

  it('a register draft gathers its cautions in one block; flags and "below" chips differ in colour', async () => {
    const page = await freshPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', SUITE_PASSWORD);
    await page.goto(`${suite.server.url}/registers`);
    await page.locator('main a[href^="/registers/"]').filter({ hasNotText: /version/i }).first().click();
    await page.waitForLoadState('networkidle');
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toMatch(/Credit register/);
    expect(await page.locator('.caution').count()).toBe(1);
    expect(await page.locator('.caution li').count()).toBeGreaterThanOrEqual(1);
    await screenshot(page, 'look-register-draft-clerk');

    // The verdict chips of views/walks/_verdict.ejs (probes: the demo walks may not show every
    // verdict), beside the chip the flags use (views/walks/_flags.ejs).
    await page.goto(`${suite.server.url}/walks?status=all`);
    /** The class attribute of the element `re` finds in a view. */
    const viewClass = (view: string, re: RegExp) => {
      const cls = re.exec(readFileSync(view, 'utf8'))?.[1];
      if (cls === undefined) throw new Error(`${view} has no ${re}`);
      return cls;
    };
    const verdictClass = (verdict: string) => viewClass('views/walks/_verdict.ejs', new RegExp(`class="([^"]+)" data-walk-verdict="${verdict}"`));
    const probe = (cls: string) => page.evaluate((c) => {
      const el = document.createElement('span');
      el.className = c;
      el.textContent = 'probe';
      document.querySelector('main')!.append(el);
      const cs = getComputedStyle(el);
      const out = { bg: cs.backgroundColor, border: cs.borderTopColor, color: cs.color };
      el.remove();
      return out;
    }, cls);
    const flagClass = viewClass('views/walks/_flags.ejs', /class="([^"]+)" data-flag/);
    const flag = await probe(flagClass);
    const chips = { flag, below: await probe(verdictClass('below')), meets: await probe(verdictClass('meets')) };
    expect(chips.flag.bg).not.toBe(chips.below.bg);
    expect(chips.flag.border).not.toBe(chips.below.border);
    expect(chips.flag.color).not.toBe(chips.below.color);
    expect(chips.flag.bg).not.toBe(chips.meets.bg);
    await page.close();
  });
});

describe('screenshots to look at', () => {
  for (const role of ['admin', 'clerk'] as const) {
    it(`office pages as the ${role}`, async () => {
      const page = await freshPage();
      await signIn(page, suite.server.url, `${role}@crowntip.test`, SUITE_PASSWORD);
      for (const [name, path] of [['home', '/office'], ['registry', '/registry/season'], ['walks', '/walks?status=all'], ['registers', '/registers'], ['calibrations', '/calibrations']]) {
        await page.goto(`${suite.server.url}${path}`);
        await page.waitForLoadState('networkidle');
        await screenshot(page, `look-${name}-${role}`);
      }
      await page.close();
    });
  }

  let phone: Awaited<ReturnType<typeof openBrowser>> | undefined;
  afterAll(async () => phone?.close());
  it('the phone header in English and Spanish', async () => {
    phone = await openBrowser({ viewport: { width: 390, height: 844 } });
    for (const [email, lang] of [['sampler2@crowntip.test', 'en'], ['sampler@crowntip.test', 'es']] as const) {
      await phone.context.clearCookies();
      const page = await phone.context.newPage();
      await signIn(page, suite.server.url, email, SUITE_PASSWORD);
      await page.waitForURL(/\/capture/);
      await page.getByRole('banner').waitFor({ timeout: 15_000 });
      // The mark on the phone header is in the accent, not in the old gold.
      const mark = page.getByRole('banner').locator('svg').first();
      expect((await style(mark, 'color')).color).not.toBe('rgb(233, 185, 73)');
      await page.screenshot({ path: `tests/browser/screenshots/look-capture-${lang}.png` });
      await page.close();
    }
  });
});
