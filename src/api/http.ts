import type { ApiErrorBody, CsrfToken } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';

/** An error answer from the API, with the server's code and plain message. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

type QueryValue = string | number | boolean | undefined | null;

export interface RequestOptions {
  query?: Record<string, QueryValue>;
  body?: unknown;
}

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

let csrfToken: Promise<string> | null = null;
let onSignedOut: (() => void) | null = null;

/** Called once by the session store: what to do when the server says the session is gone. */
export function handleSignedOut(callback: () => void): void {
  onSignedOut = callback;
}

/** The CSRF token is bound to the session, so it is fetched again whenever the session changes. */
export function forgetCsrfToken(): void {
  csrfToken = null;
}

export function fetchCsrfToken(): Promise<string> {
  csrfToken ??= fetch('/api/auth/csrf', { credentials: 'same-origin' })
    .then((response) => response.json() as Promise<CsrfToken>)
    .then((body) => body.token)
    .catch((error: unknown) => {
      csrfToken = null;
      throw error;
    });
  return csrfToken;
}

function buildUrl(path: string, query?: Record<string, QueryValue>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query ?? {})) {
    if (value !== undefined && value !== null && value !== '') params.set(key, String(value));
  }
  const search = params.toString();
  return `/api${path}${search ? `?${search}` : ''}`;
}

/** An error answer's body as an ApiError; `body` is the parsed JSON when the caller already read it. */
export function apiErrorFrom(status: number, statusText: string, body: ApiErrorBody | null): ApiError {
  const message = body?.error?.message ?? `The server answered ${status} ${statusText}.`;
  return new ApiError(status, body?.error?.code ?? 'http_error', message, body?.error?.details);
}

async function toApiError(response: Response): Promise<ApiError> {
  const body = (await response.json().catch(() => null)) as ApiErrorBody | null;
  return apiErrorFrom(response.status, response.statusText, body);
}

/** The one HTTP client of the app: JSON in and out, CSRF header on writes, one retry on a stale token. */
export async function request<T>(method: string, path: string, options: RequestOptions = {}): Promise<T> {
  const send = async () => {
    const headers: Record<string, string> = { Accept: 'application/json' };
    if (options.body !== undefined) headers['Content-Type'] = 'application/json';
    if (STATE_CHANGING.has(method)) headers['x-csrf-token'] = await fetchCsrfToken();
    return fetch(buildUrl(path, options.query), {
      method,
      headers,
      credentials: 'same-origin',
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
    });
  };
  let response = await send();
  let error = response.ok ? null : await toApiError(response);
  if (error?.code === 'csrf_invalid') {
    forgetCsrfToken();
    response = await send();
    error = response.ok ? null : await toApiError(response);
  }
  if (error) {
    if (error.status === HttpStatus.UNAUTHORIZED && error.code === 'sign_in_required') onSignedOut?.();
    throw error;
  }
  if (response.status === HttpStatus.NO_CONTENT) return undefined as T;
  return (await response.json()) as T;
}

export const http = {
  get: <T>(path: string, query?: RequestOptions['query']) => request<T>('GET', path, { query }),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, { body }),
  put: <T>(path: string, body?: unknown) => request<T>('PUT', path, { body }),
  patch: <T>(path: string, body?: unknown) => request<T>('PATCH', path, { body }),
  delete: <T>(path: string) => request<T>('DELETE', path),
};
