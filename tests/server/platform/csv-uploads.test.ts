import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, locationOf, signInPages, type TestApp } from '../../helpers/app';

/*
 * Every upload that reads a CSV goes through one reader (server/platform/csv-read.ts). For each
 * upload path: a file saved with a UTF-8 byte order mark (what a spreadsheet's "CSV UTF-8" writes)
 * is read exactly as the same file without it, and a file in an older character set is refused
 * beside the file field in plain words, with nothing stored.
 *
 * The bytes are written out by hand rather than produced by an encoder under test:
 * - the byte order mark is EF BB BF (the Unicode standard, section 23.8, "Byte Order Mark");
 * - "é" is C3 A9 in UTF-8 and the single byte E9 in Latin-1 (ISO/IEC 8859-1); E9 followed by a
 *   line feed is not valid UTF-8 (E9 starts a three-byte sequence, and 0A is not a continuation byte).
 */
const BOM = Buffer.from([0xef, 0xbb, 0xbf]);
const utf8 = (text: string) => Buffer.from(text, 'utf8');
/** The text in Latin-1: one byte per character, so "é" is E9. */
const latin1 = (text: string) => Buffer.from(text, 'latin1');

/** The one message every path gives for bytes that are not UTF-8: plain words saying what to do. */
const expectPlainNotUtf8 = (message: string) => {
  expect(message).toMatch(/^The file is not UTF-8 text\b/);
  expect(message).toContain('CSV UTF-8');
  // No decoder, parser or validator jargon.
  expect(message).not.toMatch(/TextDecoder|TypeError|ERR_|fatal|encoding_invalid|csv-parse|CSV_|zod|undefined|\{/i);
};

/** The field error of a re-rendered form, unescaped. */
const fileError = (html: string) => {
  const m = /id="file-error"[^>]*>([^<]*)</.exec(html);
  return m ? m[1]!.replace(/&#39;/g, "'").replace(/&#34;|&quot;/g, '"').replace(/&amp;/g, '&') : null;
};

/** A page as rendered, without what changes on every render (the form token, a script nonce) or with the upload's id. */
const samePage = (html: string, id: string) =>
  html
    .replaceAll(id, 'ID')
    .replace(/name="_csrf" value="[^"]*"/g, 'name="_csrf"')
    .replace(/nonce="[^"]*"/g, 'nonce');

let t: TestApp;
let uploads: string;
beforeEach(async () => {
  uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-csv-uploads-'));
  t = await createTestApp({ UPLOADS_DIR: uploads });
});
afterEach(async () => {
  await t.close();
  fs.rmSync(uploads, { recursive: true, force: true });
});

type Agent = Awaited<ReturnType<typeof signInPages>>;

/** Uploads the text without and then with a byte order mark; each preview page it was sent to, ids written alike. */
async function previewsOf(agent: Agent, upload: (agent: Agent, bytes: Buffer) => Promise<{ status: number; headers: Record<string, string | undefined> }>, csv: string) {
  const pages: string[] = [];
  for (const bytes of [utf8(csv), Buffer.concat([BOM, utf8(csv)])]) {
    const res = await upload(agent, bytes);
    expect(res.status).toBe(303);
    const location = locationOf(res);
    const page = await agent.get(location);
    expect(page.status).toBe(200);
    pages.push(samePage(page.text, location.split('/').pop() ?? ''));
  }
  return pages;
}

const storedImports = () => (fs.existsSync(path.join(uploads, 'imports')) ? fs.readdirSync(path.join(uploads, 'imports')) : []);
const count = async (table: string) => Number((await t.db(table).count({ n: '*' }).first())!.n);

describe('registry import upload', () => {
  // Invented ranch and field; "é" and "ñ" so that a wrong decoding would show.
  const CSV = 'ranch,field,area_ha,crop,seeded_on\r\nRancho Pruebañ,Lote é,10,Cereal rye,2026-10-15\r\n';

  async function upload(agent: Agent, bytes: Buffer) {
    const csrf = csrfFromHtml((await agent.get('/registry/import')).text);
    return agent.post('/registry/import/preview').field('_csrf', csrf).attach('file', bytes, { filename: 'plantings.csv', contentType: 'text/csv' });
  }

  it('reads a file with a byte order mark as the same file without one', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const pages = await previewsOf(agent, upload, CSV);
    // The summary line names the byte order mark (and the size, 3 bytes apart); the rest must match.
    expect(pages.map((p) => p.includes('with byte order mark'))).toEqual([false, true]);
    const previews = pages.map((p) => p.replace(/<p class="mb-4"><strong>[\s\S]*?<\/p>/, ''));
    expect(previews[0]).toContain('Lote é');
    expect(previews[0]).toContain('Rancho Pruebañ');
    expect(previews[1]).toEqual(previews[0]);
  });

  it('refuses a Latin-1 file beside the file field in plain words, and stores nothing', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const before = { ranches: await count('ranches'), fields: await count('fields'), plantings: await count('plantings') };
    const res = await upload(agent, latin1(CSV));
    expect(res.status).toBe(400);
    const message = fileError(res.text);
    expect(message).not.toBeNull();
    expectPlainNotUtf8(message!);
    expect(res.text).toContain('aria-describedby="file-error file-hint"');
    expect(storedImports()).toEqual([]);
    expect({ ranches: await count('ranches'), fields: await count('fields'), plantings: await count('plantings') }).toEqual(before);
  });
});

describe('calibration points upload', () => {
  // Four paired points; the extra "note" column carries "é" so that a wrong decoding would show.
  const CSV = 'length_cm,biomass_kg_ha,note\r\n10,1000,é\r\n20,2000,é\r\n30,3000,é\r\n40,4000,é\r\n';

  async function upload(agent: Agent, bytes: Buffer) {
    const csrf = csrfFromHtml((await agent.get('/calibrations/new')).text);
    return agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', bytes, { filename: 'points.csv', contentType: 'text/csv' });
  }

  it('reads a file with a byte order mark as the same file without one', async () => {
    const agent = await signInPages(t.app, 'admin@crowntip.test');
    const previews = await previewsOf(agent, upload, CSV);
    expect(previews[0]).toContain('All 4 rows are good');
    expect(previews[1]).toEqual(previews[0]);
    // What is kept is the text without the mark: both uploads hold the same content.
    expect(await t.db('calibration_uploads').where('file_name', 'points.csv').pluck('content')).toEqual([CSV, CSV]);
  });

  it('refuses a Latin-1 file beside the file field in plain words, and stores nothing', async () => {
    const agent = await signInPages(t.app, 'admin@crowntip.test');
    const before = await count('calibration_uploads');
    const res = await upload(agent, latin1(CSV));
    expect(res.status).toBe(400);
    const message = fileError(res.text);
    expect(message).not.toBeNull();
    expectPlainNotUtf8(message!);
    expect(res.text).toContain('aria-describedby="file-error"');
    expect(await count('calibration_uploads')).toBe(before);
  });
});
