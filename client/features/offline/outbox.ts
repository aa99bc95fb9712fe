import { del, delMany, get, set, values } from 'idb-keyval';
import { api } from '../../lib/api';
import type { Parser } from '../../lib/check';
import { photoStore, queueStore } from '../../lib/storage';
import { createQueue, type QueueJob, type QueueStorage, type QueueTransport } from './queue';

/**
 * The outbox in the browser: jobs in IndexedDB, sent through the API client, retried when the
 * signal returns. Loaded after the first screen has drawn (features/offline/public.ts) and by the
 * screens that send.
 */

const storage: QueueStorage = {
  all: () => values<QueueJob>(queueStore()),
  put: (job) => set(job.id, job, queueStore()),
  remove: (id) => del(id, queueStore()),
};

// Any answer will do: the outbox only needs to know a step went through (zod stays off the first
// visit, which loads this file).
const anything: Parser<unknown> = { safeParse: (data) => ({ success: true, data }) };
// Background sending must not throw the sampler onto the sign-in page mid-walk: a 401 parks the
// job and the banner offers the sign-in link instead.
const quiet = { redirectOn401: false } as const;

const transport: QueueTransport = {
  createWalk: (body) => api.post('/api/walks', anything, { ...quiet, body }),
  async uploadPhoto(walkId, photo) {
    const blob = await get<Blob>(photo.key, photoStore());
    if (!blob) return; // nothing left to send for this stop
    const form = new FormData();
    form.append('stop', String(photo.stop)); // before the file, so the server has it when the file arrives
    form.append('photo', blob, `stop-${photo.stop}.${blob.type === 'image/png' ? 'png' : 'jpg'}`);
    return api.post(`/api/walks/${encodeURIComponent(walkId)}/photos`, anything, { ...quiet, body: form });
  },
  submitWalk: (walkId) => api.post(`/api/walks/${encodeURIComponent(walkId)}/submit`, anything, quiet),
  proposeBoundary: (fieldId, body) => api.post(`/api/fields/${encodeURIComponent(fieldId)}/boundary-proposals`, anything, { ...quiet, body }),
  cleanUp: (job) => delMany(job.photos.map((p) => p.key), photoStore()),
};

// Tried again when the signal may be back: see features/offline/resend.ts, started by the shell.
export const outbox = createQueue({ storage, transport });

export { newJob } from './queue';
