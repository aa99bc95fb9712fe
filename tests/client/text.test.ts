import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import i18next from 'i18next';
import { en } from '../../client/locales/en';
import { es } from '../../client/locales/es';
import { screensEn } from '../../client/locales/screens-en';
import { screensEs } from '../../client/locales/screens-es';
import { i18n, type Language, type TextKey } from '../../client/lib/i18n';

// The capture app's own text function (client/lib/i18n.ts) replaced i18next on the phone. The
// reference is i18next itself, configured as the app had it (no escaping, no fallback language):
// for every key of both languages, with counts 0, 1, 2 and 21 and every placeholder filled, both
// must say the same.

const ref = i18next.createInstance();
const both = (a: object, b: object) => ({ ...structuredClone(a), ...structuredClone(b) });
let before: Language;

beforeAll(async () => {
  await ref.init({
    resources: { en: { translation: both(en, screensEn) }, es: { translation: both(es, screensEs) } },
    lng: 'en',
    fallbackLng: false,
    interpolation: { escapeValue: false },
    initAsync: false,
    showSupportNotice: false,
  } as Parameters<typeof ref.init>[0]);
  before = i18n.language;
  i18n.addResources('en', en);
  i18n.addResources('es', es);
  i18n.addResources('en', screensEn);
  i18n.addResources('es', screensEs);
});
afterAll(() => i18n.changeLanguage(before));

function leaves(obj: object, prefix = ''): Array<[string, string]> {
  return Object.entries(obj).flatMap(([k, v]) =>
    typeof v === 'object' ? leaves(v as object, `${prefix}${k}.`) : [[`${prefix}${k}`, String(v)] as [string, string]],
  );
}

describe.each(['en', 'es'] as const)('%s: the same text as i18next', (lng) => {
  const all = leaves(lng === 'en' ? both(en, screensEn) : both(es, screensEs));
  const keys = [...new Set(all.flatMap(([k]) => [k, k.replace(/_(zero|one|two|few|many|other)$/, '')]))];
  const placeholders = (key: string) =>
    Object.fromEntries(
      all.filter(([k]) => k === key || k.startsWith(`${key}_`)).flatMap(([, v]) => [...v.matchAll(/\{\{(\w+)\}\}/g)].map((m) => [m[1], `<${m[1]}>`])),
    );

  it(`every key (${keys.length}), plain and with counts 0, 1, 2 and 21`, async () => {
    await i18n.changeLanguage(lng);
    await ref.changeLanguage(lng);
    for (const key of keys) {
      const values = placeholders(key);
      expect(i18n.t(key as TextKey, values), key).toBe(ref.t(key, values));
      for (const count of [0, 1, 2, 21]) {
        expect(i18n.t(key as TextKey, { ...values, count }), `${key} count ${count}`).toBe(ref.t(key, { ...values, count }));
      }
    }
  });

  it('a missing key, a default value, a missing placeholder and a subtree', async () => {
    await i18n.changeLanguage(lng);
    await ref.changeLanguage(lng);
    expect(i18n.t('no.such' as TextKey)).toBe(ref.t('no.such'));
    expect(i18n.t('crops.zz' as TextKey, { defaultValue: 'zz' })).toBe(ref.t('crops.zz', { defaultValue: 'zz' }));
    expect(i18n.t('today.open')).toBe(ref.t('today.open'));
    expect(i18n.t('units', { returnObjects: true })).toEqual(ref.t('units', { returnObjects: true }));
  });
});

describe('one text store', () => {
  // A file importing i18next or react-i18next would read an empty store of its own: every
  // screen must use client/lib/i18n.ts.
  const files = (dir: string): string[] =>
    fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) return e.name === 'dist' ? [] : files(p);
      return /\.tsx?$/.test(e.name) ? [p] : [];
    });
  it('no capture file imports i18next or react-i18next', () => {
    const offenders = files(path.resolve('client')).filter((f) => /from\s+'(react-)?i18next'|import\('(react-)?i18next'\)/.test(fs.readFileSync(f, 'utf8')));
    expect(offenders).toEqual([]);
  });
});
