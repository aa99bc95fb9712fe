import { Suspense, useEffect, useRef } from 'react';
import { Outlet } from 'react-router-dom';
import { useIsRestoring, useQueryClient } from '@tanstack/react-query';
import { useTranslation } from '../lib/i18n';
import { ApiError } from '../lib/api';
import { PAGE_LOADED_AT, reconcilePreferences, sessionKeys, useSession } from '../features/session/api';
import { SignOutButton } from '../features/session/components/sign-out-button';
import { QueueBanner } from '../features/offline/components/queue-banner';
import { loadOutbox, useQueueJobs } from '../features/offline/public';
import { todayKeys } from '../features/today/api';
import { walkKeys } from '../features/submit/keys';
import { Mark } from './mark';
import { ScreenBoundary } from './route-error';

/** Every signed-in /capture screen: who is sampling, the outbox banner, then the screen. */
export function Shell() {
  const { t } = useTranslation();
  const restoring = useIsRestoring();
  const session = useSession();
  const qc = useQueryClient();
  const data = session.data;
  // Only a session fetched on this page load is known to match the cookie; the copy kept on the
  // phone may be someone else's if people swapped without signing out.
  const fresh = Boolean(data) && session.dataUpdatedAt >= PAGE_LOADED_AT;

  useEffect(() => {
    if (!fresh || !data) return;
    const userId = data.user.id;
    void loadOutbox().then((outbox) => {
      outbox.setUser(userId);
      return outbox.retryNow();
    });
    void reconcilePreferences(data).then((updated) => {
      if (updated) qc.setQueryData(sessionKeys.current(), updated);
    });
    // Again whenever the session is refetched (focus, reconnect): the signal may be back.
  }, [fresh, data?.user.id, session.dataUpdatedAt]);

  // A walk that reached the office changes today's list and has a stored result to show.
  const jobs = useQueueJobs();
  const doneSeen = useRef<Set<string> | null>(null);
  useEffect(() => {
    const done = jobs.filter((j) => j.state === 'done').map((j) => j.id);
    if (doneSeen.current === null) {
      doneSeen.current = new Set(done);
      return;
    }
    const arrived = done.filter((id) => !doneSeen.current!.has(id));
    if (arrived.length === 0) return;
    arrived.forEach((id) => doneSeen.current!.add(id));
    void qc.invalidateQueries({ queryKey: todayKeys.all });
    for (const id of arrived) void qc.invalidateQueries({ queryKey: walkKeys.detail(id) });
  }, [jobs, qc]);

  // The sending engine loads once the first screen is up (it is not needed to draw it).
  useEffect(() => {
    void loadOutbox();
  }, []);

  // The outbox sends by itself when the signal may be back, without the app being reopened. A
  // session not yet confirmed on this page load is asked for first: it decides whose walks go.
  const freshRef = useRef(fresh);
  freshRef.current = fresh;
  useEffect(() => {
    let stop: (() => void) | null = null;
    let live = true;
    void import('../features/offline/resend').then(({ watchForSignal }) => {
      if (!live) return;
      stop = watchForSignal((why) => {
        if (!freshRef.current) void qc.refetchQueries({ queryKey: sessionKeys.current() });
        void loadOutbox().then((outbox) => (why === 'timer' ? outbox.run() : outbox.retryNow()));
      });
    });
    return () => {
      live = false;
      stop?.();
    };
  }, [qc]);

  if (restoring) return <Loading />;
  if (!data) {
    const err = session.error;
    if (err instanceof ApiError && err.status === 401) return <Message text={t('session.redirecting')} />;
    if (session.isPending && session.fetchStatus === 'fetching') return <Loading />;
    return <Message text={t('session.needSignal')} />;
  }

  const { user } = data;
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="bg-loam text-mist-50">
        <div className="mx-auto flex max-w-2xl items-center justify-between gap-3 px-4 py-2">
          <div className="min-w-0">
            <p className="flex items-center gap-2 text-xl font-bold">
              <Mark className="size-8 shrink-0 text-straw" />
              {t('app.name')}
            </p>
            <p className="truncate">
              <span className="sr-only">{t('session.signedInAs')} </span>
              <span className="font-bold">{user.name}</span>
              <span className="text-loam-200"> · {user.organisation.name}</span>
            </p>
          </div>
          <SignOutButton />
        </div>
      </header>
      <QueueBanner />
      <main className="mx-auto w-full max-w-2xl flex-1 px-4 py-4">
        <ScreenBoundary>
          <Suspense fallback={<Loading />}>
            <Outlet />
          </Suspense>
        </ScreenBoundary>
      </main>
    </div>
  );
}

function Message({ text }: { text: string }) {
  return (
    <main className="mx-auto max-w-2xl px-4 py-10 text-center">
      <Mark className="mx-auto size-16 text-shoot" />
      <p role="status" className="mt-4 text-xl font-bold">
        {text}
      </p>
    </main>
  );
}

export function Loading() {
  const { t } = useTranslation();
  return (
    <p role="status" className="p-6 text-center text-lg text-loam-500">
      {t('app.loading')}
    </p>
  );
}
