import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiError, fieldErrors, postAuthForm, requestJson, serverErrors, signInWithPassword, UNREACHABLE, uploadFile } from '../../../src/lib/client/api';
import type { LatestRevision, StaleSaveError } from '../../../src/lib/contract';

const fetchMock = vi.fn<typeof fetch>();

beforeEach(() => {
  vi.stubGlobal('fetch', fetchMock);
  vi.stubGlobal('window', { location: { origin: 'http://app.test' } });
});
afterEach(() => {
  vi.unstubAllGlobals();
  fetchMock.mockReset();
});

const json = (body: unknown, status = 200) => new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });

/** The error requestJson threw for one answer. */
async function errorFor(response: Response): Promise<ApiError> {
  fetchMock.mockResolvedValueOnce(response);
  return requestJson('/api/x').then(
    () => expect.unreachable('requestJson resolved'),
    (error: unknown) => {
      expect(error).toBeInstanceOf(ApiError);
      return error as ApiError;
    },
  );
}

describe('requestJson', () => {
  it('GETs with an Accept header and the session cookie, and resolves to the body', async () => {
    fetchMock.mockResolvedValueOnce(json({ tokens: [] }));
    await expect(requestJson('/api/tokens')).resolves.toEqual({ tokens: [] });
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/tokens');
    expect(init).toMatchObject({ method: 'GET', headers: { accept: 'application/json' }, credentials: 'same-origin', body: undefined });
  });

  it('sends a body as JSON with its content type', async () => {
    fetchMock.mockResolvedValueOnce(json({ sheetId: 's1' }, 201));
    await expect(requestJson('/api/sheets', { method: 'POST', body: { title: 'Pinch' } })).resolves.toEqual({ sheetId: 's1' });
    expect(fetchMock.mock.calls[0][1]).toMatchObject({
      method: 'POST',
      headers: { accept: 'application/json', 'content-type': 'application/json' },
      body: '{"title":"Pinch"}',
    });
  });

  it('resolves to undefined for 204 No Content', async () => {
    fetchMock.mockResolvedValueOnce(new Response(null, { status: 204 }));
    await expect(requestJson('/api/tokens/t1', { method: 'DELETE' })).resolves.toBeUndefined();
  });

  it('throws the error body: status, message and path', async () => {
    const error = await errorFor(json({ error: { message: 'Enter an e-mail address like name@example.com.', path: 'email' } }, 400));
    expect(error.status).toBe(400);
    expect(error.message).toBe('Enter an e-mail address like name@example.com.');
    expect(error.path).toBe('email');
    expect(error.issues).toEqual([]);
  });

  it('keeps the located issues of an invalid document', async () => {
    const issues = [
      { message: 'Expected a number.', path: 'hand.fingers[0].length', line: 5, column: 1 },
      { message: 'Unknown unit.', path: 'object.radius' },
    ];
    const error = await errorFor(json({ error: { message: 'Expected a number.', path: 'document.hand.fingers[0].length', issues } }, 400));
    expect(error.issues).toEqual(issues);
  });

  it('keeps the extra fields of a stale save (409), so the editor rebases without asking again', async () => {
    const latest: LatestRevision = { number: 3, inputs: { title: 'Theirs' }, message: 'Wider pads', authorName: 'Ada' };
    const stale: StaleSaveError = { message: 'Revision 3 was saved after revision 2.', path: 'baseRevision', latestRevision: 3, latest };
    const error = await errorFor(json({ error: stale }, 409));
    expect(error.status).toBe(409);
    expect(error.body).toEqual(stale);
  });

  it('names the status when the error body is missing or not JSON', async () => {
    expect((await errorFor(new Response('<html>Bad gateway</html>', { status: 502 }))).message).toBe('The server answered 502.');
    expect((await errorFor(json({ something: 'else' }, 500))).message).toBe('The server answered 500.');
    const noMessage = await errorFor(json({ error: { path: 'name' } }, 400));
    expect(noMessage.message).toBe('The server answered 400.');
    expect(noMessage.path).toBe('name');
  });

  it('lets a network failure through as it is (not an ApiError)', async () => {
    fetchMock.mockRejectedValueOnce(new TypeError('Failed to fetch'));
    await expect(requestJson('/api/x')).rejects.toThrow(TypeError);
  });
});

describe('Auth.js form posts', () => {
  function answerAuth(redirect: string) {
    fetchMock.mockResolvedValueOnce(json({ csrfToken: 'csrf-1' })).mockResolvedValueOnce(json({ url: redirect }));
  }

  it('fetches the CSRF token, then posts the fields as a form asking for the redirect as JSON', async () => {
    answerAuth('http://app.test/sheets');
    await expect(postAuthForm('/api/auth/signin/nodemailer', { email: 'ada@example.com' }, '/sheets')).resolves.toEqual({ url: 'http://app.test/sheets', error: null });
    expect(fetchMock.mock.calls[0][0]).toBe('/api/auth/csrf');
    const [url, init] = fetchMock.mock.calls[1];
    expect(url).toBe('/api/auth/signin/nodemailer');
    expect(init).toMatchObject({ method: 'POST', headers: { 'Content-Type': 'application/x-www-form-urlencoded', 'X-Auth-Return-Redirect': '1' } });
    expect(Object.fromEntries(init!.body as URLSearchParams)).toEqual({ email: 'ada@example.com', csrfToken: 'csrf-1', callbackUrl: '/sheets' });
  });

  it('reports the error code Auth.js put into the redirect: a custom code before the generic error', async () => {
    answerAuth('http://app.test/sign-in?error=CredentialsSignin&code=rate_limited');
    expect((await signInWithPassword('ada@example.com', 'pw', '/')).error).toBe('rate_limited');
    answerAuth('http://app.test/sign-in?error=CredentialsSignin&code=credentials');
    expect((await signInWithPassword('ada@example.com', 'pw', '/')).error).toBe('CredentialsSignin');
    answerAuth('/sign-in?error=Verification');
    expect((await postAuthForm('/api/auth/signin/nodemailer', { email: 'a@b.c' }, '/')).error).toBe('Verification');
  });

  it('signs in with password through the credentials callback', async () => {
    answerAuth('http://app.test/');
    await signInWithPassword('ada@example.com', 'correct horse', '/');
    expect(fetchMock.mock.calls[1][0]).toBe('/api/auth/callback/credentials');
    expect(Object.fromEntries(fetchMock.mock.calls[1][1]!.body as URLSearchParams)).toMatchObject({ email: 'ada@example.com', password: 'correct horse' });
  });
});

describe('messages for form fields', () => {
  it('keys zod issues by their first path segment, the first message of a field winning', () => {
    expect(
      fieldErrors([
        { path: ['email'], message: 'first' },
        { path: ['email'], message: 'second' },
        { path: ['document', 'title'], message: 'nested' },
        { path: [], message: 'whole' },
      ]),
    ).toEqual({ email: 'first', document: 'nested', form: 'whole' });
  });

  it('puts a server error on the field its path names, else on the form; an unreachable server on the form', () => {
    expect(serverErrors(new ApiError(400, { message: 'Taken.', path: 'email' }), ['email'])).toEqual({ email: 'Taken.' });
    expect(serverErrors(new ApiError(400, { message: 'Bad title.', path: 'title.text' }), ['title'])).toEqual({ title: 'Bad title.' });
    expect(serverErrors(new ApiError(403, { message: 'Owners only.', path: 'teamId' }), ['email'])).toEqual({ form: 'Owners only.' });
    expect(serverErrors(new TypeError('Failed to fetch'), ['email'])).toEqual({ form: UNREACHABLE });
  });
});

/** A stand-in for the browser's XMLHttpRequest: records what was sent; the test plays the server's part. */
class FakeXhr {
  static last: FakeXhr;
  method = '';
  url = '';
  sent: unknown;
  withCredentials = false;
  status = 0;
  responseText = '';
  headers: Record<string, string> = {};
  upload: { onprogress: ((event: { loaded: number; total: number; lengthComputable: boolean }) => void) | null } = { onprogress: null };
  onload: (() => void) | null = null;
  onerror: (() => void) | null = null;
  onabort: (() => void) | null = null;
  constructor() {
    FakeXhr.last = this;
  }
  open(method: string, url: string) {
    this.method = method;
    this.url = url;
  }
  setRequestHeader(name: string, value: string) {
    this.headers[name] = value;
  }
  send(body: unknown) {
    this.sent = body;
  }
  abort() {
    this.onabort?.();
  }
  answer(status: number, body: unknown) {
    this.status = status;
    this.responseText = JSON.stringify(body);
    this.onload?.();
  }
}

describe('uploadFile', () => {
  beforeEach(() => vi.stubGlobal('XMLHttpRequest', FakeXhr));

  it('posts the file itself as the body with the session cookie, reports progress and resolves to the answer', async () => {
    const file = new Blob(['t,px\n0,0.1\n']);
    const seen: [number, number][] = [];
    const upload = uploadFile<{ id: string }>('/api/sheets/s1/logs?fileName=run.csv', file, (sent, total) => seen.push([sent, total]));
    const xhr = FakeXhr.last;
    expect([xhr.method, xhr.url, xhr.sent, xhr.withCredentials]).toEqual(['POST', '/api/sheets/s1/logs?fileName=run.csv', file, true]);
    xhr.upload.onprogress?.({ loaded: 5, total: 12, lengthComputable: true });
    xhr.answer(201, { id: 'log-1' });
    await expect(upload.done).resolves.toEqual({ id: 'log-1' });
    expect(seen).toEqual([[5, 12]]);
  });

  it('rejects with the server error (status, message, field), and with a status-0 error when stopped', async () => {
    const refused = uploadFile('/api/x', new Blob(['x']), () => {});
    FakeXhr.last.answer(413, { error: { message: 'The log is larger than the 500 MiB an upload may be.', path: '(body)' } });
    const error = await refused.done.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect([(error as ApiError).status, (error as ApiError).message, (error as ApiError).path]).toEqual([413, 'The log is larger than the 500 MiB an upload may be.', '(body)']);
    const stopped = uploadFile('/api/x', new Blob(['x']), () => {});
    stopped.abort();
    await expect(stopped.done).rejects.toMatchObject({ status: 0 });
  });
});
