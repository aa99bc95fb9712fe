import '../../../locales/screens';
import { Link, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { useTranslation } from '../../../lib/i18n';
import { useFormat } from '../../session/public';
import { isWalkJob, loadOutbox, useOnline, useQueueJobs, useSendingId, type WalkJob } from '../../offline/public';
import { EstimateFigures, readerOf, storedVerdictView } from '../../estimate/public';
import { walkQuery } from '../api';

/** After "Send": waiting in the outbox, being sent, or the result the server stored. */
export default function SentRoute() {
  const { walkId = '' } = useParams();
  const { t } = useTranslation();
  const f = useFormat();
  const online = useOnline();
  const job = useQueueJobs().find((j): j is WalkJob => j.id === walkId && isWalkJob(j));
  const sending = useSendingId() === walkId;
  const done = !job || job.state === 'done';
  const stored = useQuery({ ...walkQuery(walkId), enabled: done });
  const walk = stored.data;

  return (
    <div>
      {!done ? (
        <section aria-labelledby="sent-title" className="rounded-xl border-4 border-straw bg-straw-50 p-4">
          <h1 id="sent-title" className="text-3xl font-bold">
            {sending ? t('sent.sending') : t('sent.queuedTitle')}
          </h1>
          <p className="mt-1 text-xl font-bold">
            {job.label.fieldName} · {job.label.ranchName}
          </p>
          <p className="text-lg">
            {f.date(job.body.walkedOn)} · {t('estimate.plants', { count: job.body.plants.length })}
          </p>
          {job.state === 'attention' ? (
            <p role="alert" className="mt-3 text-lg font-bold text-clay-800">
              {job.attention === 'conflict' ? t('queue.conflict') : t('queue.refused', { message: job.lastError?.message ?? '' })}
            </p>
          ) : (
            <p className="mt-3 text-lg">{t('sent.queued')}</p>
          )}
          {job.state === 'waiting' && online && !sending && (
            <button
              type="button"
              onClick={() => void loadOutbox().then((q) => q.retryNow())}
              className="mt-3 min-h-14 w-full rounded-xl border-2 border-loam bg-white px-4 text-lg font-bold"
            >
              {t('queue.retry')}
            </button>
          )}
        </section>
      ) : (
        <section aria-labelledby="sent-title">
          <h1 id="sent-title" className="text-3xl font-bold">
            ✓ {t('sent.title')}
          </h1>
          <p className="mt-1 text-lg">
            {t('sent.done')}
            {job?.doneAt ? ` ${t('queue.sentAt', { time: f.dateTime(job.doneAt) })}` : ''}
          </p>
          <div className="mt-4 rounded-xl border-2 border-loam-300 bg-white p-4" data-testid="stored-result">
            <h2 className="text-xl font-bold">{t('sent.stored')}</h2>
            {walk ? (
              <>
                <p className="text-lg">
                  <span className="font-bold">{walk.fieldName}</span> · {walk.ranchName} · {f.date(walk.walkedOn)}
                </p>
                <p className="text-lg">
                  {t(`sent.status.${walk.status}`)} · {t('estimate.plants', { count: walk.plants.length })} ·{' '}
                  {t('sent.photos', { count: walk.photos.length })}
                  {walk.stage ? ` · ${walk.stage}` : ''}
                </p>
                {walk.rejectReason && <p className="font-bold text-clay-800">{t('today.rejectReason', { reason: walk.rejectReason })}</p>}
                <div className="mt-3">
                  {walk.estimate ? (
                    <EstimateFigures v={storedVerdictView(walk.estimate, readerOf(f))} lengthsCm={walk.plants.map((p) => p.lengthCm)} f={f} />
                  ) : (
                    <p className="text-lg">{t('sent.noEstimate')}</p>
                  )}
                </div>
                <p className="mt-2 text-loam-600">
                  {t('sent.storedHint')} {t('estimate.screening')}.
                </p>
              </>
            ) : stored.isError || (!online && !stored.data) ? (
              <p className="text-lg">{t('sent.storedOffline')}</p>
            ) : (
              <p className="text-lg">{t('sent.storedLoading')}</p>
            )}
          </div>
        </section>
      )}
      <Link
        to="/"
        className="mt-5 flex min-h-16 items-center justify-center rounded-xl bg-shoot px-5 text-center text-xl font-bold text-white hover:bg-shoot-800"
      >
        {t('sent.backToday')}
      </Link>
    </div>
  );
}
