import { useTranslation } from 'react-i18next';
import type { Formatter } from '../../../lib/format';
import type { LiveEstimate } from '../live';

/**
 * How a walk stands against the threshold. `borderline` is for a verdict that cannot say yes or no
 * yet: shown neutral (neither the green of "meets" nor the red of "below").
 */
export type VerdictState = 'meets' | 'below' | 'borderline';

const TONE: Record<VerdictState, string> = {
  meets: 'bg-shoot text-white',
  below: 'bg-clay text-white',
  borderline: 'bg-loam-100 text-loam border-2 border-loam-400',
};
const MARK: Record<VerdictState, string> = { meets: '✓', below: '✗', borderline: '≈' };

/** The verdict a live estimate gives today (meets or below); borderline comes with a later rule. */
export function verdictOf(live: LiveEstimate): VerdictState | null {
  if (live.kind !== 'ok') return null;
  return live.estimate.meetsThreshold ? 'meets' : 'below';
}

/**
 * One compact line that stays at the top of the entry screen while typing: the verdict and the
 * biomass (never wrapped), and how many plants count so far.
 */
export function EstimateSummary(props: { live: LiveEstimate; plants: number; f: Formatter; verdict?: VerdictState | null }) {
  const { t } = useTranslation();
  const { live, f } = props;
  const verdict = props.verdict === undefined ? verdictOf(live) : props.verdict;
  if (live.kind !== 'ok' || verdict === null) {
    return (
      <div data-testid="estimate-summary" className="rounded-lg border-2 border-loam-300 bg-white px-3 py-2 text-loam-600">
        {t('estimate.summaryNone', { count: props.plants })}
      </div>
    );
  }
  const e = live.estimate;
  return (
    <div
      data-testid="estimate-summary"
      data-verdict={verdict}
      className={`flex items-center justify-between gap-2 rounded-lg px-3 py-2 ${TONE[verdict]}`}
    >
      <span className="min-w-0 text-lg leading-tight font-bold">
        <span aria-hidden="true">{MARK[verdict]} </span>
        {t(`estimate.summary.${verdict}`)}
        <span className="block text-sm font-normal">{t('estimate.plants', { count: e.n })}</span>
      </span>
      <span className="shrink-0 text-2xl font-bold whitespace-nowrap tabular-nums" data-testid="summary-biomass">
        {f.mass(e.biomassKgHa)}
      </span>
    </div>
  );
}
