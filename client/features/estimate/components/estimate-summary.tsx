import { useTranslation } from '../../../lib/i18n';
import type { Formatter } from '../../../lib/format';
import type { LiveEstimate } from '../live';
import { verdictView, type VerdictState } from '../verdict-view';

export type { VerdictState } from '../verdict-view';

/**
 * The three looks of a verdict: green for meets, red for below, and for borderline a neutral one
 * (neither green nor red, no tick), so a borderline walk is never read as passed or failed.
 */
export const VERDICT_TONE: Record<VerdictState, string> = {
  meets: 'bg-shoot text-white',
  below: 'bg-clay text-white',
  borderline: 'bg-loam-100 text-loam border-2 border-loam-400',
};

/** The reader of a screen: its language and units, for shared/format. */
export function readerOf(f: Formatter): { lang: 'en' | 'es'; units: 'us' | 'metric' } {
  return { lang: f.locale.startsWith('es') ? 'es' : 'en', units: f.units };
}

/**
 * One compact line that stays at the top of the entry screen while typing: the verdict and the
 * biomass (never wrapped), and how many plants count so far.
 */
export function EstimateSummary(props: { live: LiveEstimate; plants: number; f: Formatter }) {
  const { t } = useTranslation();
  const { live, f } = props;
  if (live.kind !== 'ok') {
    return (
      <div data-testid="estimate-summary" className="rounded-lg border-2 border-loam-300 bg-white px-3 py-2 text-loam-600">
        {t('estimate.summaryNone', { count: props.plants })}
      </div>
    );
  }
  const v = verdictView(live.verdict, readerOf(f));
  return (
    <div
      data-testid="estimate-summary"
      data-verdict={v.state}
      className={`flex items-center justify-between gap-2 rounded-lg px-3 py-2 ${VERDICT_TONE[v.state]}`}
    >
      <span className="min-w-0 text-lg leading-tight font-bold">
        <span aria-hidden="true">{v.mark} </span>
        {t(`estimate.headline.${v.headline}`, { threshold: v.threshold })}
        <span className="block text-sm font-normal">{t('estimate.plantsOfMin', { count: v.n, min: v.minPlants })}</span>
      </span>
      <span className="shrink-0 text-2xl font-bold whitespace-nowrap tabular-nums" data-testid="summary-biomass">
        {v.biomass}
      </span>
    </div>
  );
}
