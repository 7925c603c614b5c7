// The one HTTP client for the server's routes: JSON in and out, CSRF token on writes, typed errors with per-field messages.
import type { ApiErrorBody } from '@shared/auth';

export class ApiError extends Error {
  constructor(readonly status: number, readonly body: ApiErrorBody) {
    super(body.message);
  }
  get fields(): Record<string, string[]> {
    return this.body.fields ?? {};
  }
}

let csrfToken: string | null = null;

async function fetchCsrfToken(): Promise<string> {
  const res = await fetch('/api/csrf', { credentials: 'same-origin' });
  const body = (await res.json()) as { token: string };
  csrfToken = body.token;
  return csrfToken;
}

/** Forget the token (after sign-in/out the session, and so the token, changes). */
export function resetCsrf(): void {
  csrfToken = null;
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

async function request<T>(method: Method, path: string, body?: unknown, retried = false): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  let payload: BodyInit | undefined;
  if (body instanceof FormData) payload = body;
  else if (body !== undefined) {
    headers['Content-Type'] = 'application/json';
    payload = JSON.stringify(body);
  }
  if (method !== 'GET') headers['X-CSRF-Token'] = csrfToken ?? (await fetchCsrfToken());
  const res = await fetch(path, { method, headers, body: payload, credentials: 'same-origin' });
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  const data = text ? safeJson(text) : undefined;
  if (!res.ok) {
    const error = (data as { error?: ApiErrorBody } | undefined)?.error ?? { code: 'http_' + res.status, message: res.statusText || 'Request failed.' };
    // A stale CSRF token (session changed in another tab): fetch a new one and try once more.
    if (res.status === 403 && error.code === 'csrf' && !retried) {
      resetCsrf();
      return request<T>(method, path, body, true);
    }
    throw new ApiError(res.status, error);
  }
  return data as T;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return { error: { code: 'bad_response', message: 'The server sent an unreadable answer.' } };
  }
}

export const api = {
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  put: <T>(path: string, body?: unknown) => request<T>('PUT', path, body ?? {}),
  patch: <T>(path: string, body?: unknown) => request<T>('PATCH', path, body ?? {}),
  delete: <T>(path: string) => request<T>('DELETE', path),
  /** The current CSRF token, for uploads done outside this client (e.g. Element Plus upload headers). */
  csrf: async () => csrfToken ?? fetchCsrfToken(),
};

/** Builds a query string from defined values only. */
export function query(params: Record<string, string | number | boolean | undefined | null>): string {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) if (value !== undefined && value !== null && value !== '') search.set(key, String(value));
  const text = search.toString();
  return text ? `?${text}` : '';
}
