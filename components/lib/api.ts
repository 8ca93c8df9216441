import type { ApiErrorBody, ErrorCode } from '../../shared/api/contract';

// The API lives on the same origin as the web build; a dev server on another
// port can point elsewhere with EXPO_PUBLIC_API_URL.
export const API_BASE = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');

/** A failed API call as the app handles it: a stable code, a message for people, maybe a field. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode | 'NETWORK',
    message: string,
    readonly field?: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

// The session's CSRF token, set by the session hook once /api/auth/me answers.
let csrfToken: string | null = null;
export function setCsrfToken(token: string | null): void {
  csrfToken = token;
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
interface RequestOptions {
  method?: Method;
  body?: unknown;
  signal?: AbortSignal;
  as?: 'json' | 'bytes' | 'text';
}

async function toApiError(res: Response): Promise<ApiError> {
  const text = await res.text().catch(() => '');
  try {
    const body = JSON.parse(text) as ApiErrorBody;
    if (body?.error?.code) return new ApiError(res.status, body.error.code, body.error.message, body.error.field, body.error.details);
  } catch {
    // not JSON: fall through to a generic error below
  }
  return new ApiError(res.status, res.status >= 500 ? 'INTERNAL' : 'BAD_REQUEST', `The server answered ${res.status}${text ? `: ${text.slice(0, 200)}` : ''}`);
}

async function send(path: string, opts: RequestOptions): Promise<Response> {
  const method = opts.method ?? 'GET';
  const headers: Record<string, string> = { Accept: opts.as === 'bytes' ? 'application/octet-stream' : 'application/json' };
  // A FormData body (a file upload) sets its own multipart Content-Type with the boundary.
  const form = typeof FormData !== 'undefined' && opts.body instanceof FormData;
  if (opts.body !== undefined && !form) headers['Content-Type'] = 'application/json';
  if (method !== 'GET' && csrfToken) headers['X-CSRF-Token'] = csrfToken;
  try {
    return await fetch(`${API_BASE}${path}`, {
      method,
      headers,
      credentials: 'include',
      body: opts.body === undefined ? undefined : form ? (opts.body as FormData) : JSON.stringify(opts.body),
      signal: opts.signal,
    });
  } catch (e) {
    if ((e as Error)?.name === 'AbortError') throw e;
    throw new ApiError(0, 'NETWORK', 'Could not reach the Infall server. Check your connection and try again.');
  }
}

async function refreshCsrf(): Promise<boolean> {
  const res = await send('/api/auth/session', {});
  if (!res.ok) return false;
  const me = (await res.json()) as { csrfToken?: string };
  setCsrfToken(me.csrfToken ?? null);
  return Boolean(me.csrfToken);
}

/** Calls the API; resolves to the parsed body or throws an ApiError. */
export async function api<T>(path: string, opts: RequestOptions = {}): Promise<T> {
  let res = await send(path, opts);
  // A session that was renewed elsewhere has a new token: fetch it and try once more.
  if (res.status === 403 && (opts.method ?? 'GET') !== 'GET') {
    const err = await toApiError(res.clone());
    if (err.code === 'CSRF_REJECTED' && (await refreshCsrf())) res = await send(path, opts);
  }
  if (!res.ok) throw await toApiError(res);
  if (res.status === 204) return undefined as T;
  if (opts.as === 'bytes') return new Uint8Array(await res.arrayBuffer()) as T;
  if (opts.as === 'text') return (await res.text()) as T;
  return (await res.json()) as T;
}

/** Where the browser goes to sign in, coming back to `next` afterwards. */
export function signInUrl(next: string): string {
  return `${API_BASE}/api/auth/signin?next=${encodeURIComponent(next)}`;
}

export function queryString(params: Record<string, string | number | undefined | null>): string {
  const parts = Object.entries(params)
    .filter(([, v]) => v !== undefined && v !== null && v !== '')
    .map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(String(v))}`);
  return parts.length ? `?${parts.join('&')}` : '';
}
