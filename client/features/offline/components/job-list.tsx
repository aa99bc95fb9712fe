import { useTranslation } from '../../../lib/i18n';
import { useFormat } from '../../session/public';
import { isWalkJob, type QueueJob } from '../jobs';

/** The outbox's walks and traced boundaries one by one, under the banner's Details (features/offline/components/queue-banner.tsx). */
export default function JobList({ jobs }: { jobs: QueueJob[] }) {
  return (
    <ul className="mt-3 space-y-2">
      {jobs.map((job) => (
        <JobLine key={job.id} job={job} />
      ))}
    </ul>
  );
}

function JobLine({ job }: { job: QueueJob }) {
  const { t } = useTranslation();
  const f = useFormat();
  const walk = isWalkJob(job);
  return (
    <li className="rounded-lg bg-white p-3 text-loam">
      <p className="font-bold">
        {job.label.fieldName} · {job.label.ranchName}
      </p>
      <p>
        {walk
          ? `${f.date(job.body.walkedOn)} · ${t('queue.plants', { count: job.body.plants.length })}`
          : t('queue.boundary', { points: job.body.pointsRecorded })}
      </p>
      {job.attention === 'conflict' && <p className="mt-1 font-bold text-clay-700">{t(walk ? 'queue.conflict' : 'queue.conflictOutline')}</p>}
      {job.attention === 'refused' && (
        <p className="mt-1 font-bold text-clay-700">{t(walk ? 'queue.refused' : 'queue.refusedOutline', { message: job.lastError?.message ?? '' })}</p>
      )}
      {job.state === 'waiting' && job.lastError && (
        <p className="mt-1 text-loam-600">{t('queue.lastError', { message: job.lastError.message })}</p>
      )}
    </li>
  );
}
