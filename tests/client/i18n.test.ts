import { afterEach, describe, expect, it, vi } from 'vitest';
import { en } from '../../client/locales/en';
import { es } from '../../client/locales/es';
import { screensEn } from '../../client/locales/screens-en';
import { screensEs } from '../../client/locales/screens-es';
import { STAGES } from '../../client/features/entry/stages';
import { CROPS } from '../../shared/calc/rules';

/** Every leaf as "a.b.c" → text. */
function leaves(obj: unknown, prefix = ''): Map<string, unknown> {
  const out = new Map<string, unknown>();
  for (const [k, v] of Object.entries(obj as Record<string, unknown>)) {
    const key = prefix ? `${prefix}.${k}` : k;
    if (v && typeof v === 'object') for (const [kk, vv] of leaves(v, key)) out.set(kk, vv);
    else out.set(key, v);
  }
  return out;
}

const placeholders = (s: string) => [...s.matchAll(/\{\{(\w+)\}\}/g)].map((m) => m[1]).sort();

describe.each([
  ['first screen', en, es],
  ['later screens', screensEn, screensEs],
])('%s: English and Spanish', (_name, english, spanish) => {
  const a = leaves(english);
  const b = leaves(spanish);

  it('have the same keys', () => {
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
  });

  it('have no empty strings', () => {
    for (const [key, v] of [...a, ...b]) {
      expect(typeof v, key).toBe('string');
      expect((v as string).trim(), key).not.toBe('');
    }
  });

  it('use the same placeholders', () => {
    for (const [key, v] of a) expect(placeholders(b.get(key) as string), key).toEqual(placeholders(v as string));
  });

  it('give every plural both forms', () => {
    for (const key of a.keys()) {
      if (key.endsWith('_one')) expect(a.has(key.replace(/_one$/, '_other')), key).toBe(true);
    }
  });
});

describe('coverage of codes', () => {
  it('names every crop and every growth stage in both languages', () => {
    for (const crop of CROPS) {
      expect(en.crops[crop]).toBeTruthy();
      expect(es.crops[crop]).toBeTruthy();
    }
    for (const s of STAGES) {
      expect(screensEn.stages[s.code]).toBeTruthy();
      expect(screensEs.stages[s.code]).toBeTruthy();
    }
  });

  it('the Spanish reads as field crews say it', () => {
    expect(es.today.title).toBe('Recorridos de hoy');
    expect(screensEs.entry.stopOf).toBe('Parada {{n}} de {{total}}');
    expect(screensEs.entry.length).toBe('Largo del tallo principal');
    expect(es.queue.offlineWaiting).toBe('Sin señal: {{what}} en espera de envío');
  });
});

describe('the language the app opens in', () => {
  afterEach(() => {
    vi.unstubAllGlobals();
  });
  const page = (language?: string) => ({ documentElement: { dataset: language ? { language } : {}, lang: '' } });
  const phone = (kept: string | null) => ({ getItem: () => kept, setItem: () => undefined });

  it('is the one kept on the phone, else the one the server wrote on the page, else the browser’s', async () => {
    const { initialLanguage } = await import('../../client/lib/i18n');
    vi.stubGlobal('navigator', { language: 'en-US' });
    vi.stubGlobal('document', page('es'));
    vi.stubGlobal('localStorage', phone(null));
    expect(initialLanguage()).toBe('es'); // a first visit: the signed-in user's language
    vi.stubGlobal('localStorage', phone('en'));
    expect(initialLanguage()).toBe('en'); // chosen on this phone
    vi.stubGlobal('localStorage', phone(null));
    vi.stubGlobal('document', page('fr'));
    expect(initialLanguage()).toBe('en'); // not a language of the app: the browser's
    vi.stubGlobal('navigator', { language: 'es-AR' });
    vi.stubGlobal('document', page());
    expect(initialLanguage()).toBe('es');
  });
});
