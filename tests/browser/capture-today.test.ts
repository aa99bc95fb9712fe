import { describe, expect, it } from 'vitest';
import { screenshot, signIn, SUITE_PASSWORD, useServerAndBrowser } from '../helpers/browser';

/**
 * Today's list in groups, a walk waiting in the outbox shown as such, and the outbox sending by
 * itself once the signal is back, even after the app was opened again without signal.
 */

const suite = useServerAndBrowser({}, { viewport: { width: 390, height: 844 } });

describe("/capture today's list", () => {
  it('groups the plantings, shows a queued walk as waiting, and sends it without reopening the app', async () => {
    const { context } = suite.browser;
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));

    await signIn(page, suite.server.url, 'sampler@crowntip.test', SUITE_PASSWORD);
    await page.getByRole('heading', { name: 'Asignados a ti', level: 2 }).waitFor();
    await page.getByRole('heading', { name: 'Otras siembras abiertas', level: 2 }).waitFor();
    await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, null, { timeout: 30_000 });
    await page.waitForLoadState('networkidle');

    const card = page.getByRole('link', { name: 'Abrir el plan de recorrido de Bench 2' });
    expect(await card.textContent()).toContain('Sin recorrido todavía');
    await card.click();
    await page.getByRole('button', { name: 'Empezar el recorrido' }).click();
    await page.getByRole('heading', { name: 'Parada 1 de 10' }).waitFor();
    for (const v of ['78', '82', '75', '80', '84', '79', '77', '81', '83']) {
      await page.getByLabel(/Largo del tallo principal/).fill(v);
      await page.getByRole('button', { name: /Siguiente/ }).click();
    }
    // A walk in progress has its own group while it is being walked.
    await page.getByRole('heading', { name: 'Parada 10 de 10' }).waitFor();
    await page.goto(`${suite.server.url}/capture`);
    await page.getByRole('heading', { name: 'Recorridos sin terminar', level: 2 }).waitFor();
    await screenshot(page, 'capture-today-groups-es');
    await page.getByRole('link', { name: 'Seguir: Bench 2' }).click();
    await page.getByLabel(/Largo del tallo principal/).fill('76');

    // No signal: the walk goes to the outbox.
    await context.setOffline(true);
    await page.getByRole('button', { name: 'Revisar y enviar' }).click();
    await page.getByRole('button', { name: 'Enviar el recorrido' }).click();
    await page.getByRole('heading', { name: 'En espera de envío' }).waitFor();

    // Opened again without signal: the planting says its walk waits to be sent.
    await page.goto(`${suite.server.url}/capture`);
    const waitingCard = page.getByRole('link', { name: 'Abrir el plan de recorrido de Bench 2' });
    await waitingCard.getByText('En espera de envío').waitFor({ timeout: 30_000 });
    expect(await waitingCard.textContent()).not.toContain('Sin recorrido todavía');
    await screenshot(page, 'capture-today-waiting-es');

    // The signal returns; nobody touches the phone.
    await context.setOffline(false);
    await page.getByTestId('sent-banner').getByText(/Volvió la señal: el recorrido de Bench 2 llegó a la oficina/).waitFor({ timeout: 45_000 });
    await screenshot(page, 'capture-today-sent-es');
    expect(errors).toEqual([]);
    await page.close();
  });
});
