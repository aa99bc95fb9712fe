import { useTranslation } from '../../../lib/i18n';
import type { Formatter } from '../../../lib/format';
import type { LiveEstimate } from '../live';
import { verdictView, type VerdictView } from '../verdict-view';
import { DotPlot } from './dot-plot';
import { readerOf, VERDICT_TONE } from './estimate-summary';

/**
 * Mean, biomass with its combined range, the verdict with what decided it, the more-plants advice,
 * the dot plot. Shared by the live estimate and the server's stored result.
 */
export function EstimateFigures({ v, lengthsCm, f }: { v: VerdictView; lengthsCm: number[]; f: Formatter }) {
  const { t } = useTranslation();
  return (
    <div>
      <dl className="grid grid-cols-2 gap-3">
        <div>
          <dt className="font-bold text-loam-600">{t('estimate.mean')}</dt>
          <dd className="text-2xl font-bold whitespace-nowrap sm:text-3xl" data-testid="mean-length">
            {f.length(v.meanLengthCm)}
          </dd>
        </div>
        <div>
          <dt className="font-bold text-loam-600">{t('estimate.biomass')}</dt>
          <dd className="text-2xl font-bold whitespace-nowrap sm:text-3xl" data-testid="biomass">
            {v.biomass}
          </dd>
          <dd className="text-loam-700" data-testid="range">
            {v.range ?? t('estimate.rangeUnknown')}
          </dd>
        </div>
      </dl>
      <p className={`mt-3 rounded-lg px-3 py-2 text-xl font-bold ${VERDICT_TONE[v.state]}`} data-testid="verdict" data-verdict={v.state}>
        <span aria-hidden="true">{v.mark} </span>
        {t(`estimate.headline.${v.headline}`, { threshold: v.threshold })}
      </p>
      {v.reasons.length > 0 && (
        <ul className="mt-2 list-disc space-y-1 pl-5 text-loam-800" data-testid="reasons">
          {v.reasons.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
      )}
      {v.advice && (
        <p className="mt-2 rounded-lg border-l-8 border-loam-400 bg-loam-50 px-3 py-2 text-lg font-bold" data-testid="advice">
          {v.advice}
        </p>
      )}
      {v.cautions.map((c) => (
        <p key={c} className="mt-1 font-bold text-clay-800">
          {c}
        </p>
      ))}
      {v.extrapolatedNote && <p className="mt-1 font-bold text-clay-800">{t('estimate.extrapolated')}</p>}
      <div className="mt-2">
        <DotPlot lengthsCm={lengthsCm} neededCm={v.lengthForThresholdCm} f={f} />
      </div>
      {v.lengthForThresholdCm != null && <p className="text-loam-700">{t('estimate.needed', { length: f.length(v.lengthForThresholdCm) })}</p>}
    </div>
  );
}

/** The live panel: the estimate after every entry, or why there is none. */
export function EstimatePanel({ live, lengthsCm, f }: { live: LiveEstimate; lengthsCm: number[]; f: Formatter }) {
  const { t } = useTranslation();
  return (
    <section aria-labelledby="estimate-title" className="rounded-xl border-2 border-loam-300 bg-white p-4" aria-live="polite">
      <h2 id="estimate-title" className="flex items-baseline justify-between gap-2 text-xl font-bold">
        <span>{t('estimate.title')}</span>
        <span className="text-base font-normal text-loam-600">{t('estimate.plants', { count: lengthsCm.length })}</span>
      </h2>
      <div className="mt-2">
        {live.kind === 'ok' ? (
          <>
            <EstimateFigures v={verdictView(live.verdict, readerOf(f))} lengthsCm={lengthsCm} f={f} />
            <p className="mt-2 text-sm text-loam-600">
              {t('estimate.calibration', {
                crop: t(`crops.${live.calibration.crop}` as 'crops.other', { defaultValue: live.calibration.crop }),
                version: String(live.calibration.version),
              })}{' '}
              · {t(`estimate.basis.${live.verdict.decisionBasis}`)} · {t('estimate.screening')}
            </p>
          </>
        ) : live.kind === 'none' ? (
          <p className="text-lg">{t('estimate.none')}</p>
        ) : live.kind === 'no_calibration' ? (
          <p className="text-lg">{t('estimate.noCalibration')}</p>
        ) : live.kind === 'not_loaded' ? (
          <p className="text-lg">{t('estimate.notLoaded')}</p>
        ) : (
          <p className="text-lg">
            {t('estimate.noCalibration')} ({live.message})
          </p>
        )}
      </div>
    </section>
  );
}
