/** An API error as the routes send it: `{ error: { message, path? } }` with the HTTP status. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly path?: string,
  ) {
    super(message);
  }
}

/** Calls a JSON API route from the browser; resolves to the body (undefined for 204) or throws ApiError. */
export async function requestJson<T>(url: string, { method = 'GET', body }: { method?: string; body?: unknown } = {}): Promise<T> {
  const response = await fetch(url, {
    method,
    headers: body === undefined ? { accept: 'application/json' } : { accept: 'application/json', 'content-type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
    credentials: 'same-origin',
  });
  if (response.status === 204) return undefined as T;
  const payload = await response.json().catch(() => null);
  if (!response.ok) {
    const error = (payload as { error?: { message?: string; path?: string } } | null)?.error;
    throw new ApiError(response.status, error?.message ?? `The server answered ${response.status}.`, error?.path);
  }
  return payload as T;
}

/** Field messages from a zod error, keyed by the first path segment. */
export function fieldErrors(issues: readonly { path: readonly PropertyKey[]; message: string }[]): Record<string, string> {
  const errors: Record<string, string> = {};
  for (const issue of issues) errors[String(issue.path[0] ?? 'form')] ??= issue.message;
  return errors;
}

/** Field messages for an error thrown by `requestJson` (the field it names, else the whole form). */
export function serverErrors(error: unknown, fields: readonly string[]): Record<string, string> {
  if (error instanceof ApiError) {
    const field = error.path?.split('.')[0];
    return { [field && fields.includes(field) ? field : 'form']: error.message };
  }
  return { form: 'The server could not be reached. Check the connection and try again.' };
}

const dateTime = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short' });

/** A date from the API (ISO string) as "3 Dec 2026, 14:05" in the viewer's time zone; "never" for null. */
export function formatWhen(value: string | null | undefined): string {
  return value ? dateTime.format(new Date(value)) : 'never';
}
