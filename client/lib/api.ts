import type { SessionResponse } from '../../shared/schemas/session';
import type { Parser } from './check';
import { errorAnswer, sessionAnswer, tokenAnswer } from './first-screen-answers';
import { i18n } from './i18n';

/**
 * The capture app's one way to the JSON API (API.md): same-origin cookie, JSON in and out,
 * the CSRF token on every mutating request, responses checked with the shared zod schemas (or,
 * for the first screen's answers, the light checks of first-screen-answers.ts, so zod stays off
 * it), and every failure turned into an ApiError with a stable `code`.
 */

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: Record<string, string>;

  constructor(status: number, code: string, message: string, fields: Record<string, string> = {}) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.fields = fields;
  }
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
const MUTATING = new Set<Method>(['POST', 'PUT', 'PATCH', 'DELETE']);
const SESSION_PATH = '/api/session';

export interface RequestOptions {
  /** JSON-serialisable body, or FormData (sent as multipart, e.g. photos). */
  body?: unknown;
  /** Set false where a 401 is an answer, not a lost session (e.g. signing out). */
  redirectOn401?: boolean;
  signal?: AbortSignal;
}

export interface ApiClientDeps {
  fetch?: typeof fetch;
  /** Full-page navigation (the sign-in page lives outside the capture app). */
  navigate?: (url: string) => void;
  /** Path + query to come back to after signing in. */
  currentPath?: () => string;
}

export type ApiClient = ReturnType<typeof createApiClient>;

export function createApiClient(deps: ApiClientDeps = {}) {
  const doFetch = deps.fetch ?? ((input, init) => globalThis.fetch(input, init));
  const navigate = deps.navigate ?? ((url: string) => window.location.assign(url));
  const currentPath = deps.currentPath ?? (() => window.location.pathname + window.location.search);

  let csrfToken: string | null = null;
  let tokenRequest: Promise<string> | null = null;
  let redirecting = false;

  function signInUrl(): string {
    return `/login?next=${encodeURIComponent(currentPath())}`;
  }

  function toSignIn(): void {
    // Several queries may fail together; send the browser away once.
    if (redirecting) return;
    redirecting = true;
    navigate(signInUrl());
  }

  async function send(method: Method, path: string, opts: RequestOptions, token: string | null): Promise<Response> {
    const headers: Record<string, string> = { Accept: 'application/json' };
    let body: BodyInit | undefined;
    if (opts.body instanceof FormData) {
      body = opts.body;
    } else if (opts.body !== undefined) {
      headers['Content-Type'] = 'application/json';
      body = JSON.stringify(opts.body);
    }
    if (token !== null) headers['X-CSRF-Token'] = token;
    try {
      return await doFetch(path, {
        method,
        headers,
        body,
        credentials: 'same-origin',
        cache: 'no-store',
        signal: opts.signal,
      });
    } catch (err) {
      if (err instanceof DOMException && err.name === 'AbortError') throw err;
      throw new ApiError(0, 'network', i18n.t('errors.network'));
    }
  }

  async function readJson(res: Response): Promise<unknown> {
    const text = await res.text();
    if (text === '') return undefined;
    try {
      return JSON.parse(text);
    } catch {
      return undefined;
    }
  }

  async function toApiError(res: Response): Promise<ApiError> {
    return errorFromBody(res.status, await readJson(res));
  }

  function parseBody<T>(schema: Parser<T>, status: number, json: unknown): T {
    const parsed = schema.safeParse(json);
    if (!parsed.success) {
      throw new ApiError(status, 'bad_response', i18n.t('errors.badResponse'));
    }
    return parsed.data;
  }

  /** `GET /api/session`: the user and a fresh CSRF token (kept for later mutations). */
  async function session(opts: Pick<RequestOptions, 'signal' | 'redirectOn401'> = {}): Promise<SessionResponse> {
    const data = await request('GET', SESSION_PATH, sessionAnswer, opts);
    csrfToken = data.csrfToken;
    return data;
  }

  /** The cached token, or one fetched once for all concurrent callers. Signed out still yields a token. */
  async function getCsrfToken(): Promise<string> {
    if (csrfToken !== null) return csrfToken;
    tokenRequest ??= (async () => {
      const res = await send('GET', SESSION_PATH, {}, null);
      const json = await readJson(res);
      const parsed = tokenAnswer.safeParse(json);
      if (!parsed.success) throw errorFromBody(res.status, json);
      csrfToken = parsed.data.csrfToken;
      return csrfToken;
    })().finally(() => {
      tokenRequest = null;
    });
    return tokenRequest;
  }

  async function request<T>(method: Method, path: string, schema: Parser<T>, opts: RequestOptions = {}): Promise<T> {
    try {
      return await attempt(method, path, schema, opts);
    } catch (err) {
      if (err instanceof ApiError && err.status === 401 && opts.redirectOn401 !== false) toSignIn();
      throw err;
    }
  }

  async function attempt<T>(method: Method, path: string, schema: Parser<T>, opts: RequestOptions): Promise<T> {
    const mutating = MUTATING.has(method);
    let res = await send(method, path, opts, mutating ? await getCsrfToken() : null);
    let error = res.ok ? null : await toApiError(res);

    // The token goes stale when the session is regenerated (sign-in elsewhere, expiry): refetch once.
    if (error && mutating && res.status === 403 && error.code === 'csrf') {
      csrfToken = null;
      res = await send(method, path, opts, await getCsrfToken());
      error = res.ok ? null : await toApiError(res);
    }

    if (error) throw error;
    return parseBody(schema, res.status, res.status === 204 ? undefined : await readJson(res));
  }

  return {
    request,
    session,
    get: <T>(path: string, schema: Parser<T>, opts?: Omit<RequestOptions, 'body'>) => request('GET', path, schema, opts),
    post: <T>(path: string, schema: Parser<T>, opts?: RequestOptions) => request('POST', path, schema, opts),
    put: <T>(path: string, schema: Parser<T>, opts?: RequestOptions) => request('PUT', path, schema, opts),
    patch: <T>(path: string, schema: Parser<T>, opts?: RequestOptions) => request('PATCH', path, schema, opts),
    delete: <T>(path: string, schema: Parser<T>, opts?: RequestOptions) => request('DELETE', path, schema, opts),
    /** Forget the token (after signing out or in). */
    resetCsrfToken: () => {
      csrfToken = null;
    },
    signInUrl,
  };
}

/** For 204 answers and any body the caller does not need. */
export const noContent: Parser<undefined> = { safeParse: () => ({ success: true, data: undefined }) };

function errorFromBody(status: number, json: unknown): ApiError {
  const parsed = errorAnswer.safeParse(json);
  if (!parsed.success) return new ApiError(status, `http_${status}`, defaultMessage(status));
  const { code, message, fields } = parsed.data.error;
  return new ApiError(status, code, message ?? defaultMessage(status), fields ?? {});
}

function defaultMessage(status: number): string {
  if (status >= 500) return i18n.t('errors.status500');
  if (status === 401) return i18n.t('errors.status401');
  if (status === 403) return i18n.t('errors.status403');
  if (status === 404) return i18n.t('errors.status404');
  if (status === 429) return i18n.t('errors.status429');
  return i18n.t('errors.generic');
}

export const api = createApiClient();
