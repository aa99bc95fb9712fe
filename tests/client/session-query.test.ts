import { describe, expect, it, vi } from 'vitest';
import { QueryClient, QueryObserver } from '@tanstack/react-query';
import { PAGE_LOADED_AT, sessionQuery } from '../../client/features/session/api';

/**
 * The session is asked for once per page load: screens and panels that mount after the shell (the
 * preferences panel, Today's parts) take the answer fetched on this page instead of sending
 * GET /api/session again over a slow link; a copy restored from the phone is still asked for again.
 */

const session = { user: { id: 'u1', name: 'Sampler One' }, csrfToken: 't' };

function mount(qc: QueryClient, queryFn: () => Promise<unknown>) {
  const observer = new QueryObserver(qc, { ...sessionQuery, queryFn } as never);
  const stop = observer.subscribe(() => undefined);
  return stop;
}

const settle = () => new Promise((r) => setTimeout(r, 0));

describe('GET /api/session on a page load', () => {
  it('is sent once for the shell and the screens mounting after it', async () => {
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    const queryFn = vi.fn(async () => session);
    mount(qc, queryFn); // the shell
    await settle();
    mount(qc, queryFn); // the preferences panel, a moment later
    mount(qc, queryFn); // Today's list
    await settle();
    expect(queryFn).toHaveBeenCalledTimes(1);
  });

  it('is sent again when the only copy is one restored from the phone (fetched before this page load)', async () => {
    const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
    qc.setQueryData(sessionQuery.queryKey, session as never, { updatedAt: PAGE_LOADED_AT - 1000 });
    const queryFn = vi.fn(async () => session);
    mount(qc, queryFn);
    await settle();
    expect(queryFn).toHaveBeenCalledTimes(1);
  });
});
