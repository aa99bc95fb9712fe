import { describe, expect, it } from 'vitest';
import { screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';

const suite = useServerAndBrowser({}, { viewport: { width: 1280, height: 800 } });

describe('office work queue and assignments at 1280x800', () => {
  it('shows the work queue on the home and the assignment form and list', async () => {
    const page = await suite.browser.context.newPage();
    await signIn(page, suite.server.url, 'clerk@crowntip.test', SUITE_PASSWORD);
    await page.goto(`${suite.server.url}/office`);
    await expect(page.getByRole('heading', { name: 'Work to do' }).isVisible()).resolves.toBe(true);
    // The five queues the office home lists (README, The office home: a work queue).
    const queues = await page.locator('[data-queue]').evaluateAll((cards) => cards.map((c) => c.getAttribute('data-queue')));
    expect(queues).toEqual(['review', 'due-soon', 'overdue', 'draft-registers', 'running-jobs']);
    await screenshot(page, 'office-work-queue-1280');
    await page.goto(`${suite.server.url}/registry/season`);
    await expect(page.getByRole('button', { name: 'Assign selected' }).isVisible()).resolves.toBe(true);
    await screenshot(page, 'season-bulk-assign-1280');
    await page.goto(`${suite.server.url}/registry/assignments`);
    await expect(page.getByRole('heading', { name: 'Assignments', level: 1 }).isVisible()).resolves.toBe(true);
    await screenshot(page, 'assignments-1280');
    await page.close();
  });
});
