import { Suspense, useDeferredValue, useState } from 'react';
import { Link } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { useTranslation } from '../../../lib/i18n';
import type { TodayItem } from '../../../../shared/schemas/walks';
import { LanguageToggle, PreferencesPanel, useFormat, useUser } from '../../session/public';
import { listDrafts } from '../../entry/public';
import { calibrationsQuery, rulesQuery } from '../../../lib/estimate-inputs';
import { isWalkJob, useQueueJobs } from '../../offline/public';
import { todayQuery } from '../api';
import { groupToday } from '../groups';
import { PlantingCard } from '../components/planting-card';

// Below the list, so it loads after the first screen has drawn (precached for offline use).

/** Today's walks: the sampler's plantings, walks in progress, search, language and units. */
export function TodayRoute() {
  const { t } = useTranslation();
  const user = useUser();
  const f = useFormat();
  const today = useQuery(todayQuery(user.id));
  // Fetched here, while there is signal, so the live estimate has them later in the field.
  useQuery(calibrationsQuery);
  useQuery(rulesQuery);
  const drafts = useQuery({
    queryKey: ['drafts', user.id],
    queryFn: () => listDrafts(user.id),
    networkMode: 'always',
    staleTime: 0,
    gcTime: 0,
  });

  const [q, setQ] = useState('');
  const query = useDeferredValue(q.trim().toLowerCase());
  const items = today.data?.items ?? [];
  const shown = query ? items.filter((i) => i.fieldName.toLowerCase().includes(query)) : items;
  const draftFor = new Map((drafts.data ?? []).map((d) => [d.planting.plantingId, d]));
  const noneAssigned = items.length > 0 && !items.some((i) => i.assigned);
  const groups = groupToday(shown);
  // A walk handed to the outbox but not yet at the office: its planting is not "not walked".
  const waiting = new Set(useQueueJobs().flatMap((j) => (j.state !== 'done' && isWalkJob(j) ? [j.body.plantingId] : [])));
  const card = (item: TodayItem) => (
    <PlantingCard key={item.plantingId} item={item} draft={draftFor.get(item.plantingId) ?? null} waiting={waiting.has(item.plantingId)} />
  );

  return (
    <section aria-labelledby="today-title">
      <div className="flex items-start justify-between gap-3">
        <h1 id="today-title" className="text-3xl font-bold">
          {t('today.title')}
        </h1>
        <LanguageToggle />
      </div>

      <div className="mt-5">
        <label htmlFor="today-search" className="block text-lg font-bold">
          {t('today.search')}
        </label>
        <div className="mt-1 flex gap-2">
          <input
            id="today-search"
            type="search"
            value={q}
            onChange={(e) => setQ(e.target.value)}
            autoComplete="off"
            enterKeyHint="search"
            className="min-h-14 w-full min-w-0 rounded-lg border-2 border-loam-400 bg-white px-3 text-xl"
          />
          {q && (
            <button
              type="button"
              onClick={() => setQ('')}
              className="min-h-14 shrink-0 rounded-lg border-2 border-loam-400 bg-white px-4 font-bold"
            >
              {t('today.clearSearch')}
            </button>
          )}
        </div>
      </div>

      {today.isPending && today.fetchStatus !== 'idle' && <p className="mt-4 text-lg">{t('app.loading')}</p>}
      {today.isError && !today.data && (
        <p role="alert" className="mt-4 rounded-lg border-l-4 border-clay bg-clay-50 p-4 text-clay-800">
          {t('today.loadError')} {today.error.message}
        </p>
      )}
      {today.isPending && today.fetchStatus === 'idle' && (
        <p className="mt-4 rounded-lg border-l-4 border-loam-400 bg-white p-4">{t('session.needSignal')}</p>
      )}

      {today.data && items.length === 0 && (
        <div className="mt-4 rounded-xl border-2 border-dashed border-loam-300 bg-white px-5 py-8 text-center">
          <p className="text-xl font-bold">{t('today.empty')}</p>
          <p className="mt-2 text-loam-500">{t('today.emptyHint')}</p>
        </div>
      )}
      {today.data && items.length > 0 && shown.length === 0 && <p className="mt-4 text-lg">{t('today.noMatch', { q })}</p>}
      {groups.assigned.length > 0 && (
        <section aria-labelledby="assigned-title" className="mt-5">
          <h2 id="assigned-title" className="border-b-2 border-loam-300 pb-1 text-xl font-bold">
            {t('today.groupAssigned')}
          </h2>
          <ul className="mt-2 space-y-3">{groups.assigned.map(card)}</ul>
        </section>
      )}
      {(drafts.data?.length ?? 0) > 0 && (
        <section aria-labelledby="drafts-title" className="mt-5">
          <h2 id="drafts-title" className="border-b-2 border-loam-300 pb-1 text-xl font-bold">
            {t('today.inProgress')}
          </h2>
          <ul className="mt-2 space-y-3">
            {drafts.data!.map((d) => {
              const done = Object.values(d.values).filter((v) => v.trim() !== '').length;
              return (
                <li key={d.id} className="rounded-xl border-4 border-straw bg-white p-4">
                  <p className="text-xl font-bold">{d.planting.fieldName}</p>
                  <p className="text-loam-600">
                    {d.planting.ranchName} · {f.date(d.walkedOn)}
                  </p>
                  <p className="mt-1 font-bold">{t('today.plantsDone', { count: done, total: d.stopCount })}</p>
                  <Link
                    to={`/walks/${d.id}`}
                    aria-label={`${t('today.continue')}: ${d.planting.fieldName}`}
                    className="mt-3 flex min-h-14 items-center justify-center rounded-lg bg-shoot px-5 text-xl font-bold text-white hover:bg-shoot-800"
                  >
                    {t('today.continue')}
                  </Link>
                </li>
              );
            })}
          </ul>
        </section>
      )}

      {groups.other.length > 0 && (
        <section aria-labelledby="other-title" className="mt-5">
          <h2 id="other-title" className="border-b-2 border-loam-300 pb-1 text-xl font-bold">
            {t('today.groupOther')}
          </h2>
          {noneAssigned && !query && <p className="mt-1 text-loam-600">{t('today.allOpen')}</p>}
          <ul className="mt-2 space-y-3">{groups.other.map(card)}</ul>
        </section>
      )}
      {today.data && today.isError && <p className="mt-3 text-loam-600">{t('today.cached')}</p>}

      <Suspense fallback={null}>
        <PreferencesPanel />
      </Suspense>
      <p className="mt-3 text-loam-600">{t('today.units', { units: f.us ? t('prefs.unitsUs') : t('prefs.unitsMetric') })}</p>
      <p className="mt-5 border-l-4 border-straw bg-straw-50 px-4 py-3">{t('today.caution')}</p>
    </section>
  );
}
