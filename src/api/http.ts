/**
 * The one place the client talks HTTP. Every resource module in src/api/ calls `request` and
 * gets back the typed body or an ApiError carrying the server's {error:{code,message,field?}}.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly field?: string,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

/**
 * Called when the server says the session is gone (401) on any call but the sign-in itself; main.ts
 * sets it to send the user to the sign-in page, so this module stays free of router and stores.
 */
let unauthorizedHandler: ((err: ApiError) => void) | null = null;
export function onUnauthorized(handler: ((err: ApiError) => void) | null): void {
  unauthorizedHandler = handler;
}
const SIGN_IN_PATH = '/api/auth/sign-in';

export async function request<T>(method: Method, path: string, body?: unknown, init: RequestInit = {}): Promise<T> {
  const isForm = typeof FormData !== 'undefined' && body instanceof FormData;
  const res = await fetch(path, {
    method,
    credentials: 'same-origin',
    headers: body === undefined || isForm ? { Accept: 'application/json' } : { 'Content-Type': 'application/json', Accept: 'application/json' },
    body: body === undefined ? undefined : isForm ? (body as FormData) : JSON.stringify(body),
    ...init,
  });
  const text = await res.text();
  let data: unknown = undefined;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = text;
    }
  }
  if (!res.ok) {
    const err = (data as { error?: { code?: string; message?: string; field?: string } } | undefined)?.error;
    const { code, message, field, ...details } = err ?? {};
    const error = new ApiError(res.status, code ?? `http_${res.status}`, message ?? res.statusText ?? 'Request failed', field, details);
    // A wrong password elsewhere (accepting an invitation with an existing account) is also 401, but no expiry.
    if (res.status === 401 && path !== SIGN_IN_PATH && error.code !== 'bad_credentials') unauthorizedHandler?.(error);
    throw error;
  }
  return data as T;
}

export const http = {
  get: <T>(path: string, init?: RequestInit) => request<T>('GET', path, undefined, init),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  put: <T>(path: string, body: unknown) => request<T>('PUT', path, body),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  del: <T>(path: string) => request<T>('DELETE', path),
};

/** Build a query string from defined values only. */
export function query(params: Record<string, string | number | boolean | undefined | null>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : '';
}
