import { LANGUAGE_NAMES, type Language, useTranslation } from '../../../lib/i18n';
import { usePreferences } from '../api';

/** One big button to the other language, beside the screen title (the full panel is further down). */
export function LanguageToggle() {
  const { t, i18n } = useTranslation();
  const prefs = usePreferences();
  const other: Language = i18n.language === 'es' ? 'en' : 'es';
  return (
    <button
      type="button"
      lang={other}
      aria-label={`${t('prefs.language')}: ${LANGUAGE_NAMES[other]}`}
      onClick={() => prefs.run({ language: other })}
      disabled={prefs.pending}
      className="min-h-touch shrink-0 rounded-lg border-2 border-loam-400 bg-white px-3 text-lg font-bold"
    >
      {LANGUAGE_NAMES[other]}
    </button>
  );
}
