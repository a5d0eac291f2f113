import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { fail, succeed, type ErrorKind } from '../../../src/lib/result';
import { BODY_PATH, respond, validate } from '../../../src/lib/server/http';
import { readBody } from '../../../src/lib/server/request-body';

describe('respond', () => {
  it('maps every error kind to its one status and keeps the body shape { error: { message, path?, ... } }', async () => {
    const statuses: Record<ErrorKind, number> = {
      invalid: 400,
      unauthenticated: 401,
      forbidden: 403,
      'not-found': 404,
      conflict: 409,
      stale: 409,
      gone: 410,
      'too-large': 413,
      // RFC 4918, section 11.2 (now RFC 9110, section 15.5.21): well-formed content that cannot be processed.
      unprocessable: 422,
      'rate-limited': 429,
    };
    for (const [kind, status] of Object.entries(statuses) as [ErrorKind, number][]) {
      const response = respond(fail({ kind, message: `a ${kind} error`, path: 'field', latest: 3 }));
      expect(response.status).toBe(status);
      expect(await response.json()).toEqual({ error: { message: `a ${kind} error`, path: 'field', latest: 3 } });
    }
  });

  it('answers the value with the success status and headers', async () => {
    const response = respond(succeed({ id: 'x' }), 201, { 'cache-control': 'no-store' });
    expect(response.status).toBe(201);
    expect(response.headers.get('cache-control')).toBe('no-store');
    expect(await response.json()).toEqual({ id: 'x' });
  });

  it('closes the connection only after part of an oversized body was read', async () => {
    const declared = new Request('http://x/', { method: 'POST', body: 'x'.repeat(10), headers: { 'content-length': '100' } });
    expect(respond(await readBody(declared, 50)).headers.get('connection')).toBeNull();
    const chunked = new Request('http://x/', { method: 'POST', body: new Blob(['x'.repeat(100)]).stream(), duplex: 'half' } as RequestInit);
    const refused = respond(await readBody(chunked, 50));
    expect(refused.status).toBe(413);
    expect(refused.headers.get('connection')).toBe('close');
  });
});

describe('validate', () => {
  it('names the first failing field, or the body as a whole', () => {
    expect(validate(z.object({ name: z.string() }), { name: 1 })).toMatchObject({ ok: false, error: { kind: 'invalid', path: 'name' } });
    expect(validate(z.string(), 1)).toMatchObject({ ok: false, error: { kind: 'invalid', path: BODY_PATH } });
  });
});
