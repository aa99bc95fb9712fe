import { Outlet } from 'react-router-dom';
import { useSuspenseQuery } from '@tanstack/react-query';
import { sessionQuery } from '../features/session/api';
import { SignOutButton } from '../features/session/components/sign-out-button';
import { strings } from '../lib/strings';
import { Mark } from './mark';

/** Every signed-in /capture screen: the header with who is sampling, then the screen. */
export function Shell() {
  const { data } = useSuspenseQuery(sessionQuery);
  const { user } = data;
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="bg-loam text-mist-50">
        <div className="mx-auto flex max-w-2xl items-start justify-between gap-3 px-4 py-3">
          <div className="min-w-0">
            <p className="flex items-center gap-2 text-xl font-bold">
              <Mark className="size-9 shrink-0 text-straw" />
              {strings.appName}
            </p>
            <p className="mt-1 truncate font-bold">
              <span className="sr-only">{strings.session.signedInAs} </span>
              {user.name}
            </p>
            <p className="truncate text-loam-200">{user.organisation.name}</p>
          </div>
          <SignOutButton />
        </div>
      </header>
      <main className="mx-auto w-full max-w-2xl flex-1 px-4 py-5">
        <Outlet />
      </main>
    </div>
  );
}

export function Loading() {
  return (
    <p role="status" className="p-6 text-center text-loam-500">
      {strings.loading}
    </p>
  );
}
