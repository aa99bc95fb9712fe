import { lazy, Suspense, useEffect, useRef, useState } from 'react';
import { useTranslation } from '../../../lib/i18n';
import { loadOutbox, useOnline, useQueueJobs, useSendingId } from '../public';
import { bucketOf, hadToWait, type QueueJob } from '../jobs';
import { whatWaits } from '../words';

// Shown only on a tap on Details: loaded then (precached for offline use), not with the first screen.
const JobList = lazy(() => import('./job-list'));
const SentNote = lazy(() => import('./sent-note'));

/**
 * The outbox's state on every screen: "No signal: 2 walks and 1 field outline waiting to send"
 * (walks, and boundaries traced on the phone, go through the same outbox), one being sent, those
 * that need a person (a conflict, a refusal, a sign-in). Nothing here can delete a walk.
 */
export function QueueBanner() {
  const { t } = useTranslation();
  const jobs = useQueueJobs();
  const online = useOnline();
  const sending = useSendingId();
  const [open, setOpen] = useState(false);
  const pending = jobs.filter((j) => j.state !== 'done');
  const waiting = pending.filter((j) => bucketOf(j) === 'waiting');
  const signin = pending.filter((j) => bucketOf(j) === 'signin');
  const attention = pending.filter((j) => bucketOf(j) === 'attention');

  // Walks and outlines seen waiting on this screen that have since reached the office: said once, until closed.
  const seenWaiting = useRef(new Set<string>());
  const [arrived, setArrived] = useState<QueueJob[]>([]);
  useEffect(() => {
    const now = jobs.filter((j) => j.state === 'done' && seenWaiting.current.has(j.id));
    for (const j of now) seenWaiting.current.delete(j.id);
    // Only those that did not go at once: a walk sent at once already has its own screen saying so.
    for (const j of pending) if (hadToWait(j, online)) seenWaiting.current.add(j.id);
    if (now.length > 0) setArrived((a) => [...a, ...now]);
  }, [jobs, online]);
  const sentNote =
    arrived.length > 0 ? (
      <Suspense fallback={null}>
        <SentNote jobs={arrived} onClose={() => setArrived([])} />
      </Suspense>
    ) : null;

  if (pending.length === 0) {
    if (sentNote) return sentNote;
    if (online) return null;
    return (
      <div role="status" className="bg-loam-700 text-white">
        <p className="mx-auto max-w-2xl px-4 py-2 font-bold">
          {t('net.offline')} <span className="font-normal">· {t('net.offlineHint')}</span>
        </p>
      </div>
    );
  }

  const tone = attention.length > 0 ? 'bg-clay text-white' : 'bg-straw text-loam';
  return (
    <>
    {sentNote}
    <div role="status" className={tone} data-testid="queue-banner">
      <div className="mx-auto max-w-2xl px-4 py-3">
        {waiting.length > 0 && (
          <p className="text-lg font-bold">
            {sending ? t('queue.sending') + ' · ' : ''}
            {t(online ? 'queue.waiting' : 'queue.offlineWaiting', { what: whatWaits(t, waiting) })}
          </p>
        )}
        {waiting.length > 0 && !online && <p>{t('queue.autoRetry')}</p>}
        {signin.length > 0 && (
          <p className="text-lg font-bold">
            {t('queue.signin', { what: whatWaits(t, signin) })}{' '}
            <a className="underline underline-offset-4" href={`/login?next=${encodeURIComponent('/capture')}`}>
              {t('queue.signInLink')}
            </a>
          </p>
        )}
        {attention.length > 0 && (
          <p className="text-lg font-bold">{t('queue.attention', { count: attention.length, what: whatWaits(t, attention) })}</p>
        )}
        <div className="mt-2 flex flex-wrap gap-2">
          {online && (waiting.length > 0 || signin.length > 0) && !sending && (
            <button
              type="button"
              onClick={() => void loadOutbox().then((q) => q.retryNow())}
              className="min-h-touch rounded-lg border-2 border-current px-4 font-bold"
            >
              {t('queue.retry')}
            </button>
          )}
          <button
            type="button"
            aria-expanded={open}
            onClick={() => setOpen((o) => !o)}
            className="min-h-touch rounded-lg border-2 border-current px-4 font-bold"
          >
            {t('queue.details')}
          </button>
        </div>
        {open && (
          <Suspense fallback={null}>
            <JobList jobs={pending} />
          </Suspense>
        )}
      </div>
    </div>
    </>
  );
}
