import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { respond } from '../../../src/lib/server/http';
import { BODY_LIMITS, parseJsonBody, readBody } from '../../../src/lib/server/request-body';

/** A POST whose body streams `bytes` in 16 KiB chunks without a Content-Length; `state.pulled` counts what was taken. */
function streamingPost(bytes: number) {
  const chunk = new Uint8Array(16 * 1024).fill(0x20);
  const state = { pulled: 0 };
  const body = new ReadableStream<Uint8Array>(
    {
      pull(controller) {
        if (state.pulled >= bytes) return controller.close();
        state.pulled += chunk.byteLength;
        controller.enqueue(chunk);
      },
    },
    { highWaterMark: 0 },
  );
  const request = new Request('http://127.0.0.1:4321/api/x', { method: 'POST', body, duplex: 'half' } as RequestInit);
  return { request, state };
}

const message = async (response: Response) => ((await response.json()) as { error: { message: string } }).error.message;

describe('readBody', () => {
  it('refuses a declared Content-Length over the limit before reading anything', async () => {
    const request = new Request('http://127.0.0.1:4321/api/x', { method: 'POST', body: 'x'.repeat(100), headers: { 'content-length': String(2 * 1024 * 1024) } });
    const read = await readBody(request, BODY_LIMITS.sheet);
    expect(read.ok).toBe(false);
    if (read.ok) return;
    const response = respond(read);
    expect(response.status).toBe(413);
    expect(await message(response)).toMatch(/1 MiB/);
    expect(request.bodyUsed).toBe(false);
  });

  it('counts a chunked body while it streams and stops just past the limit', async () => {
    const { request, state } = streamingPost(50 * 1024 * 1024);
    const read = await readBody(request, BODY_LIMITS.form);
    expect(read.ok).toBe(false);
    if (read.ok) return;
    const response = respond(read);
    expect(response.status).toBe(413);
    expect(await message(response)).toMatch(/64 KiB/);
    expect(state.pulled).toBeLessThanOrEqual(BODY_LIMITS.form + 16 * 1024);
  });

  it('returns a body within the limit whole', async () => {
    const { request } = streamingPost(48 * 1024);
    const read = await readBody(request, BODY_LIMITS.form);
    expect(read.ok && read.value.byteLength).toBe(48 * 1024);
  });
});

describe('parseJsonBody', () => {
  const schema = z.object({ name: z.string().max(10) });

  it('validates a body within its limit and names the failing field', async () => {
    const good = await parseJsonBody(new Request('http://x/', { method: 'POST', body: '{"name":"Ada"}' }), schema, BODY_LIMITS.form);
    expect(good).toEqual({ ok: true, value: { name: 'Ada' } });
    const bad = await parseJsonBody(new Request('http://x/', { method: 'POST', body: '{"name":"a very long name"}' }), schema, BODY_LIMITS.form);
    expect(!bad.ok && (await respond(bad).json())).toMatchObject({ error: { path: 'name' } });
  });

  it('answers 413 rather than parsing a body over its limit', async () => {
    const body = JSON.stringify({ name: 'x'.repeat(BODY_LIMITS.form) });
    const parsed = await parseJsonBody(new Request('http://x/', { method: 'POST', body }), schema, BODY_LIMITS.form);
    expect(!parsed.ok && respond(parsed).status).toBe(413);
  });
});
