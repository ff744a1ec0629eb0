// The one way the client talks to the server: JSON in and out, cookies same-origin, the
// shared error shape turned into an ApiRequestError, and a 401 sending the user to sign-in.

import type { z } from 'zod';
import { apiErrorSchema } from '../../shared/api/common';

export type ErrorDetail = { path: string; message: string };

export class ApiRequestError extends Error {
  override readonly name = 'ApiRequestError';
  constructor(
    /** HTTP status; 0 when the server could not be reached at all. */
    readonly status: number,
    /** The server's machine-readable code (`invalid-credentials`, `validation`, …), or `network`. */
    readonly code: string,
    message: string,
    readonly details: ErrorDetail[] = [],
  ) {
    super(message);
  }
}

export function isApiError(error: unknown, code?: string): error is ApiRequestError {
  return error instanceof ApiRequestError && (code === undefined || error.code === code);
}

type UnauthenticatedHandler = () => void;

function redirectToSignIn() {
  const here = window.location.pathname + window.location.search;
  if (window.location.pathname === '/sign-in') return;
  window.location.assign(`/sign-in?next=${encodeURIComponent(here)}`);
}

let onUnauthenticated: UnauthenticatedHandler = redirectToSignIn;

/** The app replaces the default full-page redirect with a router navigation. */
export function setUnauthenticatedHandler(handler: UnauthenticatedHandler | null) {
  onUnauthenticated = handler ?? redirectToSignIn;
}

export type Query = Record<string, string | number | boolean | undefined | null>;

export interface RequestOptions<T> {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  body?: unknown;
  query?: Query;
  signal?: AbortSignal;
  /** Validate the response body; without it the body is trusted to match `T`. */
  schema?: z.ZodType<T>;
  /**
   * A 401 normally means the session has ended and sends the user to sign-in. Sign-in itself
   * and the session probe answer 401 as a normal outcome, so they turn this off.
   */
  redirectOnUnauthenticated?: boolean;
}

function withQuery(path: string, query?: Query) {
  if (!query) return path;
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value !== undefined && value !== null && value !== '') params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `${path}${path.includes('?') ? '&' : '?'}${text}` : path;
}

async function readError(response: Response): Promise<ApiRequestError> {
  let body: unknown = null;
  try {
    body = await response.json();
  } catch {
    // Not JSON: a proxy page or an empty body. Fall through to a generic message.
  }
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { code, message, details } = parsed.data.error;
    return new ApiRequestError(response.status, code, message, details ?? []);
  }
  const statusText = response.statusText ? ` ${response.statusText}` : '';
  return new ApiRequestError(
    response.status,
    response.status >= 500 ? 'internal' : 'unexpected-response',
    `The server answered ${response.status}${statusText}.`,
  );
}

export async function apiRequest<T = unknown>(path: string, options: RequestOptions<T> = {}): Promise<T> {
  const { method = 'GET', body, query, signal, schema, redirectOnUnauthenticated = true } = options;
  const headers: Record<string, string> = { Accept: 'application/json' };
  if (body !== undefined) headers['Content-Type'] = 'application/json';

  let response: Response;
  try {
    response = await fetch(withQuery(path, query), {
      method,
      headers,
      body: body === undefined ? undefined : JSON.stringify(body),
      credentials: 'same-origin',
      signal,
    });
  } catch (error) {
    if (signal?.aborted) throw error;
    throw new ApiRequestError(0, 'network', 'Keepwell’s server could not be reached. Check your connection and try again.');
  }

  if (!response.ok) {
    const error = await readError(response);
    if (response.status === 401 && redirectOnUnauthenticated) onUnauthenticated();
    throw error;
  }
  // 202 and 204 answers may carry no body at all.
  const text = await response.text();
  if (!text) return undefined as T;
  const data: unknown = JSON.parse(text);
  return schema ? schema.parse(data) : (data as T);
}

type Options<T> = Omit<RequestOptions<T>, 'method' | 'body'>;

export const api = {
  get: <T>(path: string, options?: Options<T>) => apiRequest<T>(path, { ...options, method: 'GET' }),
  post: <T>(path: string, body?: unknown, options?: Options<T>) => apiRequest<T>(path, { ...options, method: 'POST', body }),
  patch: <T>(path: string, body?: unknown, options?: Options<T>) => apiRequest<T>(path, { ...options, method: 'PATCH', body }),
  put: <T>(path: string, body?: unknown, options?: Options<T>) => apiRequest<T>(path, { ...options, method: 'PUT', body }),
  delete: <T>(path: string, options?: Options<T>) => apiRequest<T>(path, { ...options, method: 'DELETE' }),
};
