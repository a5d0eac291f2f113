import type { z } from 'zod';
import { fail, type Result } from '../result';
import { BODY_PATH, validate, type BodyFailure } from './http';
import { findOversizedJson, oversizedJsonMessage } from './json-depth';

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
  /** A log mapping with its revision: 96 joints of three columns of 200 characters each fit several times over. */
  mapping: 256 * KIB,
} as const;

/** A byte count as people read limits: "64 KiB", "2 MiB". */
function formatSize(bytes: number): string {
  return bytes >= MIB ? `${bytes / MIB} MiB` : `${bytes / KIB} KiB`;
}

/** The failure naming the limit; `closeConnection` once part of the body was consumed. */
function tooLarge(limit: number, closeConnection: boolean): BodyFailure {
  return { ...fail({ kind: 'too-large', message: `The request body is larger than the ${formatSize(limit)} this endpoint accepts.` }), closeConnection };
}

/**
 * Reads a request body of at most `limit` bytes: a larger declared Content-Length is refused
 * before anything is read, and a body without one (chunked) is counted while it streams and
 * refused as soon as it passes the limit.
 */
export async function readBody(request: Request, limit: number): Promise<Result<Uint8Array<ArrayBuffer>> | BodyFailure> {
  // Nothing read yet: the server discards the unread upload and the client still gets the answer.
  if (Number(request.headers.get('content-length') ?? 0) > limit) return tooLarge(limit, false);
  if (!request.body) return { ok: true, value: new Uint8Array() };
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
      return tooLarge(limit, true);
    }
    chunks.push(value);
  }
  const bytes = new Uint8Array(size);
  let offset = 0;
  for (const chunk of chunks) {
    bytes.set(chunk, offset);
    offset += chunk.byteLength;
  }
  return { ok: true, value: bytes };
}

/** The body as JSON, or undefined when it is empty; throws on text that is not JSON. */
export function parseJson(bytes: Uint8Array<ArrayBuffer>): unknown {
  const text = new TextDecoder().decode(bytes);
  return text.trim() ? JSON.parse(text) : undefined;
}

/**
 * Reads a JSON request body of at most `limit` bytes (one of BODY_LIMITS) and validates it;
 * too-large past the limit, invalid with the first failing field's path otherwise. An empty body
 * is validated as `undefined`, so schemas with defaults accept it.
 */
export async function parseJsonBody<S extends z.ZodType>(request: Request, schema: S, limit: number): Promise<Result<z.infer<S>> | BodyFailure> {
  const body = await readBody(request, limit);
  if (!body.ok) return body;
  let raw: unknown;
  try {
    const text = new TextDecoder().decode(body.value);
    const oversized = findOversizedJson(text);
    if (oversized) return fail({ kind: 'invalid', message: `${oversizedJsonMessage('The request', oversized.reason)}.`, path: oversized.field ?? BODY_PATH });
    raw = text.trim() ? JSON.parse(text) : undefined;
  } catch {
    return fail({ kind: 'invalid', message: 'Send a JSON body.', path: BODY_PATH });
  }
  return validate(schema, raw);
}
