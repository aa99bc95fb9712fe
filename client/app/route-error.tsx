import { Link, useRouteError } from 'react-router-dom';
import { ApiError } from '../lib/api';
import { strings } from '../lib/strings';

export function RouteError() {
  const error = useRouteError();
  // The api client is already sending the browser to the sign-in page.
  if (error instanceof ApiError && error.status === 401) {
    return (
      <p role="status" className="p-6 text-center text-loam-500">
        {strings.session.redirecting}
      </p>
    );
  }
  const message = error instanceof ApiError ? error.message : strings.errors.generic;
  return (
    <main className="mx-auto max-w-2xl px-4 py-8">
      <div role="alert" className="rounded-lg border-l-4 border-clay bg-clay-50 p-4 text-clay-800">
        <h1 className="text-xl font-bold">{strings.errors.title}</h1>
        <p className="mt-1">{message}</p>
      </div>
      <button
        type="button"
        onClick={() => window.location.reload()}
        className="mt-4 min-h-touch rounded-lg bg-shoot px-5 font-bold text-white hover:bg-shoot-800"
      >
        {strings.errors.retry}
      </button>
    </main>
  );
}

export function NotFound() {
  return (
    <div>
      <h1 className="text-2xl font-bold">{strings.errors.notFound}</h1>
      <Link
        to="/"
        className="mt-4 inline-flex min-h-touch items-center font-bold text-shoot underline underline-offset-4"
      >
        {strings.errors.backToToday}
      </Link>
    </div>
  );
}
