import { useTranslation } from '../../../lib/i18n';
import { isWalkJob, type QueueJob } from '../jobs';
import { whatWaits } from '../words';

/** "The signal is back: the walk of … reached the office", until closed (features/offline/components/queue-banner.tsx). */
export default function SentNote({ jobs, onClose }: { jobs: QueueJob[]; onClose: () => void }) {
  const { t } = useTranslation();
  const fields = jobs.map((j) => j.label.fieldName).join(', ');
  const [only] = jobs;
  const text =
    jobs.length === 1 && only
      ? t(isWalkJob(only) ? 'queue.sentWalk' : 'queue.sentOutline', { fields })
      : t('queue.sentNow', { what: whatWaits(t, jobs), fields });
  return (
    <div role="status" className="bg-shoot-50 text-shoot-800" data-testid="sent-banner">
      <div className="mx-auto flex max-w-2xl items-center justify-between gap-3 px-4 py-2">
        <p className="font-bold">{text}</p>
        <button type="button" onClick={onClose} className="min-h-touch shrink-0 rounded-lg border-2 border-current px-3 font-bold">
          {t('queue.sentOk')}
        </button>
      </div>
    </div>
  );
}
