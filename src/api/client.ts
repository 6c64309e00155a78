// A small fetch wrapper for the Tocsin API: JSON in and out, the CSRF token on every
// state-changing request, and the uniform error body `{error:{code,message,details}}`
// turned into a typed ApiError. TanStack Query hooks in this folder are its only callers.

export type ApiErrorBody = { error: { code: string; message: string; details?: unknown } };

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: unknown;

  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

function isErrorBody(value: unknown): value is ApiErrorBody {
  if (typeof value !== 'object' || value === null || !('error' in value)) return false;
  const e = (value as { error: unknown }).error;
  return typeof e === 'object' && e !== null && typeof (e as { message?: unknown }).message === 'string';
}

/** Field-level messages from a validation error, keyed by field name, when the server sends them. */
export function fieldErrors(error: unknown): Record<string, string> {
  if (!(error instanceof ApiError) || typeof error.details !== 'object' || error.details === null) return {};
  const out: Record<string, string> = {};
  const details = error.details as Record<string, unknown>;
  // A refusal about one field: { field: 'currentPassword' } carries the error's own message.
  if (typeof details.field === 'string') out[details.field] = error.message;
  // Tocsin's validation errors: { issues: [{ in, path: 'dotted.path', message }] } (shared/schemas/errors.ts).
  if (Array.isArray(details.issues)) {
    for (const issue of details.issues as Array<{ path?: unknown; message?: unknown }>) {
      const raw = Array.isArray(issue.path) ? issue.path[0] : issue.path;
      const key = typeof raw === 'string' || typeof raw === 'number' ? String(raw).split('.')[0] : '';
      if (key && typeof issue.message === 'string' && !out[key]) out[key] = issue.message;
    }
  }
  return out;
}

let csrfToken: string | null = null;
let csrfPending: Promise<string> | null = null;

/** Remember a token handed out by the server (sign-in and GET /api/session return one). */
export function setCsrfToken(token: string | null | undefined): void {
  if (token) csrfToken = token;
}

async function fetchCsrfToken(): Promise<string> {
  if (!csrfPending) {
    csrfPending = (async () => {
      const res = await fetch('/api/csrf', { credentials: 'same-origin', headers: { Accept: 'application/json' } });
      if (!res.ok) throw await toApiError(res);
      const body = (await res.json()) as { csrfToken: string };
      csrfToken = body.csrfToken;
      return body.csrfToken;
    })().finally(() => {
      csrfPending = null;
    });
  }
  return csrfPending;
}

async function toApiError(res: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    // Not JSON: fall through to a generic message.
  }
  if (isErrorBody(body)) return new ApiError(res.status, body.error.code, body.error.message, body.error.details);
  return new ApiError(res.status, 'http_' + res.status, `The server answered ${res.status} ${res.statusText}`.trim());
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

async function send(method: Method, path: string, body: unknown, token: string | null): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (body !== undefined) headers['Content-Type'] = 'application/json';
  if (token) headers['x-csrf-token'] = token;
  try {
    return await fetch(path, {
      method,
      headers,
      credentials: 'same-origin',
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    throw new ApiError(0, 'network', 'Tocsin could not reach the server. Check your connection and try again.');
  }
}

/**
 * Call the API. Non-GET requests carry the CSRF token; a single retry with a fresh token
 * covers the case where the server rotated it (for example after sign-in or sign-out).
 * Resolves with the parsed JSON body, or undefined for 204 No Content.
 */
export async function api<T>(method: Method, path: string, body?: unknown): Promise<T> {
  const needsCsrf = method !== 'GET';
  let token = needsCsrf ? (csrfToken ?? (await fetchCsrfToken())) : null;
  let res = await send(method, path, body, token);
  if (needsCsrf && res.status === 403) {
    const err = await toApiError(res.clone());
    if (err.code === 'csrf') {
      csrfToken = null;
      token = await fetchCsrfToken();
      res = await send(method, path, body, token);
    }
  }
  if (!res.ok) throw await toApiError(res);
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  return (text ? JSON.parse(text) : undefined) as T;
}

export const apiGet = <T>(path: string) => api<T>('GET', path);

/**
 * POST a multipart form (file uploads: the JSON wrapper above does not send FormData, and the API's JSON body limit
 * is lower than its file limits). A fresh CSRF token is fetched for each upload; the uniform error body becomes an
 * ApiError as in api(). Resolves with the parsed JSON body.
 */
export async function postForm<T>(path: string, form: FormData): Promise<T> {
  const { csrfToken: token } = await api<{ csrfToken: string }>('GET', '/api/csrf');
  setCsrfToken(token);
  let res: Response;
  try {
    res = await fetch(path, {
      method: 'POST',
      credentials: 'same-origin',
      headers: { Accept: 'application/json', 'x-csrf-token': token },
      body: form,
    });
  } catch {
    throw new ApiError(0, 'network', 'Tocsin could not reach the server. Check your connection and try again.');
  }
  const body = (await res.json().catch(() => null)) as { error?: { code: string; message: string; details?: unknown } } | null;
  if (!res.ok) {
    if (body?.error) throw new ApiError(res.status, body.error.code, body.error.message, body.error.details);
    throw new ApiError(res.status, `http_${res.status}`, `The server answered ${res.status}`);
  }
  return body as unknown as T;
}
