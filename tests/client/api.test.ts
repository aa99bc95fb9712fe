import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { ApiError, createApiClient, noContent } from '../../client/lib/api';
import { signOut } from '../../client/features/session/api';
import { at, only } from '../helpers/lists';

type Reply = { status: number; body?: unknown; raw?: string };
interface Call {
  method: string;
  url: string;
  headers: Record<string, string>;
  body: unknown;
  credentials: RequestCredentials | undefined;
}

const user = {
  id: 'u1',
  name: 'Rosa Quintero',
  email: 'rosa@example.test',
  role: 'sampler',
  organisation: { id: 'o1', name: 'Arroyo Seco Growers' },
  units: 'us',
  language: 'en',
};

/** A fake fetch answering from a per-"METHOD path" queue; the last reply of a queue repeats. */
function fakeServer(routes: Record<string, Reply[]>) {
  const calls: Call[] = [];
  const fetch = vi.fn(async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const method = init.method ?? 'GET';
    const url = String(input);
    const headers = { ...(init.headers as Record<string, string>) };
    calls.push({
      method,
      url,
      headers,
      body: typeof init.body === 'string' ? JSON.parse(init.body) : init.body,
      credentials: init.credentials,
    });
    const queue = routes[`${method} ${url}`];
    if (!queue) throw new Error(`unexpected ${method} ${url}`);
    const reply = queue.length > 1 ? queue.shift() : queue[0];
    if (!reply) throw new Error(`no reply given for ${method} ${url}`);
    const text = reply.raw ?? (reply.body === undefined ? null : JSON.stringify(reply.body));
    return new Response(reply.status === 204 ? null : text, {
      status: reply.status,
      headers: { 'Content-Type': reply.raw ? 'text/html' : 'application/json' },
    });
  });
  const navigate = vi.fn<(url: string) => void>();
  const client = createApiClient({
    fetch: fetch as unknown as typeof globalThis.fetch,
    navigate,
    currentPath: () => '/capture/walks/w-1?stop=3',
  });
  const count = (method: string, url: string) => calls.filter((c) => c.method === method && c.url === url).length;
  return { client, calls, navigate, count };
}

const session = (token: string): Reply => ({ status: 200, body: { user, csrfToken: token } });
const okSchema = z.object({ ok: z.boolean() });

describe('api client: requests', () => {
  it('sends GETs same-origin, as JSON, without a CSRF token, and parses the answer', async () => {
    const s = fakeServer({ 'GET /api/things': [{ status: 200, body: { ok: true } }] });
    await expect(s.client.get('/api/things', okSchema)).resolves.toEqual({ ok: true });
    const call = only(s.calls, 'request');
    expect(call.credentials).toBe('same-origin');
    expect(call.headers.Accept).toBe('application/json');
    expect(call.headers['X-CSRF-Token']).toBeUndefined();
  });

  it('turns an answer that does not match the schema into ApiError bad_response', async () => {
    const s = fakeServer({ 'GET /api/things': [{ status: 200, body: { ok: 'yes' } }] });
    const err = await s.client.get('/api/things', okSchema).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({ status: 200, code: 'bad_response' });
  });

  it('returns undefined for 204 with noContent', async () => {
    const s = fakeServer({ 'GET /api/session': [session('t1')], 'DELETE /api/things/1': [{ status: 204 }] });
    await expect(s.client.delete('/api/things/1', noContent)).resolves.toBeUndefined();
  });
});

describe('api client: CSRF', () => {
  it('fetches the token from GET /api/session and sends it on POST with a JSON body', async () => {
    const s = fakeServer({ 'GET /api/session': [session('tok-1')], 'POST /api/walks': [{ status: 201, body: { ok: true } }] });
    await s.client.post('/api/walks', okSchema, { body: { plantingId: 'p1' } });
    const post = s.calls.find((c) => c.method === 'POST')!;
    expect(post.headers['X-CSRF-Token']).toBe('tok-1');
    expect(post.headers['Content-Type']).toBe('application/json');
    expect(post.body).toEqual({ plantingId: 'p1' });
    expect(post.credentials).toBe('same-origin');
  });

  it('sends the token on PUT, PATCH and DELETE too', async () => {
    const s = fakeServer({
      'GET /api/session': [session('tok-1')],
      'PUT /api/x': [{ status: 200, body: { ok: true } }],
      'PATCH /api/x': [{ status: 200, body: { ok: true } }],
      'DELETE /api/x': [{ status: 204 }],
    });
    await s.client.put('/api/x', okSchema, { body: {} });
    await s.client.patch('/api/x', okSchema, { body: {} });
    await s.client.delete('/api/x', noContent);
    for (const m of ['PUT', 'PATCH', 'DELETE']) {
      expect(s.calls.find((c) => c.method === m)!.headers['X-CSRF-Token']).toBe('tok-1');
    }
  });

  it('caches the token: one session fetch for many mutations, even concurrent ones', async () => {
    const s = fakeServer({ 'GET /api/session': [session('tok-1')], 'POST /api/x': [{ status: 200, body: { ok: true } }] });
    await Promise.all([
      s.client.post('/api/x', okSchema, { body: {} }),
      s.client.post('/api/x', okSchema, { body: {} }),
    ]);
    await s.client.post('/api/x', okSchema, { body: {} });
    expect(s.count('GET', '/api/session')).toBe(1);
    expect(s.count('POST', '/api/x')).toBe(3);
  });

  it('keeps the token from session() so the next mutation needs no extra fetch', async () => {
    const s = fakeServer({ 'GET /api/session': [session('tok-s')], 'POST /api/x': [{ status: 200, body: { ok: true } }] });
    const me = await s.client.session();
    expect(me.user.name).toBe('Rosa Quintero');
    await s.client.post('/api/x', okSchema, { body: {} });
    expect(s.count('GET', '/api/session')).toBe(1);
    expect(at(s.calls, 1, 'request').headers['X-CSRF-Token']).toBe('tok-s');
  });

  it('on 403 csrf refetches the token once and retries with the new one', async () => {
    const s = fakeServer({
      'GET /api/session': [session('old'), session('new')],
      'POST /api/x': [
        { status: 403, body: { error: { code: 'csrf', message: 'Stale form token.' } } },
        { status: 200, body: { ok: true } },
      ],
    });
    await expect(s.client.post('/api/x', okSchema, { body: { a: 1 } })).resolves.toEqual({ ok: true });
    const posts = s.calls.filter((c) => c.method === 'POST');
    expect(posts.map((p) => p.headers['X-CSRF-Token'])).toEqual(['old', 'new']);
    expect(at(posts, 1, 'POST').body).toEqual({ a: 1 });
    expect(s.count('GET', '/api/session')).toBe(2);
  });

  it('retries a csrf failure only once, then throws ApiError csrf', async () => {
    const s = fakeServer({
      'GET /api/session': [session('a'), session('b'), session('c')],
      'POST /api/x': [{ status: 403, body: { error: { code: 'csrf', message: 'Stale form token.' } } }],
    });
    const err = await s.client.post('/api/x', okSchema, { body: {} }).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 403, code: 'csrf' });
    expect(s.count('POST', '/api/x')).toBe(2);
    expect(s.count('GET', '/api/session')).toBe(2);
  });

  it('does not retry a 403 forbidden', async () => {
    const s = fakeServer({
      'GET /api/session': [session('a')],
      'POST /api/x': [{ status: 403, body: { error: { code: 'forbidden', message: 'Clerks only.' } } }],
    });
    const err = await s.client.post('/api/x', okSchema, { body: {} }).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 403, code: 'forbidden', message: 'Clerks only.' });
    expect(s.count('POST', '/api/x')).toBe(1);
  });

  it('gets a token while signed out from the 401 body of GET /api/session', async () => {
    const s = fakeServer({
      'GET /api/session': [{ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in.' }, csrfToken: 'anon' } }],
      'POST /api/x': [{ status: 200, body: { ok: true } }],
    });
    await s.client.post('/api/x', okSchema, { body: {} });
    expect(at(s.calls, 1, 'request').headers['X-CSRF-Token']).toBe('anon');
    expect(s.navigate).not.toHaveBeenCalled();
  });
});

describe('api client: errors and 401', () => {
  it('on 401 sends the browser to /login with the current path, once, and throws', async () => {
    const s = fakeServer({
      'GET /api/walks': [{ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in.' }, csrfToken: 't' } }],
    });
    const results = await Promise.allSettled([s.client.get('/api/walks', okSchema), s.client.get('/api/walks', okSchema)]);
    expect(results.every((r) => r.status === 'rejected' && r.reason instanceof ApiError && r.reason.status === 401)).toBe(true);
    expect(s.navigate).toHaveBeenCalledTimes(1);
    expect(s.navigate).toHaveBeenCalledWith('/login?next=%2Fcapture%2Fwalks%2Fw-1%3Fstop%3D3');
  });

  it('redirects on a 401 from a mutation too', async () => {
    const s = fakeServer({
      'GET /api/session': [session('t')],
      'POST /api/x': [{ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in.' } } }],
    });
    await expect(s.client.post('/api/x', okSchema, { body: {} })).rejects.toMatchObject({ status: 401 });
    expect(s.navigate).toHaveBeenCalledTimes(1);
  });

  it('leaves the page alone on 401 when redirectOn401 is false', async () => {
    const s = fakeServer({ 'GET /api/x': [{ status: 401, body: { error: { code: 'unauthenticated', message: 'x' } } }] });
    await expect(s.client.get('/api/x', okSchema, { redirectOn401: false })).rejects.toMatchObject({ code: 'unauthenticated' });
    expect(s.navigate).not.toHaveBeenCalled();
  });

  it('turns an error body into ApiError with status, code, message and fields', async () => {
    const s = fakeServer({
      'GET /api/session': [session('t')],
      'POST /api/ranches': [
        {
          status: 400,
          body: { error: { code: 'invalid', message: 'Check the form.', fields: { name: 'Give the ranch a name.' } } },
        },
      ],
    });
    const err = await s.client.post('/api/ranches', okSchema, { body: { name: '' } }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({
      status: 400,
      code: 'invalid',
      message: 'Check the form.',
      fields: { name: 'Give the ranch a name.' },
    });
  });

  it('gives fields {} when the body has none, and a message when the body has none', async () => {
    const s = fakeServer({ 'GET /api/x/9': [{ status: 404, body: { error: { code: 'not_found' } } }] });
    const err = (await s.client.get('/api/x/9', okSchema).catch((e: unknown) => e)) as ApiError;
    expect(err.code).toBe('not_found');
    expect(err.fields).toEqual({});
    expect(err.message.length).toBeGreaterThan(0);
  });

  it('answers a non-JSON failure (a proxy page) with http_<status>', async () => {
    const s = fakeServer({ 'GET /api/x': [{ status: 502, raw: '<html>Bad gateway</html>' }] });
    await expect(s.client.get('/api/x', okSchema)).rejects.toMatchObject({ status: 502, code: 'http_502' });
  });

  it('answers a failed connection with ApiError 0 network', async () => {
    const navigate = vi.fn();
    const client = createApiClient({
      fetch: (async () => {
        throw new TypeError('fetch failed');
      }) as unknown as typeof fetch,
      navigate,
      currentPath: () => '/capture',
    });
    await expect(client.get('/api/x', okSchema)).rejects.toMatchObject({ status: 0, code: 'network' });
    expect(navigate).not.toHaveBeenCalled();
  });
});

describe('signOut', () => {
  it('sends DELETE /api/session with the token, then goes to /login', async () => {
    const s = fakeServer({ 'GET /api/session': [session('t')], 'DELETE /api/session': [{ status: 204 }] });
    const go = vi.fn();
    await signOut(s.client, go);
    expect(s.calls.find((c) => c.method === 'DELETE')!.headers['X-CSRF-Token']).toBe('t');
    expect(go).toHaveBeenCalledWith('/login');
    expect(s.navigate).not.toHaveBeenCalled();
  });

  it('treats 401 as already signed out', async () => {
    const s = fakeServer({
      'GET /api/session': [session('t')],
      'DELETE /api/session': [{ status: 401, body: { error: { code: 'unauthenticated', message: 'x' } } }],
    });
    const go = vi.fn();
    await signOut(s.client, go);
    expect(go).toHaveBeenCalledWith('/login');
    expect(s.navigate).not.toHaveBeenCalled();
  });

  it('stays on the page when the server fails', async () => {
    const s = fakeServer({ 'GET /api/session': [session('t')], 'DELETE /api/session': [{ status: 500, raw: 'oops' }] });
    const go = vi.fn();
    await expect(signOut(s.client, go)).rejects.toMatchObject({ status: 500 });
    expect(go).not.toHaveBeenCalled();
  });
});
