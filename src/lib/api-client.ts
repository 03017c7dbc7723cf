/** The API's single error shape, thrown by every call that does not succeed. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
  /** Field errors of a 400 from zod validation, keyed by field path. */
  fieldErrors(): Record<string, string> {
    const out: Record<string, string> = {};
    if (Array.isArray(this.details)) {
      for (const d of this.details as { path?: string; message?: string }[]) if (d.path && d.message) out[d.path] ??= d.message;
    } else if (this.details && typeof this.details === 'object' && 'field' in this.details) {
      out[String((this.details as { field: string }).field)] = this.message;
    }
    return out;
  }
}

let csrfToken: string | null = null;
const sessionListeners = new Set<(code: string) => void>();

/** Called when the server says the session has ended (idle logoff) so the app can go to sign-in. */
export function onSessionEnded(fn: (code: string) => void): () => void {
  sessionListeners.add(fn);
  return () => sessionListeners.delete(fn);
}

async function fetchCsrf(): Promise<string> {
  const res = await fetch('/api/auth/csrf', { credentials: 'same-origin' });
  const body = (await res.json()) as { token: string };
  csrfToken = body.token;
  return csrfToken;
}

/** Forget the CSRF token (the session changed: sign-in, sign-out, hand-over). */
export const resetCsrf = () => {
  csrfToken = null;
};

export async function getCsrfToken(): Promise<string> {
  return csrfToken ?? fetchCsrf();
}

async function toError(res: Response): Promise<ApiError> {
  const body = (await res.json().catch(() => null)) as { error?: { code: string; message: string; details?: unknown } } | null;
  const e = body?.error;
  return new ApiError(res.status, e?.code ?? 'HTTP_' + res.status, e?.message ?? `The server answered ${res.status}.`, e?.details);
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  body?: unknown;
  signal?: AbortSignal;
  query?: Record<string, string | number | boolean | undefined | null>;
}

/** Request to the API (JSON, or multipart for a FormData body) with the CSRF header on state-changing calls (refetched once if stale). */
export async function api<T>(path: string, opts: RequestOptions = {}): Promise<T> {
  const method = opts.method ?? 'GET';
  const qs = opts.query
    ? new URLSearchParams(Object.entries(opts.query).filter(([, v]) => v !== undefined && v !== null && v !== '').map(([k, v]) => [k, String(v)])).toString()
    : '';
  const url = qs ? `${path}?${qs}` : path;
  const send = async (retry: boolean): Promise<T> => {
    const headers: Record<string, string> = { Accept: 'application/json' };
    // A FormData body is sent as multipart (the browser sets its boundary); anything else as JSON.
    const multipart = opts.body instanceof FormData;
    if (opts.body !== undefined && !multipart) headers['Content-Type'] = 'application/json';
    if (method !== 'GET') headers['X-CSRF-Token'] = await getCsrfToken();
    const res = await fetch(url, {
      method,
      headers,
      body: opts.body === undefined ? undefined : multipart ? (opts.body as FormData) : JSON.stringify(opts.body),
      signal: opts.signal,
      credentials: 'same-origin',
    });
    if (res.ok) return (res.status === 204 ? undefined : await res.json()) as T;
    const err = await toError(res);
    if (err.code === 'CSRF_INVALID' && retry) {
      resetCsrf();
      return send(false);
    }
    if (err.status === 401 && (err.code === 'SESSION_ENDED' || err.code === 'UNAUTHENTICATED')) {
      for (const fn of sessionListeners) fn(err.code);
    }
    throw err;
  };
  return send(true);
}
