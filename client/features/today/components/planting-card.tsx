import { Link } from 'react-router-dom';
import { useTranslation } from '../../../lib/i18n';
import type { TodayItem } from '../../../../shared/schemas/walks';
import { useFormat } from '../../session/public';
import type { WalkDraft } from '../../entry/public';

export function PlantingCard({ item, draft, waiting = false }: { item: TodayItem; draft: WalkDraft | null; waiting?: boolean }) {
  const { t } = useTranslation();
  const f = useFormat();
  const walk = item.latestWalk;
  const crop = t(`crops.${item.crop}` as 'crops.other', { defaultValue: item.crop });
  return (
    <li>
      <Link
        to={`/plantings/${item.plantingId}`}
        aria-label={t('today.open', { field: item.fieldName })}
        className="block rounded-xl border-2 border-loam-300 bg-white p-4 hover:border-shoot focus-visible:border-shoot"
      >
        <span className="flex items-start justify-between gap-2">
          <span className="text-2xl font-bold">{item.fieldName}</span>
          {item.assigned && (
            <span className="shrink-0 rounded-full bg-sky-50 px-3 py-1 font-bold text-sky-800">{t('today.assigned')}</span>
          )}
        </span>
        <span className="block text-lg text-loam-600">
          {item.ranchName} · {f.area(item.areaHa)}
        </span>
        <span className="mt-1 block text-lg">
          <span className="font-bold">{crop}</span>
          {item.variety ? ` · ${item.variety}` : ''}
        </span>
        <span className="block text-lg">{t('today.daysSinceSeeding', { count: item.daysSinceSeeding })}</span>
        <span className="mt-2 block">
          {draft ? (
            <span className="font-bold text-shoot-700">
              {t('today.plantsDone', {
                count: Object.values(draft.values).filter((v) => v.trim() !== '').length,
                total: draft.stopCount,
              })}
            </span>
          ) : waiting ? (
            <span className="font-bold text-sky-800">{t('today.waitingToSend')}</span>
          ) : walk ? (
            <span className={`font-bold ${walk.status === 'rejected' ? 'text-clay-700' : 'text-shoot-700'}`}>
              {t(`today.walk.${walk.status}`, { date: f.date(walk.walkedOn) })}
            </span>
          ) : (
            <span className="text-loam-600">{t('today.notWalked')}</span>
          )}
        </span>
        {walk?.status === 'rejected' && walk.rejectReason && (
          <span className="mt-1 block rounded-lg bg-clay-50 p-2 text-clay-800">
            {t('today.rejectReason', { reason: walk.rejectReason })}
          </span>
        )}
      </Link>
    </li>
  );
}
