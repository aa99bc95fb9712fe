import { describe, expect, it } from 'vitest';
import { SUITE_PASSWORD, signIn, useServerAndBrowser } from '../helpers/browser';

// A reader whose browser runs 8 hours behind UTC. 'Etc/GMT+8' is the IANA name for UTC−8 (the sign
// is inverted in the Etc area by POSIX convention), which Chromium names "GMT-8".
const suite = useServerAndBrowser({}, { viewport: { width: 1280, height: 800 }, timezoneId: 'Etc/GMT+8' });

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const two = (n: number) => String(n).padStart(2, '0');

/** Hand-worked: the instant moved back 8 hours, then written as the office writes a time. */
function atGmtMinus8(iso: string): string {
  const at = new Date(new Date(iso.includes('T') || iso.includes(' ') ? iso.replace(' ', 'T') : iso).getTime() - 8 * 3600_000);
  return `${MONTHS[at.getUTCMonth()]} ${at.getUTCDate()}, ${at.getUTCFullYear()}, ${two(at.getUTCHours())}:${two(at.getUTCMinutes())} GMT-8`;
}

describe('times on office pages', () => {
  it("are shown in the reader's own time zone, with the UTC time kept as the title", async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'admin@crowntip.test', SUITE_PASSWORD);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(`${suite.server.url}/admin/users`);
    const row = page.getByRole('row').filter({ hasText: 'admin@crowntip.test' });
    const time = row.locator('time');
    const iso = await time.getAttribute('datetime');
    expect(iso).toBeTruthy();
    const stamped = /Z$|[+-]\d\d:?\d\d$/.test(iso!) ? iso! : `${iso!.replace(' ', 'T')}Z`;
    expect(await time.textContent()).toBe(atGmtMinus8(stamped));
    expect(await time.getAttribute('title')).toMatch(/ UTC$/);
    // The office script runs alone (it once pulled in the capture app, which threw here).
    expect(errors).toEqual([]);
    await page.close();
  });
});
