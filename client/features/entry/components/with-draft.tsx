import type { ReactNode } from 'react';
import { Link, Navigate } from 'react-router-dom';
import { useTranslation } from '../../../lib/i18n';
import { useQueueJobs } from '../../offline/public';
import type { WalkDraft } from '../drafts';
import { useDraft } from '../use-draft';

export type UpdateDraft = (change: (draft: WalkDraft) => WalkDraft) => void;

/**
 * Loads the walk in progress and hands it to a screen. A walk already handed to the outbox goes to
 * its sent screen (e.g. coming back from it); an unknown one says so with a way back to Today.
 */
export function WithDraft({ walkId, children }: { walkId: string; children: (draft: WalkDraft, update: UpdateDraft) => ReactNode }) {
  const { t } = useTranslation();
  const { draft, update, loading } = useDraft(walkId);
  const sent = useQueueJobs().some((j) => j.id === walkId);
  if (loading) return <p className="text-lg">{t('app.loading')}</p>;
  if (!draft) {
    if (sent) return <Navigate to={`/walks/${walkId}/sent`} replace />;
    return (
      <div>
        <p className="text-xl font-bold">{t('entry.notFound')}</p>
        <Link to="/" className="mt-3 inline-flex min-h-touch items-center text-lg font-bold text-shoot underline">
          {t('errors.backToToday')}
        </Link>
      </div>
    );
  }
  return <>{children(draft, update)}</>;
}
