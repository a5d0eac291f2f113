import type { ErrorBody, ErrorIssue } from '../contract';
import { formatDateTime } from '../view/when';

/** The message shown when a request never reached the server (offline, refused, aborted). */
export const UNREACHABLE = 'The server could not be reached. Check the connection and try again.';

/**
 * An API error as the routes send it: `{ error: { message, path?, issues?, ...extra } }` with the
 * HTTP status. `body` keeps the extra fields (e.g. the stale save's `latest`).
 */
export class ApiError<Body extends ErrorBody['error'] = ErrorBody['error']> extends Error {
  constructor(
    readonly status: number,
    readonly body: Body,
  ) {
    super(body.message);
  }

  /** The request field the error is about, if the server named one. */
  get path(): string | undefined {
    return this.body.path;
  }

  /** Every located problem the server listed (empty when it listed none). */
  get issues(): ErrorIssue[] {
    return this.body.issues ?? [];
  }
}

/** The error body of a failed response, with a message even when the server sent none. */
function errorOf(status: number, payload: unknown): ErrorBody['error'] {
  const error = (payload as Partial<ErrorBody> | null)?.error;
  return error && typeof error.message === 'string' ? error : { ...error, message: `The server answered ${status}.` };
}

/** Calls a JSON API route from the browser; resolves to the body (undefined for 204) or throws ApiError. */
export async function requestJson<T>(url: string, { method = 'GET', body, signal }: { method?: string; body?: unknown; signal?: AbortSignal } = {}): Promise<T> {
  const response = await fetch(url, {
    method,
    signal,
    headers: body === undefined ? { accept: 'application/json' } : { accept: 'application/json', 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
    credentials: 'same-origin',
  });
  if (response.status === 204) return undefined as T;
  const payload: unknown = await response.json().catch(() => null);
  if (!response.ok) throw new ApiError(response.status, errorOf(response.status, payload));
  return payload as T;
}

/** A file upload under way: its answer, and a way to stop it. */
export interface Upload<T> {
  done: Promise<T>;
  abort: () => void;
}

/**
 * Sends `file` as the raw request body of a POST (streamed by the browser, never read into a
 * string here) and reports progress as `(sentBytes, totalBytes)`. XMLHttpRequest because fetch
 * reports no upload progress. Resolves to the JSON answer or rejects with ApiError; an abort
 * rejects with an ApiError of status 0.
 */
export function uploadFile<T>(url: string, file: Blob, onProgress: (sent: number, total: number) => void): Upload<T> {
  const xhr = new XMLHttpRequest();
  const done = new Promise<T>((resolve, reject) => {
    xhr.open('POST', url);
    xhr.withCredentials = true;
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (event) => onProgress(event.loaded, event.lengthComputable ? event.total : file.size);
    xhr.onload = () => {
      let payload: unknown = null;
      try {
        payload = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        payload = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(payload as T);
      else reject(new ApiError(xhr.status, errorOf(xhr.status, payload)));
    };
    xhr.onerror = () => reject(new ApiError(0, { message: UNREACHABLE }));
    xhr.onabort = () => reject(new ApiError(0, { message: 'The upload was stopped; nothing was kept.' }));
    xhr.send(file);
  });
  return { done, abort: () => xhr.abort() };
}

/**
 * Posts a form to an Auth.js endpoint (credentials callback, e-mail link sign-in) with its CSRF
 * token; answers where to go next and the error code Auth.js reported, if any.
 */
export async function postAuthForm(path: string, fields: Record<string, string>, callbackUrl: string): Promise<{ url: string; error: string | null }> {
  const { csrfToken } = await requestJson<{ csrfToken: string }>('/api/auth/csrf');
  const response = await fetch(path, {
    method: 'POST',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' },
    body: new URLSearchParams({ ...fields, csrfToken, callbackUrl }),
    credentials: 'same-origin',
  });
  const { url } = (await response.json()) as { url: string };
  const params = new URL(url, window.location.origin).searchParams;
  // A custom sign-in refusal (e.g. rate_limited) arrives as `code`; "credentials" is Auth.js's generic one.
  const code = params.get('code');
  return { url, error: code && code !== 'credentials' ? code : params.get('error') };
}

/** Signs in with e-mail and password through Auth.js's credentials callback. */
export function signInWithPassword(email: string, password: string, callbackUrl = '/'): Promise<{ url: string; error: string | null }> {
  return postAuthForm('/api/auth/callback/credentials', { email, password }, callbackUrl);
}

/** Field messages from zod issues, keyed by the first path segment; the first message of a field wins. */
export function fieldErrors(issues: readonly { path: readonly PropertyKey[]; message: string }[]): Record<string, string> {
  const errors: Record<string, string> = {};
  for (const issue of issues) errors[String(issue.path[0] ?? 'form')] ??= issue.message;
  return errors;
}

/** Field messages for an error thrown by `requestJson` (the field its `path` names, else the whole form). */
export function serverErrors(error: unknown, fields: readonly string[]): Record<string, string> {
  if (error instanceof ApiError) {
    const field = error.path?.split('.')[0];
    return { [field && fields.includes(field) ? field : 'form']: error.message };
  }
  return { form: UNREACHABLE };
}

/** A date from the API (ISO string) as "3 Dec 2026, 14:05 CET" in the viewer's time zone, zone named; "never" for null. */
export function formatWhen(value: string | null | undefined): string {
  return value ? formatDateTime(value) : 'never';
}
