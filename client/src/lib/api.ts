import type { z } from 'zod';
import type { ApiErrorBody } from '@shared/schemas/common';

/** An answer from the API that was not a success, or no answer at all (status 0). */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  /** Field name → reason, for 400 answers that name the fields at fault. */
  readonly fields: Record<string, string>;
  /** The answer's whole JSON body, or null: some refusals carry more than the error (an import's report). */
  readonly body: unknown;

  constructor(status: number, code: string, message: string, fields: Record<string, string> = {}, body: unknown = null) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.fields = fields;
    this.body = body;
  }
}

const fallbackMessages: Record<number, string> = {
  0: 'Brink could not reach the server. Check the connection and try again.',
  400: 'Some of the details are not right. Check them and try again.',
  401: 'You are signed out. Sign in again to carry on.',
  403: 'Your role does not allow this.',
  404: 'That could not be found. It may have been removed.',
  409: 'Someone else changed this in the meantime. Reload and try again.',
  413: 'That file is too large.',
  429: 'Too many attempts. Wait a few minutes and try again.',
};

function fallbackMessage(status: number): string {
  return fallbackMessages[status] ?? 'The server could not do that just now. Try again in a moment.';
}

function isErrorBody(value: unknown): value is ApiErrorBody {
  if (typeof value !== 'object' || value === null || !('error' in value)) return false;
  const error = (value as { error: unknown }).error;
  return typeof error === 'object' && error !== null && typeof (error as { code?: unknown }).code === 'string';
}

/** Builds the ApiError for a failed response, whatever its body holds. */
async function errorFromResponse(res: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    // Not JSON (a proxy's error page, an empty body): fall back to the status alone.
  }
  if (isErrorBody(body)) {
    const { code, message, fields } = body.error;
    const cleanFields: Record<string, string> = {};
    if (fields && typeof fields === 'object') {
      for (const [name, reason] of Object.entries(fields)) {
        if (typeof reason === 'string') cleanFields[name] = reason;
      }
    }
    return new ApiError(res.status, code, message || fallbackMessage(res.status), cleanFields, body);
  }
  return new ApiError(res.status, `http_${res.status}`, fallbackMessage(res.status), {}, body);
}

interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Sent as JSON, or as it is when a FormData (multipart: the browser writes its boundary). */
  body?: unknown;
  /** More headers (the phone's outbox sends an Idempotency-Key). */
  headers?: Record<string, string>;
  signal?: AbortSignal;
}

/** Sends one request; answers with the response when it is a success, else throws ApiError. */
async function send(path: string, { method = 'GET', body, headers: extra, signal }: RequestOptions): Promise<Response> {
  const headers: Record<string, string> = { Accept: 'application/json', ...extra };
  const multipart = body instanceof FormData;
  if (body !== undefined && !multipart) headers['Content-Type'] = 'application/json';
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      headers,
      body: body === undefined ? undefined : multipart ? body : JSON.stringify(body),
      credentials: 'same-origin',
      signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw new ApiError(0, 'network', fallbackMessage(0));
  }
  if (!res.ok) throw await errorFromResponse(res);
  return res;
}

async function readBody<T>(res: Response): Promise<T> {
  if (res.status === 204) return undefined as T;
  const text = await res.text();
  return (text ? JSON.parse(text) : undefined) as T;
}

/**
 * Calls the API on the same origin with the session cookie. Sends and reads JSON; answers with
 * the parsed body, or undefined for 204 and empty bodies. Throws ApiError on any failure.
 */
export async function apiFetch<T>(path: string, options: RequestOptions = {}): Promise<T> {
  return readBody<T>(await send(path, options));
}

/** A GET that also gives the answer's headers (the field view reads the service worker's mark on a kept copy). */
export async function apiGetWithHeaders<T>(path: string, signal?: AbortSignal): Promise<{ body: T; headers: Headers }> {
  const res = await send(path, { signal });
  return { body: await readBody<T>(res), headers: res.headers };
}

/**
 * The one multipart upload (files with their fields): the answer is typed by the route's response
 * schema in shared/schemas, `sendForm<typeof planAnswer>(path, form, { method: 'PUT' })`. Throws
 * ApiError as the JSON calls do (status 0 with no connection; the refusal's whole body on `body`).
 */
export function sendForm<Schema extends z.ZodType>(
  path: string,
  form: FormData,
  { method = 'POST', headers }: { method?: 'POST' | 'PUT'; headers?: Record<string, string> } = {},
): Promise<z.output<Schema>> {
  return apiFetch<z.output<Schema>>(path, { method, body: form, headers });
}

export const api = {
  get: <T>(path: string, signal?: AbortSignal) => apiFetch<T>(path, { signal }),
  post: <T>(path: string, body?: unknown) => apiFetch<T>(path, { method: 'POST', body }),
  put: <T>(path: string, body?: unknown) => apiFetch<T>(path, { method: 'PUT', body }),
  patch: <T>(path: string, body?: unknown) => apiFetch<T>(path, { method: 'PATCH', body }),
  delete: <T = void>(path: string) => apiFetch<T>(path, { method: 'DELETE' }),
};

export function isApiError(error: unknown, status?: number): error is ApiError {
  return error instanceof ApiError && (status === undefined || error.status === status);
}

/** A sentence to show a person for any error thrown by a query or mutation. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  return 'Something went wrong in this page. Reload and try again.';
}
