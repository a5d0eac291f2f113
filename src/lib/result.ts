/**
 * What a domain function answers: its value, or why not. The kinds name the reason, never an HTTP
 * status; `respond` (src/lib/server/http.ts) is the one place that turns them into responses.
 * Extra fields (e.g. the latest revision of a stale save) travel to the client unchanged.
 */
export type ErrorKind = 'not-found' | 'forbidden' | 'stale' | 'invalid';

export interface DomainError {
  kind: ErrorKind;
  message: string;
  /** The request field the error is about, e.g. "document.hand.fingers[0]" or "baseRevision". */
  path?: string;
  [extra: string]: unknown;
}

export type Result<T, E extends DomainError = DomainError> = { ok: true; value: T } | { ok: false; error: E };

export const succeed = <T>(value: T): { ok: true; value: T } => ({ ok: true, value });

export const fail = <E extends DomainError>(error: E): { ok: false; error: E } => ({ ok: false, error });
