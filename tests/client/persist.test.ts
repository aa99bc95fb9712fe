import { describe, expect, it } from 'vitest';
import { dehydrate, hydrate, QueryClient } from '@tanstack/react-query';
import { ApiError } from '../../client/lib/api';
import { keptOnPhone, shouldPersist } from '../../client/lib/persist';

/**
 * What the phone keeps between page loads. Without signal every refetch fails; the last answer the
 * server gave must survive that, load after load, or the app locks the sampler out in the field.
 * Only the server saying "signed out" (401) may drop it.
 */

const session = { user: { id: 'u1', name: 'Sampler One' }, csrfToken: 't' };

async function clientWithFailedRefetch(error: Error): Promise<QueryClient> {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  qc.setQueryData(['session', 'current'], session);
  qc.setQueryData(['today', 'u1'], { items: [{ plantingId: 'p1' }], total: 1 });
  await qc
    .fetchQuery({ queryKey: ['session', 'current'], queryFn: () => Promise.reject(error), staleTime: 0 })
    .catch(() => undefined);
  await qc
    .fetchQuery({ queryKey: ['today', 'u1'], queryFn: () => Promise.reject(error), staleTime: 0 })
    .catch(() => undefined);
  return qc;
}

/** Save (as the persister does) then restore into a fresh client, as a page reload would. */
function reload(qc: QueryClient): QueryClient {
  const saved = JSON.parse(
    JSON.stringify(keptOnPhone({ timestamp: Date.now(), buster: 'x', clientState: dehydrate(qc, { shouldDehydrateQuery: shouldPersist }) })),
  );
  const next = new QueryClient();
  hydrate(next, saved.clientState);
  return next;
}

describe('the query cache kept on the phone', () => {
  it('keeps the last answers through any number of reloads without signal', async () => {
    let qc = await clientWithFailedRefetch(new ApiError(0, 'network', 'No signal'));
    expect(qc.getQueryState(['session', 'current'])?.status).toBe('error'); // the refetch did fail
    for (let n = 0; n < 5; n++) {
      qc = reload(qc);
      expect(qc.getQueryData(['session', 'current'])).toEqual(session);
      expect(qc.getQueryState(['session', 'current'])?.status).toBe('success');
      expect(qc.getQueryData(['today', 'u1'])).toEqual({ items: [{ plantingId: 'p1' }], total: 1 });
      // and the next load fails again
      await qc
        .fetchQuery({ queryKey: ['session', 'current'], queryFn: () => Promise.reject(new ApiError(0, 'network', '')), staleTime: 0, retry: false })
        .catch(() => undefined);
    }
  });

  it('keeps it through a server error too (the answer did not say the session is over)', async () => {
    const qc = reload(await clientWithFailedRefetch(new ApiError(503, 'http_503', 'Unavailable')));
    expect(qc.getQueryData(['session', 'current'])).toEqual(session);
  });

  it('drops the session once the server answers that it is over (401)', async () => {
    const qc = reload(await clientWithFailedRefetch(new ApiError(401, 'unauthenticated', 'Signed out')));
    expect(qc.getQueryData(['session', 'current'])).toBeUndefined();
    expect(qc.getQueryData(['today', 'u1'])).toBeUndefined();
  });

  it('keeps nothing outside the listed roots (walks in progress have their own store)', async () => {
    const qc = new QueryClient();
    qc.setQueryData(['drafts', 'u1'], [{ id: 'w1' }]);
    expect(reload(qc).getQueryData(['drafts', 'u1'])).toBeUndefined();
  });
});
