import { Component, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { i18n, useTranslation } from '../lib/i18n';

/**
 * Catches a screen that failed to render or to load its code (a lazy chunk fetched with no signal
 * and no service worker yet). Walks in progress are in IndexedDB, so a reload loses nothing.
 */
export class ScreenBoundary extends Component<{ children: ReactNode }, { error: unknown }> {
  override state = { error: null as unknown };

  static getDerivedStateFromError(error: unknown) {
    return { error };
  }

  override render() {
    if (this.state.error === null) return this.props.children;
    const message = this.state.error instanceof Error && this.state.error.name === 'ApiError' ? this.state.error.message : null;
    return (
      <div>
        <div role="alert" className="rounded-lg border-l-4 border-clay bg-clay-50 p-4 text-clay-800">
          <h1 className="text-xl font-bold">{i18n.t('errors.title')}</h1>
          <p className="mt-1">{message ?? i18n.t('errors.screenFailed')}</p>
        </div>
        <button
          type="button"
          onClick={() => window.location.reload()}
          className="mt-4 min-h-touch rounded-lg bg-shoot px-5 text-lg font-bold text-white hover:bg-shoot-800"
        >
          {i18n.t('errors.retry')}
        </button>
      </div>
    );
  }
}

export function NotFound() {
  const { t } = useTranslation();
  return (
    <div>
      <h1 className="text-2xl font-bold">{t('errors.notFound')}</h1>
      <Link to="/" className="mt-4 inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4">
        {t('errors.backToToday')}
      </Link>
    </div>
  );
}
