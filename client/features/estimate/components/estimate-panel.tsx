import { useTranslation } from 'react-i18next';
import { USUAL_SAMPLE_SIZE } from '../../../../shared/calc/estimate';
import type { Formatter } from '../../../lib/format';
import type { LiveEstimate } from '../live';
import { DotPlot } from './dot-plot';

/** The fields shown, shared by the live estimate and the server's stored snapshot. */
export interface EstimateView {
  n: number;
  meanLengthCm: number;
  biomassKgHa: number;
  interval: [number, number];
  level: number;
  thresholdKgHa: number;
  meetsThreshold: boolean;
  extrapolated: boolean;
  morePlantsSuggested: number | null;
  samplingRange: [number, number] | null;
  lengthForThresholdCm?: number | null;
}

/** Mean, biomass with its interval, the verdict, the more-plants advice, the dot plot. */
export function EstimateFigures({ e, lengthsCm, f }: { e: EstimateView; lengthsCm: number[]; f: Formatter }) {
  const { t } = useTranslation();
  let advice: string;
  if (e.samplingRange === null) advice = t('estimate.onePlant');
  else if (e.morePlantsSuggested === 0) advice = t('estimate.settled');
  else if (e.morePlantsSuggested !== null) advice = t('estimate.more', { count: e.morePlantsSuggested });
  else advice = t('estimate.moreUnknown');
  const borderline = e.samplingRange !== null && e.morePlantsSuggested !== 0;

  return (
    <div>
      <dl className="grid grid-cols-2 gap-3">
        <div>
          <dt className="font-bold text-loam-600">{t('estimate.mean')}</dt>
          <dd className="text-2xl font-bold whitespace-nowrap sm:text-3xl" data-testid="mean-length">
            {f.length(e.meanLengthCm)}
          </dd>
        </div>
        <div>
          <dt className="font-bold text-loam-600">{t('estimate.biomass')}</dt>
          <dd className="text-2xl font-bold whitespace-nowrap sm:text-3xl" data-testid="biomass">
            {f.mass(e.biomassKgHa)}
          </dd>
          <dd className="text-loam-700">
            {t('estimate.interval', {
              level: f.num(e.level * 100),
              lo: f.massValue(e.interval[0]),
              hi: f.massValue(e.interval[1]),
            })}
          </dd>
        </div>
      </dl>
      <p
        className={`mt-3 rounded-lg px-3 py-2 text-xl font-bold ${e.meetsThreshold ? 'bg-shoot text-white' : 'bg-clay text-white'}`}
        data-testid="verdict"
      >
        {e.meetsThreshold ? '✓ ' : '✗ '}
        {t(e.meetsThreshold ? 'estimate.meets' : 'estimate.below', { threshold: f.mass(e.thresholdKgHa) })}
      </p>
      <p className={`mt-2 text-lg ${borderline ? 'font-bold text-clay-800' : ''}`} data-testid="advice">
        {advice}
      </p>
      {e.n < USUAL_SAMPLE_SIZE && <p className="text-loam-600">{t('estimate.usual', { count: USUAL_SAMPLE_SIZE })}</p>}
      {e.extrapolated && <p className="mt-1 font-bold text-clay-800">{t('estimate.extrapolated')}</p>}
      <div className="mt-2">
        <DotPlot lengthsCm={lengthsCm} neededCm={e.lengthForThresholdCm ?? null} f={f} />
      </div>
      {e.lengthForThresholdCm != null && (
        <p className="text-loam-700">{t('estimate.needed', { length: f.length(e.lengthForThresholdCm) })}</p>
      )}
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
            <EstimateFigures e={live.estimate} lengthsCm={lengthsCm} f={f} />
            <p className="mt-2 text-sm text-loam-600">
              {t('estimate.calibration', {
                crop: t(`crops.${live.calibration.crop}` as 'crops.other', { defaultValue: live.calibration.crop }),
                version: String(live.calibration.version),
              })}{' '}
              · {t('estimate.screening')}
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
