import i18n from 'i18next';
import { initReactI18next } from 'react-i18next';
import type { Resources } from '../locales/en';
import type { ScreenResources } from '../locales/screens-en';

/**
 * i18next for the capture app: English and Spanish. Each language's first-screen text is its own
 * small chunk, loaded before the first render (main.tsx) and when the sampler switches; the later
 * screens bring their text, both languages, with their code (locales/screens.ts). The service
 * worker precaches them all, so both languages work offline. The user's choice comes from the
 * session (per user) and is remembered on the phone, so the app opens in it before the session
 * has loaded.
 */

export type Language = 'en' | 'es';
export const LANGUAGES: readonly Language[] = ['en', 'es'];
/** Number and date formats: US English, and Mexican Spanish (decimal point, like the tape). */
export const LOCALES: Record<Language, string> = { en: 'en-US', es: 'es-MX' };
/** Each language's own name, as it appears on the switch. */
export const LANGUAGE_NAMES: Record<Language, string> = { en: 'English', es: 'Español' };

const STORAGE_KEY = 'crowntip.language';

declare module 'i18next' {
  interface CustomTypeOptions {
    resources: { translation: Resources & ScreenResources };
  }
}

function remembered(): Language | null {
  try {
    const v = globalThis.localStorage?.getItem(STORAGE_KEY);
    return v === 'en' || v === 'es' ? v : null;
  } catch {
    return null;
  }
}

export function initialLanguage(): Language {
  const kept = remembered();
  if (kept) return kept;
  const nav = typeof navigator !== 'undefined' ? navigator.language : '';
  return nav?.toLowerCase().startsWith('es') ? 'es' : 'en';
}

function reflect(lng: string) {
  if (typeof document !== 'undefined') document.documentElement.lang = LOCALES[lng as Language] ?? lng;
  try {
    globalThis.localStorage?.setItem(STORAGE_KEY, lng);
  } catch {
    // private mode: the session still says which language
  }
}

void i18n.use(initReactI18next).init({
  resources: {},
  partialBundledLanguages: true,
  lng: initialLanguage(),
  fallbackLng: false,
  supportedLngs: ['en', 'es'],
  interpolation: { escapeValue: false }, // React escapes
  initAsync: false,
  returnNull: false,
});
i18n.on('languageChanged', reflect);

const loaded = new Set<Language>();

/** Adds a language's first-screen text (a lazy chunk). */
export async function loadLanguage(lng: Language): Promise<void> {
  if (loaded.has(lng)) return;
  const strings = lng === 'es' ? (await import('../locales/es')).es : (await import('../locales/en')).en;
  i18n.addResourceBundle(lng, 'translation', strings, true, false);
  loaded.add(lng);
}

/** Before the first render: the language the app opens in, with its text. */
export async function startLanguage(): Promise<void> {
  const lng = initialLanguage();
  reflect(lng);
  await loadLanguage(lng);
  if (i18n.language !== lng) await i18n.changeLanguage(lng);
}

export function currentLanguage(): Language {
  return i18n.language === 'es' ? 'es' : 'en';
}

export async function setLanguage(lng: Language): Promise<void> {
  await loadLanguage(lng);
  if (i18n.language !== lng) await i18n.changeLanguage(lng);
}

export { i18n };
