import { useMemo, useSyncExternalStore } from 'react';
import type { Resources } from '../locales/en';
import type { ScreenResources } from '../locales/screens-en';

/**
 * The capture app's text, English and Spanish, in a few lines of its own: i18next and
 * react-i18next cost the first screen about 18 KB gzipped for what is used here (nested keys,
 * `{{name}}` placeholders, `_one` / `_other` plurals by `count`, a default value, a subtree with
 * `returnObjects`), and the same conventions are kept, so the locale files read as before.
 * Each language's first-screen text is its own small chunk, loaded before the first render
 * (main.tsx) and when the sampler switches; the later screens bring their text, both languages,
 * with their code (locales/screens.ts). The service worker precaches them all, so both languages
 * work offline. The user's choice comes from the session (per user) and is remembered on the
 * phone, so the app opens in it before the session has loaded.
 */

export type Language = 'en' | 'es';
export const LANGUAGES: readonly Language[] = ['en', 'es'];
/** Number and date formats: US English, and Mexican Spanish (decimal point, like the tape). */
export const LOCALES: Record<Language, string> = { en: 'en-US', es: 'es-MX' };
/** Each language's own name, as it appears on the switch. */
export const LANGUAGE_NAMES: Record<Language, string> = { en: 'English', es: 'Español' };

const STORAGE_KEY = 'crowntip.language';

// Every key of the text, written "a.b.c"; a plural's forms also count as the key without the
// suffix (a key may end in a suffix's word and not be a plural, e.g. "borderline_few").
type PluralSuffix = 'zero' | 'one' | 'two' | 'few' | 'many' | 'other';
type Keys<T, P extends string = ''> = {
  [K in keyof T & string]: T[K] extends string
    ? `${P}${K}` | `${P}${K extends `${infer Base}_${PluralSuffix}` ? Base : K}`
    : `${P}${K}` | Keys<T[K], `${P}${K}.`>;
}[keyof T & string];
export type TextKey = Keys<Resources & ScreenResources>;

export interface TextOptions {
  /** Picks the `_one` / `_other` form (Intl.PluralRules of the language) and fills `{{count}}`. */
  count?: number;
  /** Said when the key has no text (e.g. a crop code the app does not know yet). */
  defaultValue?: string;
  [placeholder: string]: unknown;
}

export interface TextFunction {
  /** The subtree under `key` as it is (e.g. all unit labels). */
  (key: TextKey, options: TextOptions & { returnObjects: true }): unknown;
  (key: TextKey, options?: TextOptions): string;
}

type Tree = { [key: string]: string | Tree };

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
  // The signed-in user's language, written on the page by the server (server/platform/capture-shell.ts),
  // which has already started loading its text.
  const given = typeof document !== 'undefined' ? document.documentElement.dataset.language : undefined;
  if (given === 'en' || given === 'es') return given;
  const nav = typeof navigator !== 'undefined' ? navigator.language : '';
  return nav?.toLowerCase().startsWith('es') ? 'es' : 'en';
}

function reflect(lng: Language) {
  if (typeof document !== 'undefined') document.documentElement.lang = LOCALES[lng];
  try {
    globalThis.localStorage?.setItem(STORAGE_KEY, lng);
  } catch {
    // private mode: the session still says which language
  }
}

const texts: Record<Language, Tree> = { en: {}, es: {} };
let language: Language = initialLanguage();
const listeners = new Set<() => void>();

function merge(into: Tree, from: Tree, overwrite: boolean) {
  for (const [k, v] of Object.entries(from)) {
    const here = into[k];
    if (typeof v === 'object' && typeof here === 'object') merge(here, v, overwrite);
    else if (here === undefined || overwrite) into[k] = typeof v === 'object' ? merge({}, v, true) : v;
  }
  return into;
}

function find(lng: Language, key: string): string | Tree | undefined {
  let node: string | Tree | undefined = texts[lng];
  for (const part of key.split('.')) {
    if (typeof node !== 'object') return undefined;
    node = node[part];
  }
  return node;
}

const pluralRules = new Map<Language, Intl.PluralRules>();
function pluralForm(lng: Language, count: number): string {
  let rules = pluralRules.get(lng);
  if (!rules) pluralRules.set(lng, (rules = new Intl.PluralRules(lng)));
  return rules.select(count);
}

function translate(lng: Language, key: string, options: (TextOptions & { returnObjects?: boolean }) | undefined): unknown {
  let text: string | Tree | undefined;
  if (typeof options?.count === 'number') {
    const form = pluralForm(lng, options.count);
    text = find(lng, `${key}_${form}`) ?? find(lng, `${key}_other`);
  }
  text ??= find(lng, key);
  if (typeof text === 'object' && options?.returnObjects) return text;
  if (typeof text !== 'string') return options?.defaultValue ?? key;
  if (!options) return text;
  // A placeholder without a value is left out, as i18next does.
  return text.replace(/\{\{(\w+)\}\}/g, (_, name: string) => {
    const value = options[name];
    return value === undefined || value === null ? '' : String(value);
  });
}

function textFor(lng: Language): TextFunction {
  return ((key: string, options?: TextOptions) => translate(lng, key, options)) as TextFunction;
}

const tByLanguage: Record<Language, TextFunction> = { en: textFor('en'), es: textFor('es') };

/** The text store (named like i18next's instance, which it replaces). */
export const i18n = {
  get language(): Language {
    return language;
  },
  /** Text in the current language; see TextFunction. */
  t: ((key: string, options?: TextOptions) => translate(language, key, options)) as TextFunction,
  /** Adds text to a language; `overwrite` false keeps text already there. */
  addResources(lng: Language, tree: object, overwrite = false): void {
    merge(texts[lng], tree as Tree, overwrite);
  },
  async changeLanguage(lng: Language): Promise<void> {
    if (lng === language) return;
    language = lng;
    reflect(lng);
    for (const l of listeners) l();
  },
};

const subscribe = (l: () => void) => {
  listeners.add(l);
  return () => {
    listeners.delete(l);
  };
};
const getLanguage = () => language;

/** For components: the text function of the current language (a new one when it changes). */
export function useTranslation() {
  const lng = useSyncExternalStore(subscribe, getLanguage, getLanguage);
  return useMemo(() => ({ t: tByLanguage[lng], i18n }), [lng]);
}

const loaded = new Set<Language>();

/** Adds a language's first-screen text (a lazy chunk). */
export async function loadLanguage(lng: Language): Promise<void> {
  if (loaded.has(lng)) return;
  const strings = lng === 'es' ? (await import('../locales/es')).es : (await import('../locales/en')).en;
  i18n.addResources(lng, strings);
  loaded.add(lng);
}

/** Before the first render: the language the app opens in, with its text. */
export async function startLanguage(): Promise<void> {
  const lng = initialLanguage();
  reflect(lng);
  await loadLanguage(lng);
  await i18n.changeLanguage(lng);
}

export function currentLanguage(): Language {
  return language;
}

export async function setLanguage(lng: Language): Promise<void> {
  await loadLanguage(lng);
  await i18n.changeLanguage(lng);
}
