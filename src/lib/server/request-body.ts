import type { z } from 'zod';
import { errorResponse } from './access';
import { findOversizedJson, oversizedJsonMessage } from './json-depth';

/** Path of an issue about the request body as a whole. */
export const BODY_PATH = '(body)';

export type ParsedBody<T> = { ok: true; data: T } | { ok: false; response: Response };
export type ReadBody = { ok: true; bytes: Uint8Array<ArrayBuffer> } | { ok: false; response: Response };

const KIB = 1024;
const MIB = 1024 * KIB;

/**
 * The most bytes each kind of route reads from a request body. Bodies are counted while they
 * stream in, so a larger one costs the server at most this much memory before it is refused.
 */
export const BODY_LIMITS = {
  /** Auth.js form posts: an e-mail address, a password of at most 200 characters, a CSRF token and a callback URL. */
  auth: 16 * KIB,
  /** Every other small JSON body (names, roles, passwords, a comment of 4,000 characters even if each is escaped). */
  form: 64 * KIB,
  /** A sheet document with its title, tags and message; the shipped examples are under 8 kB. */
  sheet: 1 * MIB,
  /** One sheet file (comments allowed) as a multipart upload or a JSON string, which escapes quotes and newlines. */
  import: 2 * MIB,
} as const;

/** A byte count as people read limits: "64 KiB", "2 MiB". */
function formatSize(bytes: number): string {
  return bytes >= MIB ? `${bytes / MIB} MiB` : `${bytes / KIB} KiB`;
}

/**
 * 413 naming the limit. `closeConnection` once part of the body was consumed: the rest can then
 * neither be drained by the server nor be followed by another request on the same connection.
 */
function tooLarge(limit: number, closeConnection: boolean): Response {
  const response = errorResponse(413, `The request body is larger than the ${formatSize(limit)} this endpoint accepts.`);
  if (closeConnection) response.headers.set('connection', 'close');
  return response;
}

/**
 * Reads a request body of at most `limit` bytes: a larger declared Content-Length is refused
 * before anything is read, and a body without one (chunked) is counted while it streams and
 * refused as soon as it passes the limit.
 */
export async function readBody(request: Request, limit: number): Promise<ReadBody> {
  // Nothing read yet: the server discards the unread upload and the client still gets the answer.
  if (Number(request.headers.get('content-length') ?? 0) > limit) return { ok: false, response: tooLarge(limit, false) };
  if (!request.body) return { ok: true, bytes: new Uint8Array() };
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      // Left unread rather than cancelled: cancelling would reset the socket before the 413 is sent.
      reader.releaseLock();
      return { ok: false, response: tooLarge(limit, true) };
    }
    chunks.push(value);
  }
  const bytes = new Uint8Array(size);
  let offset = 0;
  for (const chunk of chunks) {
    bytes.set(chunk, offset);
    offset += chunk.byteLength;
  }
  return { ok: true, bytes };
}

/** 400 with the first failing field's message and path. */
export function invalidInput(error: z.ZodError): Response {
  const [issue] = error.issues;
  return errorResponse(400, issue.message, issue.path.join('.') || BODY_PATH);
}

/** The body as JSON, or undefined when it is empty; throws on text that is not JSON. */
export function parseJson(bytes: Uint8Array<ArrayBuffer>): unknown {
  const text = new TextDecoder().decode(bytes);
  return text.trim() ? JSON.parse(text) : undefined;
}

/**
 * Reads a JSON request body of at most `limit` bytes (one of BODY_LIMITS) and validates it; 413
 * past the limit, 400 with the first failing field's path otherwise. An empty body is validated
 * as `undefined`, so schemas with defaults accept it.
 */
export async function parseJsonBody<S extends z.ZodType>(request: Request, schema: S, limit: number): Promise<ParsedBody<z.infer<S>>> {
  const body = await readBody(request, limit);
  if (!body.ok) return body;
  let raw: unknown;
  try {
    const text = new TextDecoder().decode(body.bytes);
    const oversized = findOversizedJson(text);
    if (oversized) return { ok: false, response: errorResponse(400, `${oversizedJsonMessage('The request', oversized.reason)}.`, oversized.field ?? BODY_PATH) };
    raw = text.trim() ? JSON.parse(text) : undefined;
  } catch {
    return { ok: false, response: errorResponse(400, 'Send a JSON body.', BODY_PATH) };
  }
  const parsed = schema.safeParse(raw);
  return parsed.success ? { ok: true, data: parsed.data } : { ok: false, response: invalidInput(parsed.error) };
}
