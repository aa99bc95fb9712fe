import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { z } from 'zod';
import { parseForm } from '../../../server/platform/validation';
import * as registrySchemas from '../../../shared/schemas/registry';
import * as ruleSchemas from '../../../shared/schemas/rules';
import * as walkSchemas from '../../../shared/schemas/walks';
import * as calibrationSchemas from '../../../server/calibrations/schemas';
import { CROPS } from '../../../shared/calc/rules';
import { createTestApp, csrfFromHtml, signInPages, type TestApp } from '../../helpers/app';

/*
 * Every message a person reads about what they typed is in plain words: no validator jargon
 * ("Invalid input: expected number, received string", "Too small", 'expected one of "a"|"b"') and no
 * snake_case codes such as cereal_rye.
 */
const JARGON = /\bexpected\b|\breceived\b|invalid input|too small|too big|invalid option|unrecognized key|\b[a-z]+_[a-z_]+\b|\bNaN\b|\bundefined\b/i;
const CODES = new RegExp(`\\b(${CROPS.filter((c) => c.includes('_')).join('|')})\\b`);

/** Each schema the forms and the API parse typed input with. */
const schemas = Object.entries({ ...registrySchemas, ...ruleSchemas, ...walkSchemas, ...calibrationSchemas }).filter(
  ([name, s]) => s instanceof z.ZodType && !/(Response|InEffect|^walkSchema$|^walkEstimateSchema$|^walkPhotoSchema$|^walkStatusSchema$)/.test(name),
) as [string, z.ZodType][];

/** Bad values of every kind, for every key of an object schema (and for the whole input). */
function badInputs(schema: z.ZodType): unknown[] {
  const shape = (schema as unknown as { shape?: Record<string, unknown> }).shape
    ?? (schema as unknown as { def?: { in?: { shape?: Record<string, unknown> } } }).def?.in?.shape
    ?? {};
  const keys = Object.keys(shape);
  const values: unknown[] = ['abc', 12345678, -1, 0, 2.5, '', null, [], {}, true, 'x'.repeat(5000), ['not-an-address'], 'cereal_ryes', '2026-13-45', Number.NaN];
  const inputs: unknown[] = ['just text', 42, null, [], {}];
  for (const v of values) inputs.push(Object.fromEntries(keys.map((k) => [k, v])));
  return inputs;
}

describe('plain-words messages for every schema (shared/schemas/plain-errors.ts)', () => {
  it('finds the schemas to walk', () => {
    expect(schemas.map(([n]) => n)).toEqual(expect.arrayContaining(['ranchInputSchema', 'fieldInputSchema', 'plantingInputSchema', 'creditRuleInputSchema', 'walkCreateSchema', 'createBodySchema']));
  });

  it.each(schemas)('%s: every message for bad input is plain words', (_name, schema) => {
    let messages = 0;
    for (const input of badInputs(schema)) {
      const parsed = parseForm(schema, input);
      if (parsed.ok) continue;
      for (const [field, raw] of Object.entries(parsed.errors)) {
        messages++;
        // What the person typed may be quoted back (“…”); the words around it are what is checked.
        const message = raw.replace(/“[^”]*”/g, '“…”');
        expect(message, `${field} for ${JSON.stringify(input)?.slice(0, 60)}`).not.toMatch(JARGON);
        expect(message).not.toMatch(CODES);
        expect(message.length).toBeGreaterThan(5);
      }
    }
    expect(messages).toBeGreaterThan(0);
  });

  it('words the common cases as a person would read them', () => {
    const typed = parseForm(registrySchemas.plantingInputSchema, { fieldId: 'f', season: '2026-27', crop: 'rye', seededOn: '2026-10-25', seedingRateKgHa: 'lots' });
    expect(typed.ok).toBe(false);
    if (typed.ok) return;
    expect(typed.errors.crop).toBe('Choose a crop from the list.');
    expect(typed.errors.seedingRateKgHa).toBe('Enter the seeding rate as a number.');
    // A bound stored in SI is not quoted to a reader who may use US units.
    const big = parseForm(z.object({ thresholdKgHa: z.number().max(50_000), days: z.number().max(366) }), { thresholdKgHa: 60_000, days: 400 });
    expect(big.ok ? {} : big.errors).toEqual({ thresholdKgHa: 'This number is larger than is plausible here.', days: 'Enter 366 or less.' });
  });
});

describe('forms say what is wrong beside the field', () => {
  let t: TestApp;
  beforeEach(async () => {
    t = await createTestApp();
  });
  afterEach(async () => {
    await t.close();
  });

  it('a bad grower e-mail on the ranch form is named beside its input, and what was typed is kept', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get('/registry/ranches/new');
    const res = await clerk.post('/registry/ranches').type('form').send({ _csrf: csrfFromHtml(page.text), name: 'Teasel Flats', contactEmails: 'ok@teasel.test, grower@' });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="contactEmails"[^>]*aria-invalid="true"/);
    expect(res.text).toContain('id="contactEmails-error">“grower@” is not an e-mail address. Write each like grower@example.org, separated by commas.</p>');
    expect(res.text).toContain('value="ok@teasel.test, grower@"');
    expect(await t.db('ranches').where({ name: 'Teasel Flats' })).toHaveLength(0);
  });

  it('a sign-in with empty fields says what is missing, beside each field', async () => {
    const agent = request.agent(t.app);
    const page = await agent.get('/login');
    const res = await agent.post('/login').type('form').send({ _csrf: csrfFromHtml(page.text), email: '', password: '' });
    expect(res.status).toBe(400);
    expect(res.text).toContain('id="email-error">Enter the e-mail address you sign in with.</p>');
    expect(res.text).toContain('id="password-error">Enter your password.</p>');
    const noPassword = await agent.post('/login').type('form').send({ _csrf: csrfFromHtml(page.text), email: 'clerk@crowntip.test', password: '' });
    expect(noPassword.status).toBe(400);
    expect(noPassword.text).not.toContain('email-error');
    expect(noPassword.text).toContain('value="clerk@crowntip.test"');
  });

  it('the JSON API answers typed-input errors in the same plain words', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await agent.get('/registry/ranches/new');
    const res = await agent.post('/api/ranches').set('X-CSRF-Token', csrfFromHtml(page.text)).send({ name: 42, contactEmails: 7 });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid');
    for (const m of Object.values(res.body.error.fields as Record<string, string>)) expect(m).not.toMatch(JARGON);
    expect(res.body.error.fields.name).toBe('Enter text here.');
  });
});
