import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { extractText, getDocumentProxy } from 'unpdf';
import { createTestApp, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { YEAR, buildHandWorkedScenario } from '../../helpers/register-scenario';

/*
 * What a person reads in a register's files: names never cut, crop names beside the codes,
 * timestamps in words with their zone, and the credit written one way in table and chart.
 * The hand-worked scenario (tests/helpers/register-scenario.ts): credit total 1,125 lb N
 * (A North 500 lb N + D Boundary 625 lb N; 50 lb N/ac × 22.5 ac).
 */
const LONG_VARIETY = 'Thistledown Northern Prairie Winterhardy Selection Number Seventeen Improved';

let t: TestApp;
let s: Awaited<ReturnType<typeof buildHandWorkedScenario>>;
beforeEach(async () => {
  t = await createTestApp();
  s = await buildHandWorkedScenario(t.db);
  await t.db('plantings').where({ id: s.plantings.a }).update({ variety: LONG_VARIETY });
});
afterEach(async () => {
  await t.close();
});

const binary = (r: NodeJS.ReadableStream, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  r.on('data', (c: Buffer) => chunks.push(c));
  r.on('end', () => cb(null, Buffer.concat(chunks)));
};

describe('register PDF and CSV words', () => {
  it('the PDF wraps a long variety name instead of cutting it, and writes the finalising time in words', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v1.status).toBe(201);
    const res = await agent.get(`/api/registers/${v1.body.id}.pdf`).buffer(true).parse(binary as never);
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(res.body as Buffer)), { mergePages: true });
    const flat = text.replace(/\s+/g, ' ');
    expect(flat).toContain(`Cereal rye · ${LONG_VARIETY}`);
    expect(flat).not.toMatch(/Thistledown[^·]*…/);
    // "Finalised … on Dec 2, 2026, 14:05 UTC": never the stored ISO string.
    expect(flat).not.toContain(v1.body.finalisedAt);
    expect(flat).toMatch(/Finalised version 1 by .+ on [A-Z][a-z]{2} \d{1,2}, \d{4}, \d{2}:\d{2} UTC\./);
    expect(flat).toContain('Credit total: 1,125 lb N');
  });

  it('the CSV names the crop in words beside its code', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    const csv = await agent.get(`/api/registers/${v1.body.id}.csv`);
    const records = parse(csv.text, { columns: true, bom: true }) as Record<string, string>[];
    const a = records.find((r) => r.field === 'A North')!;
    expect(a.crop).toBe('cereal_rye');
    expect(a.crop_name).toBe('Cereal rye');
    expect(a.variety).toBe(LONG_VARIETY);
  });

  it('the overview writes the credit the same way in the table and the chart', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/registers?year=${YEAR}`);
    expect(page.status).toBe(200);
    const table = page.text.match(/data-credit-total>([^<]+)</)![1];
    expect(table).toBe('1,125 lb N');
    const start = page.text.indexOf('class="register-chart');
    expect(start).toBeGreaterThan(0);
    const svg = page.text.slice(start, page.text.indexOf('</svg>', start));
    expect(svg).toContain('1,125 lb N');
    expect(svg).not.toContain('1,125.0');
  });
});
