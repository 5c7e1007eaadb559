import type { ZodType } from 'zod';
import type * as Responses from '@coilpath/contract/responses';
import { noteServerNow } from './now';
import { noteNetworkAnswer, noteNetworkFailure } from './online';

/** The one HTTP client of the web app: JSON in and out, the API's error shape turned into ApiError. */
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
  /** Field messages of a 400 `invalid` answer, keyed by path. */
  get fieldErrors(): Record<string, string> {
    const d = this.details as { fields?: { path: string; message: string }[] } | undefined;
    return Object.fromEntries((d?.fields ?? []).map((f) => [f.path, f.message]));
  }
}

let onUnauthorized: (() => void) | undefined;
/** Called when a request answers 401 (the session ended): the app returns to sign-in. */
export function setUnauthorizedHandler(fn: () => void) {
  onUnauthorized = fn;
}

type Query = Record<string, string | number | boolean | null | undefined>;

export function withQuery(path: string, query?: Query): string {
  if (!query) return path;
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(query)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v));
  const s = q.toString();
  return s ? `${path}?${s}` : path;
}

/** The name of a response schema in `@coilpath/contract/responses` (e.g. `'dayResponseSchema'`). */
export type ResponseSchemaName = {
  [K in keyof typeof Responses]: (typeof Responses)[K] extends ZodType ? K : never;
}[keyof typeof Responses];

export interface RequestOptions {
  /**
   * The answer's schema: in development and tests the answer is parsed with it (loaded on demand, so the
   * production build carries no response schema) and a mismatch throws `response_mismatch`; the answer itself
   * is returned as received.
   */
  check?: ResponseSchemaName;
}

async function checkAnswer(method: string, path: string, check: ResponseSchemaName, data: unknown): Promise<void> {
  const schemas = await import('@coilpath/contract/responses');
  const parsed = (schemas[check] as ZodType).safeParse(data);
  if (parsed.success) return;
  const said = parsed.error.issues.map((i) => `${i.path.join('.') || '(answer)'}: ${i.message}`).join('; ');
  throw new ApiError(0, 'response_mismatch', `${method} ${path} answered something ${check} does not allow: ${said}`, {
    issues: parsed.error.issues,
  });
}

async function request<T>(method: string, path: string, body?: unknown, init?: RequestInit, options?: RequestOptions): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers: body !== undefined && !(body instanceof FormData) ? { 'Content-Type': 'application/json' } : undefined,
      body: body === undefined ? undefined : body instanceof FormData ? body : JSON.stringify(body),
      ...init,
    });
  } catch (e) {
    if (e instanceof DOMException && e.name === 'AbortError') throw e; // cancelled here, not a lost connection
    // No answer at all: the phone is offline, whatever navigator.onLine says (./online.ts).
    noteNetworkFailure();
    throw new ApiError(0, 'network', 'Coilpath could not reach the server. Check the connection and try again.');
  }
  noteServerNow(res.headers.get('x-coilpath-now'));
  noteNetworkAnswer();
  if (res.status === 204) return undefined as T;
  const type = res.headers.get('content-type') ?? '';
  const data: unknown = type.includes('application/json') ? await res.json().catch(() => null) : null;
  if (!res.ok) {
    const e = (data as { error?: { code?: string; message?: string; details?: unknown } } | null)?.error;
    if (res.status === 401 && !path.startsWith('/api/auth/')) onUnauthorized?.();
    throw new ApiError(res.status, e?.code ?? 'http_error', e?.message ?? `The server answered ${res.status}.`, e?.details);
  }
  // Dropped from the production build (import.meta.env is replaced at build time).
  if (options?.check && (import.meta.env.DEV || import.meta.env.MODE === 'test')) await checkAnswer(method, path, options.check, data);
  return data as T;
}

export const api = {
  get: <T>(path: string, query?: Query, options?: RequestOptions) =>
    request<T>('GET', withQuery(path, query), undefined, undefined, options),
  post: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('POST', path, body ?? {}, undefined, options),
  patch: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PATCH', path, body ?? {}, undefined, options),
  put: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PUT', path, body ?? {}, undefined, options),
  delete: <T>(path: string, options?: RequestOptions) => request<T>('DELETE', path, undefined, undefined, options),
  upload: <T>(path: string, form: FormData, options?: RequestOptions) => request<T>('POST', path, form, undefined, options),
};

export function errorMessage(err: unknown): string {
  if (err instanceof ApiError) return err.message;
  if (err instanceof Error) return err.message;
  return 'Something went wrong.';
}
