import { LANGUAGE_NAMES, LANGUAGES, type Language, useTranslation } from '../../../lib/i18n';
import type { Units } from '../../../lib/format';
import { usePreferences, useUnits } from '../api';

// Loaded after the first screen is drawn (it sits below Today's list): see features/today/routes/today.tsx.
/** Language and units, big two-way switches; saved per user (PATCH /api/session). */
export default function PreferencesPanel() {
  const { t, i18n } = useTranslation();
  const units = useUnits();
  const prefs = usePreferences();
  const lang = (i18n.language === 'es' ? 'es' : 'en') as Language;

  return (
    <section aria-labelledby="prefs-title" className="mt-6 rounded-xl border-2 border-loam-200 bg-white p-4">
      <h2 id="prefs-title" className="text-lg font-bold">
        {t('prefs.title')}
      </h2>
      <Switch
        label={t('prefs.language')}
        options={LANGUAGES.map((l) => ({ value: l, label: LANGUAGE_NAMES[l], lang: l }))}
        value={lang}
        onChange={(language) => prefs.run({ language })}
      />
      <Switch
        label={t('prefs.units')}
        options={[
          { value: 'us' as Units, label: t('prefs.unitsUs') },
          { value: 'metric' as Units, label: t('prefs.unitsMetric') },
        ]}
        value={units}
        onChange={(u) => prefs.run({ units: u })}
      />
      {prefs.done && prefs.data === null && <p className="mt-2 text-loam-600">{t('prefs.pending')}</p>}
      {prefs.error && (
        <p role="alert" className="mt-2 font-bold text-clay-700">
          {prefs.error.message}
        </p>
      )}
    </section>
  );
}

function Switch<T extends string>(props: {
  label: string;
  options: Array<{ value: T; label: string; lang?: string }>;
  value: T;
  onChange: (v: T) => void;
}) {
  return (
    <div className="mt-3">
      <p className="font-bold text-loam-600" id={`switch-${props.label}`}>
        {props.label}
      </p>
      <div role="group" aria-labelledby={`switch-${props.label}`} className="mt-1 grid grid-cols-2 gap-2">
        {props.options.map((o) => {
          const on = o.value === props.value;
          return (
            <button
              key={o.value}
              type="button"
              lang={o.lang}
              aria-pressed={on}
              onClick={() => !on && props.onChange(o.value)}
              className={`min-h-touch rounded-lg border-2 px-3 text-lg font-bold ${
                on ? 'border-shoot bg-shoot text-white' : 'border-loam-400 bg-white text-loam hover:bg-mist-200'
              }`}
            >
              {o.label}
            </button>
          );
        })}
      </div>
    </div>
  );
}
