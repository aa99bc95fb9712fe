import '../../../locales/screens';
import type { ReactNode } from 'react';
import { useNavigate } from 'react-router-dom';
import { useTranslation } from '../../../lib/i18n';
import { ArtCrown, ArtDig, ArtMeasure, ArtRandom } from '../components/guide-art';

/** The short, illustrated measuring guide, one tap from the plan and from every stop. */
export default function GuideRoute() {
  const { t } = useTranslation();
  const navigate = useNavigate();
  // Back where the sampler came from; straight to Today if the guide was opened directly.
  const back = () => ((window.history.state as { idx?: number } | null)?.idx ? navigate(-1) : navigate('/'));

  return (
    <article aria-labelledby="guide-title">
      <h1 id="guide-title" className="text-3xl font-bold">
        {t('guide.title')}
      </h1>
      <p className="mt-1 text-lg">{t('guide.intro')}</p>
      <ol className="mt-4 space-y-4">
        <Step title={t('guide.step1Title')} text={t('guide.step1')} art={<ArtRandom label={t('guide.art1')} />} />
        <Step title={t('guide.step2Title')} text={t('guide.step2')} art={<ArtDig label={t('guide.art2')} />} />
        <Step title={t('guide.step3Title')} text={t('guide.step3')} art={<ArtCrown label={t('guide.art3')} />} />
        <Step title={t('guide.step4Title')} text={t('guide.step4')} art={<ArtMeasure label={t('guide.art4')} />} />
        <Step title={t('guide.step5Title')} text={t('guide.step5')} />
      </ol>

      <section aria-labelledby="safety-title" className="mt-5 rounded-xl border-l-8 border-clay bg-clay-50 p-4 text-clay-900">
        <h2 id="safety-title" className="text-xl font-bold">
          {t('guide.safetyTitle')}
        </h2>
        <ul className="mt-2 list-disc space-y-2 pl-5 text-lg">
          <li>{t('guide.safetyDigging')}</li>
          <li>{t('guide.safetyPollen')}</li>
          <li>{t('guide.safetyScreening')}</li>
        </ul>
      </section>

      <button
        type="button"
        onClick={back}
        className="mt-5 min-h-16 w-full rounded-xl bg-shoot px-5 text-2xl font-bold text-white hover:bg-shoot-800"
      >
        {t('guide.done')}
      </button>
    </article>
  );
}

function Step({ title, text, art }: { title: string; text: string; art?: ReactNode }) {
  return (
    <li className="rounded-xl border-2 border-loam-200 bg-white p-4">
      <h2 className="text-xl font-bold">{title}</h2>
      {art && <div className="mt-2 flex justify-center">{art}</div>}
      <p className="mt-2 text-lg">{text}</p>
    </li>
  );
}
