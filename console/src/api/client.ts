/**
 * Typed fetch wrapper for the console API (`/console-api`).
 *
 * - Same-origin credentials: the session lives in HTTP-only cookies set by the server.
 * - CSRF (double-submit cookie): mutating calls send `X-CSRF-Token` equal to the readable
 *   `ebullio_csrf` cookie; when there is no cookie yet it first calls `GET /console-api/auth/csrf`.
 *   A 403 `csrf-failed` answer fetches a fresh token and retries once.
 * - 401 on any call except the auth calls themselves: `POST /console-api/auth/refresh` once
 *   (shared by concurrent callers), then the call is retried; if the refresh fails the
 *   `onSessionExpired` hook runs and the original 401 is thrown.
 * - Errors: `application/problem+json` (RFC 9457) becomes an {@link ApiProblem}; any other failure
 *   becomes an ApiProblem with the HTTP status and a readable title.
 *
 * Request and response types come from the zod contracts in `shared/console/*` (`z.infer`), passed
 * as the type parameter of each call.
 */

export const API_BASE = '/console-api';
export const CSRF_COOKIE = 'ebullio_csrf';
export const CSRF_HEADER = 'X-CSRF-Token';

export interface ApiFieldError {
  field: string;
  message: string;
  value?: unknown;
  validRange?: { min: number; max: number; unit: string };
}

/** A problem-details error (RFC 9457) from the console API, or a transport failure shaped like one. */
export class ApiProblem extends Error {
  override readonly name = 'ApiProblem';
  readonly status: number;
  /** The problem type URI, e.g. `/problems/validation-failed`; `slug` is its last segment. */
  readonly type: string;
  readonly title: string;
  readonly detail: string | undefined;
  readonly errors: ApiFieldError[];
  readonly requestId: string | undefined;
  /** Extra members the server sent (e.g. `lockedUntil`). */
  readonly extra: Record<string, unknown>;

  constructor(init: {
    status: number;
    type?: string;
    title: string;
    detail?: string;
    errors?: ApiFieldError[];
    requestId?: string;
    extra?: Record<string, unknown>;
  }) {
    super(init.detail ?? init.title);
    this.status = init.status;
    this.type = init.type ?? 'about:blank';
    this.title = init.title;
    this.detail = init.detail;
    this.errors = init.errors ?? [];
    this.requestId = init.requestId;
    this.extra = init.extra ?? {};
  }

  get slug(): string {
    return this.type.split('/').pop() ?? this.type;
  }

  /** The first message for a field path (e.g. 'email'), for a v-text-field's error-messages. */
  fieldMessage(field: string): string | undefined {
    return this.errors.find((e) => e.field === field)?.message;
  }

  /** One line for a snackbar: detail if any, else the title. */
  get summary(): string {
    return this.detail ?? this.title;
  }
}

export function isApiProblem(err: unknown): err is ApiProblem {
  return err instanceof ApiProblem;
}

/** A failed call as a store keeps it: an ApiProblem as it is, anything else as "cannot reach the server". */
export function asProblem(err: unknown): ApiProblem {
  if (err instanceof ApiProblem) return err;
  return new ApiProblem({
    status: 0,
    title: 'The console cannot reach the server',
    detail: err instanceof Error ? err.message : String(err),
  });
}

/** A failed call as shown in a view's alert: an ApiProblem as it is, anything else titled with its text. */
export function asProblemTitledByError(err: unknown): ApiProblem {
  return err instanceof ApiProblem ? err : new ApiProblem({ status: 0, title: String(err) });
}

/** A readable message for any thrown value. */
export function errorMessage(err: unknown): string {
  if (err instanceof ApiProblem) return err.summary;
  if (err instanceof Error) return err.message;
  return String(err);
}

export type QueryValue = string | number | boolean | null | undefined | readonly (string | number)[];
export type Query = Record<string, QueryValue>;

export interface RequestOptions {
  query?: Query;
  /** JSON-serialisable body, or FormData for multipart uploads. */
  body?: unknown;
  headers?: Record<string, string>;
  signal?: AbortSignal;
  /** Internal: set on the retry after a refresh or a fresh CSRF token. */
  retried?: { refresh?: boolean; csrf?: boolean };
}

export interface ApiClientOptions {
  baseUrl?: string;
  fetch?: typeof fetch;
  /** Reads `document.cookie` by default; injectable for tests. */
  readCookie?: (name: string) => string | undefined;
  /** Called once when a 401 could not be cured by a refresh. */
  onSessionExpired?: () => void;
}

const MUTATING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);
/** Calls that must not trigger a refresh on 401 (they are the session's own calls). */
const NO_REFRESH = ['/auth/sign-in', '/auth/refresh', '/auth/sign-out', '/auth/csrf'];

export function readDocumentCookie(name: string): string | undefined {
  if (typeof document === 'undefined') return undefined;
  for (const part of document.cookie.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    if (part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return undefined;
}

export function buildQuery(query: Query | undefined): string {
  if (!query) return '';
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value === undefined || value === null || value === '') continue;
    if (Array.isArray(value)) for (const v of value) params.append(key, String(v));
    else params.append(key, String(value));
  }
  const text = params.toString();
  return text ? `?${text}` : '';
}

async function toProblem(res: Response): Promise<ApiProblem> {
  const type = res.headers.get('content-type') ?? '';
  if (type.includes('json')) {
    try {
      const body = (await res.json()) as Record<string, unknown>;
      const { type: t, title, status, detail, errors, requestId, instance: _instance, ...extra } = body;
      return new ApiProblem({
        status: typeof status === 'number' ? status : res.status,
        type: typeof t === 'string' ? t : undefined,
        title: typeof title === 'string' ? title : res.statusText || `HTTP ${res.status}`,
        detail: typeof detail === 'string' ? detail : undefined,
        errors: Array.isArray(errors) ? (errors as ApiFieldError[]) : undefined,
        requestId: typeof requestId === 'string' ? requestId : (res.headers.get('x-request-id') ?? undefined),
        extra,
      });
    } catch {
      // fall through to the generic problem
    }
  }
  return new ApiProblem({
    status: res.status,
    title: res.statusText || `HTTP ${res.status}`,
    detail: res.status === 503 ? 'The service is not available right now.' : undefined,
    requestId: res.headers.get('x-request-id') ?? undefined,
  });
}

export type ApiClient = ReturnType<typeof createApiClient>;

export function createApiClient(options: ApiClientOptions = {}) {
  const baseUrl = options.baseUrl ?? API_BASE;
  const doFetch = options.fetch ?? ((...args: Parameters<typeof fetch>) => globalThis.fetch(...args));
  const readCookie = options.readCookie ?? readDocumentCookie;
  let csrfToken: string | undefined;
  let refreshing: Promise<boolean> | undefined;

  async function fetchCsrfToken(): Promise<string> {
    const res = await doFetch(`${baseUrl}/auth/csrf`, {
      method: 'GET',
      credentials: 'same-origin',
      headers: { Accept: 'application/json' },
    });
    if (!res.ok) throw await toProblem(res);
    const body = (await res.json()) as { csrfToken?: string };
    // The cookie is the truth (double submit); the body's copy covers a cookie we cannot read.
    csrfToken = readCookie(CSRF_COOKIE) ?? body.csrfToken;
    if (!csrfToken) throw new ApiProblem({ status: 0, title: 'No CSRF token from the server' });
    return csrfToken;
  }

  async function ensureCsrf(): Promise<string> {
    return readCookie(CSRF_COOKIE) ?? csrfToken ?? fetchCsrfToken();
  }

  /** POST /auth/refresh once for everyone waiting; true when the session was renewed. */
  function refreshSession(): Promise<boolean> {
    refreshing ??= (async () => {
      try {
        const token = await ensureCsrf();
        const res = await doFetch(`${baseUrl}/auth/refresh`, {
          method: 'POST',
          credentials: 'same-origin',
          headers: { Accept: 'application/json', [CSRF_HEADER]: token },
        });
        return res.ok;
      } catch {
        return false;
      } finally {
        // let the next expiry start a new refresh
        setTimeout(() => (refreshing = undefined), 0);
      }
    })();
    return refreshing;
  }

  async function send(method: string, path: string, opts: RequestOptions = {}): Promise<Response> {
    const headers: Record<string, string> = { Accept: 'application/json', ...opts.headers };
    let body: BodyInit | undefined;
    if (opts.body instanceof FormData) body = opts.body;
    else if (opts.body !== undefined) {
      headers['Content-Type'] = 'application/json';
      body = JSON.stringify(opts.body);
    }
    if (MUTATING.has(method)) headers[CSRF_HEADER] = await ensureCsrf();
    const res = await doFetch(`${baseUrl}${path}${buildQuery(opts.query)}`, {
      method,
      credentials: 'same-origin',
      headers,
      body,
      signal: opts.signal,
    });
    if (res.ok) return res;

    const problem = await toProblem(res);
    const retried = opts.retried ?? {};
    if (problem.status === 403 && problem.slug === 'csrf-failed' && !retried.csrf) {
      csrfToken = undefined;
      await fetchCsrfToken();
      return send(method, path, { ...opts, retried: { ...retried, csrf: true } });
    }
    if (problem.status === 401 && !retried.refresh && !NO_REFRESH.some((p) => path.startsWith(p))) {
      if (await refreshSession())
        return send(method, path, { ...opts, retried: { ...retried, refresh: true } });
      options.onSessionExpired?.();
    }
    throw problem;
  }

  async function json<T>(method: string, path: string, opts?: RequestOptions): Promise<T> {
    const res = await send(method, path, opts);
    if (res.status === 204) return undefined as T;
    const text = await res.text();
    return (text ? JSON.parse(text) : undefined) as T;
  }

  return {
    get: <T>(path: string, opts?: Omit<RequestOptions, 'body'>) => json<T>('GET', path, opts),
    post: <T>(path: string, body?: unknown, opts?: RequestOptions) =>
      json<T>('POST', path, { ...opts, body }),
    put: <T>(path: string, body?: unknown, opts?: RequestOptions) => json<T>('PUT', path, { ...opts, body }),
    patch: <T>(path: string, body?: unknown, opts?: RequestOptions) =>
      json<T>('PATCH', path, { ...opts, body }),
    delete: <T>(path: string, opts?: RequestOptions) => json<T>('DELETE', path, opts),
    /** A non-JSON GET (CSV exports): the body as a Blob plus the server's file name. */
    async download(path: string, query?: Query): Promise<{ blob: Blob; fileName: string | undefined }> {
      const res = await send('GET', path, { query, headers: { Accept: 'text/csv, */*' } });
      const disposition = res.headers.get('content-disposition') ?? '';
      const fileName = /filename="?([^";]+)"?/.exec(disposition)?.[1];
      return { blob: await res.blob(), fileName };
    },
    /** The URL of a GET for links (e.g. `<a :href>` to a CSV export). */
    url: (path: string, query?: Query) => `${baseUrl}${path}${buildQuery(query)}`,
    refreshSession,
    fetchCsrfToken,
    /** Replaces the hook called when a session cannot be renewed. */
    setSessionExpiredHandler(handler: () => void) {
      options.onSessionExpired = handler;
    },
  };
}

/** The app's client. */
export const api = createApiClient();
