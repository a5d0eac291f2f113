/**
 * What a domain function answers: its value, or why not. The kinds name the reason, never an HTTP
 * status; `respond` (src/lib/server/http.ts) is the one place that turns them into responses.
 * Extra fields (e.g. the latest revision of a stale save) travel to the client unchanged.
 */
export type ErrorKind =
  /** The input is wrong; `path` names the field. */
  | 'invalid'
  /** Nobody is signed in (no session, no valid token). */
  | 'unauthenticated'
  /** Signed in, but not allowed to do this. */
  | 'forbidden'
  /** Does not exist, or belongs to a team the caller is not in. */
  | 'not-found'
  /** The change contradicts the current state (e.g. removing the last owner). */
  | 'conflict'
  /** The change was based on a revision that is no longer the latest. */
  | 'stale'
  /** Existed once and can no longer be used (a used or expired link). */
  | 'gone'
  /** The request body is larger than the endpoint accepts. */
  | 'too-large'
  /** The request is well formed but what it points at cannot be processed (e.g. a controller log with bad rows). */
  | 'unprocessable'
  /** Too many attempts; try again later. */
  | 'rate-limited';

export interface DomainError {
  kind: ErrorKind;
  message: string;
  /** The request field the error is about, e.g. "document.hand.fingers[0]" or "baseRevision". */
  path?: string;
  [extra: string]: unknown;
}

export type Failure<E extends DomainError = DomainError> = { ok: false; error: E };

export type Result<T, E extends DomainError = DomainError> = { ok: true; value: T } | Failure<E>;

export const succeed = <T>(value: T): { ok: true; value: T } => ({ ok: true, value });

export const fail = <E extends DomainError>(error: E): Failure<E> => ({ ok: false, error });
