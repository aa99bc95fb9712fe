import { queryOptions, useQuery, useQueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import type { SessionResponse } from '../../../shared/schemas/session';
import { api, ApiError, noContent, type ApiClient } from '../../lib/api';
import { sessionAnswer } from '../../lib/first-screen-answers';
import { makeFormatter, type UnitLabels, type Units } from '../../lib/format';
import { currentLanguage, setLanguage, type Language, useTranslation } from '../../lib/i18n';
import { clearPersistedCache } from '../../lib/persist';
import { useAction } from '../../lib/use-action';

export const sessionKeys = {
  all: ['session'] as const,
  current: () => [...sessionKeys.all, 'current'] as const,
};

/** When this page was loaded: session data fetched after it is known to match the cookie. */
export const PAGE_LOADED_AT = Date.now();

/**
 * One options object for the shell, the hooks and invalidation. Kept on the phone (query
 * persistence) so the app opens offline; refetched on every start when there is signal. A screen
 * or panel mounting later takes the answer already fetched on this page load rather than asking
 * the server again over a slow link; a copy restored from the phone is still asked for again.
 */
export const sessionQuery = queryOptions({
  queryKey: sessionKeys.current(),
  queryFn: ({ signal }) => api.session({ signal }),
  staleTime: 0,
  refetchOnMount: (query) => query.state.dataUpdatedAt < PAGE_LOADED_AT,
  networkMode: 'offlineFirst',
});

export function useSession() {
  return useQuery(sessionQuery);
}

/** The signed-in user; only for components rendered inside the shell (which waits for it). */
export function useUser() {
  const { data } = useSession();
  if (!data) throw new Error('useUser outside the signed-in shell');
  return data.user;
}

export function useUnits(): Units {
  return useSession().data?.user.units ?? 'us';
}

/** Formats numbers, lengths, masses and dates for the chosen language and the user's units. */
export function useFormat() {
  const { t, i18n } = useTranslation();
  const units = useUnits();
  const lang = i18n.language === 'es' ? 'es' : 'en';
  return useMemo(() => makeFormatter(lang, units, t('units', { returnObjects: true }) as UnitLabels), [lang, units, t]);
}

/**
 * Language and units are saved per user (PATCH /api/session). The change applies at once on the
 * phone; without signal it is kept here and sent when the signal returns.
 */
export interface Preferences {
  language?: Language;
  units?: Units;
}

const PENDING_KEY = 'crowntip.pendingPreferences';

function readPending(): Preferences | null {
  try {
    const raw = localStorage.getItem(PENDING_KEY);
    return raw ? (JSON.parse(raw) as Preferences) : null;
  } catch {
    return null;
  }
}

function writePending(p: Preferences | null) {
  try {
    if (p) localStorage.setItem(PENDING_KEY, JSON.stringify(p));
    else localStorage.removeItem(PENDING_KEY);
  } catch {
    // nothing to do: the change still applies on this page
  }
}

export function pendingPreferences(): Preferences | null {
  return readPending();
}

export async function sendPreferences(prefs: Preferences, client: ApiClient = api): Promise<SessionResponse> {
  const res = await client.patch('/api/session', sessionAnswer, { body: prefs });
  writePending(null);
  return res;
}

export function usePreferences() {
  const qc = useQueryClient();
  return useAction(async (prefs: Preferences) => {
    if (prefs.language) await setLanguage(prefs.language);
    qc.setQueryData(sessionKeys.current(), (old: SessionResponse | undefined) =>
      old ? { ...old, user: { ...old.user, ...prefs } } : old,
    );
    writePending({ ...readPending(), ...prefs });
    try {
      const saved = await sendPreferences({ ...readPending() });
      qc.setQueryData(sessionKeys.current(), saved);
      return saved;
    } catch (err) {
      if (err instanceof ApiError && err.status === 0) return null; // kept for later
      throw err;
    }
  });
}

/**
 * After a fresh session arrives: send a change made offline, or else take the user's saved
 * language (set in the office's Account page, or on another phone).
 */
export async function reconcilePreferences(session: SessionResponse): Promise<SessionResponse | null> {
  const pending = readPending();
  if (pending && Object.keys(pending).length > 0) {
    try {
      return await sendPreferences(pending);
    } catch {
      return null;
    }
  }
  if (session.user.language !== currentLanguage()) await setLanguage(session.user.language);
  return null;
}

/**
 * `DELETE /api/session`, then the office sign-in page. A 401 means already signed out, so it
 * counts as done; any other failure (offline, server error) stays here for the button to show.
 * The full-page load drops the in-memory cache.
 */
export async function signOut(client: ApiClient = api, navigate = (url: string) => window.location.assign(url)) {
  try {
    await client.delete('/api/session', noContent, { redirectOn401: false });
  } catch (err) {
    if (!(err instanceof ApiError && err.status === 401)) throw err;
  }
  client.resetCsrfToken();
  navigate('/login');
}

export function useSignOut() {
  // Today's list and the session must not greet the next person on this phone, so the copy kept
  // on the phone is dropped once signed out. Walks in progress and unsent walks stay: they
  // belong to their sampler and wait for them.
  return useAction(() => signOut(api, (url) => void clearPersistedCache().finally(() => window.location.assign(url))));
}
